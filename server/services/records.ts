import { createHash } from 'node:crypto'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/errors'
import type { StudyAccess } from './access'
import { canonicalJson, recordAudit, verifyAuditChain } from './audit'
import { assembleRecord, panelCodes } from './record-content'

const sha256 = (data: string | Buffer) => createHash('sha256').update(data).digest('hex')
export const contentHash = (content: unknown) => sha256(canonicalJson(content))

interface RecordRow {
  id: number
  study_id: number
  version: number
  status: 'draft' | 'in_review' | 'signed_off'
  show_names: boolean
  content: Record<string, unknown> | null
  content_hash: string | null
  based_on: number | null
  submitted_at: Date | null
  signed_off_at: Date | null
  signed_off_by: number | null
  audit_head: string | null
  row_version: number
}

async function latestRow(db: Db, studyId: number, version?: number): Promise<RecordRow | undefined> {
  const q = db('prior_records').where({ study_id: studyId })
  return version ? q.where({ version }).first() : q.orderBy('version', 'desc').first()
}

/** The current version's row, creating version 1 as a draft on first use. */
async function ensureRecord(db: Db, studyId: number): Promise<RecordRow> {
  const row = await latestRow(db, studyId)
  if (row) return row
  await db('prior_records').insert({ study_id: studyId, version: 1 }).onConflict(['study_id', 'version']).ignore()
  return (await latestRow(db, studyId))!
}

/** A draft's content is assembled live; once submitted, the stored snapshot is what reviewers read and sign. */
async function contentOf(db: Db, row: RecordRow) {
  return row.status === 'draft' || !row.content ? assembleRecord(db, row.study_id, { showNames: row.show_names, version: row.version }) : row.content
}

export async function getRecord(db: Db, access: StudyAccess, version?: number) {
  const row = version ? await latestRow(db, access.studyId, version) : await ensureRecord(db, access.studyId)
  if (!row) throw new HttpError(404, 'No such record version')
  const content = await contentOf(db, row)
  const comments = await db('record_comments as c').join('users as u', 'u.id', 'c.author_id').where('c.record_id', row.id)
    .select('c.id', 'c.section', 'c.body', 'c.kind', 'c.created_at', 'u.display_name as author').orderBy('c.id')
  const people = await db('users').whereIn('id', [row.signed_off_by].filter((x): x is number => x !== null)).select('id', 'display_name')
  const versions = await db('prior_records').where({ study_id: access.studyId }).select('version', 'status', 'content_hash', 'signed_off_at').orderBy('version', 'desc')
  const charts = await db('record_charts').where({ record_id: row.id }).pluck('symbol')
  const chain = await verifyAuditChain(db)
  const history = await db('audit_events as a').leftJoin('users as u', 'u.id', 'a.actor_id').where('a.study_id', access.studyId)
    .select('a.at', 'a.action', 'a.subject', 'a.actor_id', 'u.role as actor_role', 'u.display_name as actor', 'a.hash').orderBy('a.id')
  // While the record hides the panel's names, an expert acting in the study appears by their panel code only.
  const { codes } = row.show_names ? { codes: new Map<number, string>() } : await panelCodes(db, access.studyId)
  const actorOf = (h: { actor_id: number | null; actor_role: string | null; actor: string | null }) => {
    if (h.actor_id === null) return 'system'
    if (!row.show_names && (codes.has(h.actor_id) || h.actor_role === 'expert')) return codes.get(h.actor_id) ?? 'Expert'
    return h.actor ?? 'system'
  }
  return {
    record: {
      version: row.version, status: row.status, showNames: row.show_names, rowVersion: row.row_version,
      contentHash: row.status === 'draft' ? null : row.content_hash,
      liveHash: row.status === 'draft' ? contentHash(content) : row.content_hash,
      submittedAt: row.submitted_at?.toISOString() ?? null, signedOffAt: row.signed_off_at?.toISOString() ?? null,
      signedOffBy: people.find((p) => p.id === row.signed_off_by)?.display_name ?? null, auditHead: row.audit_head, basedOn: row.based_on,
      chartsFor: charts,
    },
    content,
    comments: comments.map((c) => ({ id: c.id, section: c.section, body: c.body, kind: c.kind, author: c.author, createdAt: c.created_at.toISOString() })),
    versions: versions.map((v) => ({ version: v.version, status: v.status, contentHash: v.content_hash, signedOffAt: v.signed_off_at?.toISOString() ?? null })),
    auditChain: { intact: chain.intact, events: chain.events, brokenAt: chain.brokenAt },
    changeHistory: history.map((h) => ({ at: h.at.toISOString(), action: h.action, subject: h.subject, actor: actorOf(h), hash: h.hash })),
  }
}

async function transition(db: Db, row: RecordRow, from: RecordRow['status'][], changes: Record<string, unknown>) {
  if (!from.includes(row.status)) throw new HttpError(409, `The record is ${row.status.replace('_', ' ')}; that step is not possible now`)
  const n = await db('prior_records').where({ id: row.id, row_version: row.row_version }).update({ ...changes, row_version: row.row_version + 1, updated_at: db.fn.now() })
  if (n === 0) throw new HttpError(409, 'The record changed since you loaded it; reload')
}

export async function setShowNames(db: Db, user: User, studyId: number, showNames: boolean) {
  const row = await ensureRecord(db, studyId)
  await transition(db, row, ['draft'], { show_names: showNames })
  await recordAudit(db, { actorId: user.id, studyId, action: 'record.names', subject: `record:v${row.version}`, details: { showNames } })
}

/** draft → in review: the content is frozen into a snapshot with its SHA-256; the submit event names each chart's SHA-256. */
export async function submitRecord(db: Db, user: User, studyId: number) {
  const row = await ensureRecord(db, studyId)
  const content = await assembleRecord(db, studyId, { showNames: row.show_names, version: row.version })
  const quantities = content.quantities as { finalPrior: unknown; name: string }[]
  const missing = quantities.filter((q) => !q.finalPrior).map((q) => q.name)
  if (quantities.length === 0) throw new HttpError(400, 'The study has no quantities yet')
  if (missing.length) throw new HttpError(400, `Reconcile every quantity first: ${missing.join(', ')}`, { quantities: `Not reconciled: ${missing.join(', ')}` })
  const hash = contentHash(content)
  await db.transaction(async (trx) => {
    // The row lock waits for a chart being stored, so the charts named in the event are the ones the record keeps.
    await trx('prior_records').where({ id: row.id }).forUpdate().first('id')
    const charts = Object.fromEntries((await trx('record_charts').where({ record_id: row.id }).orderBy('symbol').select('symbol', 'png')).map((c) => [c.symbol, sha256(c.png)]))
    await transition(trx, row, ['draft'], { status: 'in_review', content: JSON.stringify(content), content_hash: hash, submitted_at: trx.fn.now(), submitted_by: user.id })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.submit', subject: `record:v${row.version}`, details: { contentHash: hash, charts } })
  })
}

/** in review → draft, with the reviewer's reasons as a comment. */
export async function returnRecord(db: Db, user: User, studyId: number, comment: string, section: string) {
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'in_review') throw new HttpError(409, 'Only a record in review can be returned')
  await db.transaction(async (trx) => {
    await trx('record_comments').insert({ record_id: row.id, section, body: comment, author_id: user.id, kind: 'return' })
    const n = await trx('prior_records').where({ id: row.id, row_version: row.row_version })
      .update({ status: 'draft', content: null, content_hash: null, row_version: row.row_version + 1, updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'The record changed since you loaded it; reload')
  })
  await recordAudit(db, { actorId: user.id, studyId, action: 'record.return', subject: `record:v${row.version}`, details: { section } })
}

export async function addComment(db: Db, user: User, studyId: number, section: string, body: string) {
  const row = await ensureRecord(db, studyId)
  if (row.status === 'signed_off') throw new HttpError(409, 'A signed-off record takes no more comments; start a new version')
  await db('record_comments').insert({ record_id: row.id, section, body, author_id: user.id })
  await recordAudit(db, { actorId: user.id, studyId, action: 'record.comment', subject: `record:v${row.version}`, details: { section } })
}

/**
 * in review → signed off, by a reviewer member only. The time is stamped and the audit chain's head recorded,
 * so the record shows the prior was fixed before any later data were seen. One transaction under the record's row
 * lock: of several simultaneous sign-offs one passes, and the others see a signed-off record and leave no event.
 */
export async function signOffRecord(db: Db, user: User, studyId: number) {
  const { id } = await ensureRecord(db, studyId)
  await db.transaction(async (trx) => {
    const row: RecordRow = await trx('prior_records').where({ id }).forUpdate().first()
    if (row.status !== 'in_review') throw new HttpError(409, 'Only a record in review can be signed off')
    if (contentHash(row.content) !== row.content_hash) throw new HttpError(409, 'The stored snapshot does not match its hash; it has been altered')
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.sign-off', subject: `record:v${row.version}`, details: { contentHash: row.content_hash } })
    const head = (await trx('audit_events').orderBy('id', 'desc').first('hash')).hash
    await transition(trx, row, ['in_review'], { status: 'signed_off', signed_off_at: trx.fn.now(), signed_off_by: user.id, audit_head: head })
  })
}

/** A signed-off version stays as it is; work continues in a new draft version. */
export async function newVersion(db: Db, user: User, studyId: number) {
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'signed_off') throw new HttpError(409, 'A new version starts from a signed-off record')
  await db('prior_records').insert({ study_id: studyId, version: row.version + 1, based_on: row.id, show_names: row.show_names })
  await recordAudit(db, { actorId: user.id, studyId, action: 'record.new-version', subject: `record:v${row.version + 1}`, details: { basedOn: row.version } })
}

/**
 * A draft's density chart for the .docx, stored by the analyst with an audit event naming its SHA-256 (the same
 * picture sent again changes nothing). Once submitted, the charts stay as they were: reviewers read what was sent.
 */
export async function saveChart(db: Db, user: User, studyId: number, symbol: string, png: Buffer) {
  const { id } = await ensureRecord(db, studyId)
  await db.transaction(async (trx) => {
    const row: RecordRow = await trx('prior_records').where({ id }).forUpdate().first()
    if (row.status === 'signed_off') throw new HttpError(409, 'A signed-off record cannot change')
    if (row.status === 'in_review') throw new HttpError(409, 'The record is in review; its charts were fixed when it was submitted. Return it to draft to change them.')
    const digest = sha256(png)
    const stored = await trx('record_charts').where({ record_id: id, symbol }).first('png')
    if (stored && sha256(stored.png) === digest) return
    await trx('record_charts').insert({ record_id: id, symbol, png }).onConflict(['record_id', 'symbol']).merge(['png', 'created_at'])
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.chart', subject: `record:v${row.version}`, details: { symbol, sha256: digest } })
  })
}

/** The content and charts an export needs, for the latest or a given version. */
export async function recordForExport(db: Db, studyId: number, version?: number) {
  const row = version ? await latestRow(db, studyId, version) : await ensureRecord(db, studyId)
  if (!row) throw new HttpError(404, 'No such record version')
  const content = await contentOf(db, row)
  const charts = await db('record_charts').where({ record_id: row.id }).select('symbol', 'png')
  const signer = row.signed_off_by ? await db('users').where({ id: row.signed_off_by }).first('display_name') : null
  return {
    content,
    meta: {
      version: row.version, status: row.status, contentHash: row.status === 'draft' ? contentHash(content) : row.content_hash,
      signedOffAt: row.signed_off_at?.toISOString() ?? null, signedOffBy: signer?.display_name ?? null, auditHead: row.audit_head,
    },
    charts: new Map(charts.map((c) => [c.symbol as string, c.png as Buffer])),
  }
}
