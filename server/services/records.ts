import { createHash } from 'node:crypto'
import type { Knex } from 'knex'
import type { RecordContent, RecordExportMeta, RecordStatus, RecordView } from '../../shared/api/records'
import { actionLabel, subjectLabel, type SubjectNames } from '../../shared/record/format'
import type { RecordSubmitBody } from '../../shared/schemas/records'
import type { User } from '../../shared/types/index'
import type { AppContext } from '../context'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { queueMail } from '../mail/outbox'
import { recordReturnedMessage, recordSignedOffMessage, recordSubmittedMessage, type MailContent } from '../mail/templates'
import type { StudyAccess } from './access'
import { auditHead, canonicalJson, recordAudit, verifyAuditChain } from './audit'
import { studyExpertLabels } from './expert-labels'
import { assembleRecord } from './record-content'

/** What the record's e-mails need besides the database: the mail queue, the public address, the time zone of dates. */
export type RecordContext = AppContext & { timeZone: string }

const sha256 = (data: string | Buffer) => createHash('sha256').update(data).digest('hex')
export const contentHash = (content: unknown) => sha256(canonicalJson(content))

interface RecordRow {
  id: number
  study_id: number
  version: number
  status: RecordStatus
  show_names: boolean
  content: RecordContent | null
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
async function contentOf(db: Db, row: RecordRow): Promise<RecordContent> {
  return row.status === 'draft' || !row.content ? assembleRecord(db, row.study_id, { showNames: row.show_names, version: row.version }) : row.content
}

export async function getRecord(db: Db, access: StudyAccess, version?: number): Promise<RecordView> {
  const row = version ? await latestRow(db, access.studyId, version) : await ensureRecord(db, access.studyId)
  if (!row) throw new HttpError(404, 'No such record version')
  const content = await contentOf(db, row)
  const comments = await db('record_comments as c').join('users as u', 'u.id', 'c.author_id').where('c.record_id', row.id)
    .select('c.id', 'c.section', 'c.body', 'c.kind', 'c.reply_to', 'c.outcome', 'c.created_at', 'u.display_name as author').orderBy('c.id')
  const open = openReturnComments(comments)
  const signer = row.signed_off_by ? await db('users').where({ id: row.signed_off_by }).first('display_name') : null
  const versions = await db('prior_records').where({ study_id: access.studyId }).select('version', 'status', 'content_hash', 'signed_off_at').orderBy('version', 'desc')
  const charts = await db('record_charts').where({ record_id: row.id }).pluck('symbol')
  const chain = await verifyAuditChain(db, access.studyId)
  const history = await db('audit_events as a').leftJoin('users as u', 'u.id', 'a.actor_id').where('a.study_id', access.studyId)
    .select('a.at', 'a.action', 'a.subject', 'a.actor_id', 'u.display_name as actor', 'a.hash').orderBy('a.id')
  const people = await historyNames(db, access.studyId, row.show_names)
  const quantityIds = await db('quantities').where({ study_id: access.studyId }).select('id', 'symbol')
  return {
    record: {
      version: row.version, status: row.status, showNames: row.show_names, rowVersion: row.row_version,
      returned: row.status === 'draft' && open.length > 0,
      openComments: row.status === 'draft' ? open.map((c) => c.id as number) : [],
      contentHash: row.status === 'draft' ? null : row.content_hash,
      liveHash: row.status === 'draft' || !row.content_hash ? contentHash(content) : row.content_hash,
      submittedAt: row.submitted_at?.toISOString() ?? null, signedOffAt: row.signed_off_at?.toISOString() ?? null,
      signedOffBy: signer?.display_name ?? null, auditHead: row.audit_head, basedOn: row.based_on,
      chartsFor: charts,
    },
    content,
    /** The study's quantities by symbol, for leaving one out (the content itself names no database ids). */
    quantityIds: Object.fromEntries(quantityIds.map((q) => [q.symbol, q.id])),
    comments: comments.map((c) => ({
      id: c.id, section: c.section, body: c.body, kind: c.kind, replyTo: c.reply_to, outcome: c.outcome, author: c.author, createdAt: c.created_at.toISOString(),
    })),
    versions: versions.map((v) => ({ version: v.version, status: v.status, contentHash: v.content_hash, signedOffAt: v.signed_off_at?.toISOString() ?? null })),
    auditChain: { intact: chain.intact, events: chain.events, brokenAt: chain.brokenAt },
    changeHistory: history.map((h) => ({
      at: h.at.toISOString(), action: h.action, what: actionLabel(h.action), subject: h.subject, subjectText: subjectLabel(h.subject, people.names),
      actor: h.actor_id ? people.actor(h.actor_id, h.actor) : 'system', hash: h.hash,
    })),
  }
}

/**
 * Names for the change history: the study's quantities, rounds and calibration questions by id, and people, where
 * an expert of the study appears under their label unless the record shows names.
 */
async function historyNames(db: Db, studyId: number, showNames: boolean) {
  const labels = await studyExpertLabels(db, studyId)
  const experts = new Set<number>(await db('round_panel as p').join('rounds as r', 'r.id', 'p.round_id').where('r.study_id', studyId).whereNotNull('p.user_id').pluck('p.user_id'))
  const byId = (rows: { id: number; name: string }[]) => Object.fromEntries(rows.map((r) => [r.id, r.name]))
  const actor = (id: number, name: string) => (experts.has(id) && !showNames ? labels.ofUser(id) : name)
  const users = await db('users as u').whereIn('u.id', db('study_members').where({ study_id: studyId }).select('user_id')).select('u.id', 'u.display_name as name')
  const names: SubjectNames = {
    quantities: byId(await db('quantities').where({ study_id: studyId }).select('id', 'name')),
    rounds: byId(await db('rounds').where({ study_id: studyId }).select('id', db.raw(`'round ' || number || ': ' || title as name`))),
    calibration: byId(await db('calibration_questions').where({ study_id: studyId }).select('id', 'question as name')),
    users: Object.fromEntries(users.map((u) => [u.id, actor(u.id, u.name)])),
  }
  return { names, actor }
}

async function transition(db: Db | Knex.Transaction, row: RecordRow, from: RecordRow['status'][], changes: Record<string, unknown>) {
  if (!from.includes(row.status)) throw new HttpError(409, `The record is ${row.status.replace('_', ' ')}; that step is not possible now`)
  const n = await db('prior_records').where({ id: row.id, row_version: row.row_version }).update({ ...changes, row_version: row.row_version + 1, updated_at: db.fn.now() })
  if (n === 0) throw new HttpError(409, 'The record changed since you loaded it; reload')
}

export async function setShowNames(db: Db, user: User, studyId: number, showNames: boolean) {
  const row = await ensureRecord(db, studyId)
  await db.transaction(async (trx) => {
    await transition(trx, row, ['draft'], { show_names: showNames })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.names', subject: `record:v${row.version}`, details: { showNames } })
  })
}

/** Return comments the analyst has not answered yet (each is answered once, when the record is submitted again). */
function openReturnComments<C extends { id: number; kind: string; reply_to: number | null }>(comments: C[]): C[] {
  const answered = new Set(comments.filter((c) => c.kind === 'response').map((c) => c.reply_to))
  return comments.filter((c) => c.kind === 'return' && !answered.has(c.id))
}

/** The study's members in a role, with an address to write to. */
async function membersInRole(db: Db | Knex.Transaction, studyId: number, role: 'analyst' | 'reviewer') {
  return db('study_members as m').join('users as u', 'u.id', 'm.user_id').where({ 'm.study_id': studyId, 'm.study_role': role, 'u.disabled': false })
    .select('u.id', 'u.email', 'u.display_name').orderBy('u.id')
}

/** Queues one message per member in the role, inside the caller's transaction; returns the outbox ids to kick after commit. */
async function mailMembers(trx: Knex.Transaction, studyId: number, role: 'analyst' | 'reviewer', kind: string, build: (name: string) => MailContent) {
  const ids: number[] = []
  for (const m of await membersInRole(trx, studyId, role)) {
    ids.push(await queueMail(trx, { to: m.email, toName: m.display_name, ...build(m.display_name), kind, studyId }))
  }
  return ids
}

async function recordMailFacts(trx: Knex.Transaction, ctx: RecordContext, studyId: number, row: RecordRow, actor: User) {
  const study = await trx('studies').where({ id: studyId }).first('title')
  return { studyTitle: study.title as string, studyId, version: row.version, actorName: actor.displayName, at: new Date(), publicUrl: ctx.publicUrl, timeZone: ctx.timeZone }
}

/** A quantity left out of the record, with the reason the record states (analysts, while the current version is a draft). */
export async function excludeQuantity(db: Db, user: User, studyId: number, quantityId: number, reason: string) {
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'draft') throw new HttpError(409, 'The record is not a draft; quantities are left out or put back in a draft')
  const q = await db('quantities').where({ id: quantityId, study_id: studyId }).first('id', 'name')
  if (!q) throw new HttpError(400, 'No such quantity in this study', { quantityId: 'Choose a quantity of this study' })
  await db.transaction(async (trx) => {
    await trx('record_exclusions').insert({ quantity_id: quantityId, reason, excluded_by: user.id }).onConflict('quantity_id').merge(['reason', 'excluded_by', 'created_at'])
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.leave-out', subject: `quantity:${quantityId}`, details: { quantity: q.name, reason } })
  })
}

/** Puts a left-out quantity back into the record. */
export async function includeQuantity(db: Db, user: User, studyId: number, quantityId: number) {
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'draft') throw new HttpError(409, 'The record is not a draft; quantities are left out or put back in a draft')
  const q = await db('quantities as q').join('record_exclusions as x', 'x.quantity_id', 'q.id').where({ 'q.id': quantityId, 'q.study_id': studyId }).first('q.name')
  if (!q) throw new HttpError(404, 'That quantity is not left out of the record')
  await db.transaction(async (trx) => {
    await trx('record_exclusions').where({ quantity_id: quantityId }).delete()
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.put-back', subject: `quantity:${quantityId}`, details: { quantity: q.name } })
  })
}

/**
 * draft → in review: the content is frozen into a snapshot with its SHA-256. A returned record needs an answer to each
 * comment it was returned with; every quantity is reconciled or left out with a reason. The study's reviewers are told.
 */
export async function submitRecord(ctx: RecordContext, user: User, studyId: number, body: RecordSubmitBody) {
  const { db } = ctx
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'draft') throw new HttpError(409, `The record is ${row.status.replace('_', ' ')}; that step is not possible now`)
  const content = await assembleRecord(db, studyId, { showNames: row.show_names, version: row.version })
  const quantities = content.quantities
  const included = quantities.filter((q) => !q.leftOut)
  const missing = included.filter((q) => !q.finalPrior).map((q) => q.name)
  if (quantities.length === 0) throw new HttpError(400, 'The study has no quantities yet')
  if (included.length === 0) throw new HttpError(400, 'Every quantity is left out; a record needs at least one final prior', { quantities: 'Put at least one quantity back into the record' })
  if (missing.length) {
    throw new HttpError(400, `Reconcile each quantity or leave it out with a reason: ${missing.join(', ')}`, { quantities: `Not reconciled and not left out: ${missing.join(', ')}` })
  }
  const unanalysed = included.filter((q) => !q.impact && !q.impactNotRunReason).map((q) => q.name)
  if (unanalysed.length) {
    throw new HttpError(400, `No impact analysis of the final prior: ${unanalysed.join(', ')}`, {
      impact: `Run an impact analysis of the final prior, or record why none was run: ${unanalysed.join(', ')}`,
    })
  }
  const comments = await db('record_comments').where({ record_id: row.id }).select('id', 'kind', 'reply_to')
  const open = openReturnComments(comments)
  const answers = new Map(body.responses.map((r) => [r.commentId, r]))
  const fields: Record<string, string> = {}
  for (const c of open) if (!answers.has(c.id)) fields[`responses.${c.id}`] = 'Answer this comment: say what you changed, or why nothing changed'
  for (const id of answers.keys()) if (!open.some((c) => c.id === id)) fields[`responses.${id}`] = 'Not a comment of this record waiting for an answer'
  if (Object.keys(fields).length) throw new HttpError(400, 'Answer each comment the record was returned with before submitting it again', fields)

  const hash = contentHash(content)
  const outboxIds = await db.transaction(async (trx) => {
    // The row lock waits for a chart being stored, so the charts named in the event are the ones the record keeps.
    await trx('prior_records').where({ id: row.id }).forUpdate().first('id')
    const charts = Object.fromEntries((await trx('record_charts').where({ record_id: row.id }).orderBy('symbol').select('symbol', 'png')).map((c) => [c.symbol, sha256(c.png)]))
    for (const c of open) {
      const a = answers.get(c.id)!
      await trx('record_comments').insert({ record_id: row.id, section: 'Response', body: a.reply, author_id: user.id, kind: 'response', reply_to: c.id, outcome: a.outcome })
    }
    await transition(trx, row, ['draft'], { status: 'in_review', content: JSON.stringify(content), content_hash: hash, submitted_at: trx.fn.now(), submitted_by: user.id })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.submit', subject: `record:v${row.version}`, details: { contentHash: hash, answeredComments: open.map((c) => c.id), charts } })
    const facts = await recordMailFacts(trx, ctx, studyId, row, user)
    return mailMembers(trx, studyId, 'reviewer', 'record-submitted', (name) => recordSubmittedMessage({ ...facts, recipientName: name }))
  })
  await ctx.kickMail(outboxIds)
}

/** in review → draft, with the reviewer's reasons as a comment; the study's analysts are told. */
export async function returnRecord(ctx: RecordContext, user: User, studyId: number, comment: string, section: string) {
  const { db } = ctx
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'in_review') throw new HttpError(409, 'Only a record in review can be returned')
  const outboxIds = await db.transaction(async (trx) => {
    await trx('record_comments').insert({ record_id: row.id, section, body: comment, author_id: user.id, kind: 'return' })
    await transition(trx, row, ['in_review'], { status: 'draft', content: null, content_hash: null })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.return', subject: `record:v${row.version}`, details: { section } })
    const facts = await recordMailFacts(trx, ctx, studyId, row, user)
    return mailMembers(trx, studyId, 'analyst', 'record-returned', (name) => recordReturnedMessage({ ...facts, recipientName: name, comment, section }))
  })
  await ctx.kickMail(outboxIds)
}

export async function addComment(db: Db, user: User, studyId: number, section: string, body: string) {
  const row = await ensureRecord(db, studyId)
  if (row.status === 'signed_off') throw new HttpError(409, 'A signed-off record takes no more comments; start a new version')
  await db.transaction(async (trx) => {
    await trx('record_comments').insert({ record_id: row.id, section, body, author_id: user.id })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.comment', subject: `record:v${row.version}`, details: { section } })
  })
}

/**
 * in review → signed off, by a reviewer member only. The time is stamped and the audit chain's head recorded,
 * so the record shows the prior was fixed before any later data were seen. One transaction under the record's row
 * lock: of several simultaneous sign-offs one passes, and the others see a signed-off record and leave no event.
 */
export async function signOffRecord(ctx: RecordContext, user: User, studyId: number) {
  const { db } = ctx
  const { id } = await ensureRecord(db, studyId)
  const outboxIds = await db.transaction(async (trx) => {
    const row: RecordRow = await trx('prior_records').where({ id }).forUpdate().first()
    if (row.status !== 'in_review') throw new HttpError(409, 'Only a record in review can be signed off')
    if (contentHash(row.content) !== row.content_hash) throw new HttpError(409, 'The stored snapshot does not match its hash; it has been altered')
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.sign-off', subject: `record:v${row.version}`, details: { contentHash: row.content_hash } })
    await transition(trx, row, ['in_review'], { status: 'signed_off', signed_off_at: trx.fn.now(), signed_off_by: user.id, audit_head: await auditHead(trx, studyId) })
    const facts = await recordMailFacts(trx, ctx, studyId, row, user)
    return mailMembers(trx, studyId, 'analyst', 'record-signed-off', (name) => recordSignedOffMessage({ ...facts, recipientName: name }))
  })
  await ctx.kickMail(outboxIds)
}

/** A signed-off version stays as it is; work continues in a new draft version. */
export async function newVersion(db: Db, user: User, studyId: number) {
  const row = await ensureRecord(db, studyId)
  if (row.status !== 'signed_off') throw new HttpError(409, 'A new version starts from a signed-off record')
  await db.transaction(async (trx) => {
    await trx('prior_records').insert({ study_id: studyId, version: row.version + 1, based_on: row.id, show_names: row.show_names })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'record.new-version', subject: `record:v${row.version + 1}`, details: { basedOn: row.version } })
  })
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
export async function recordForExport(db: Db, studyId: number, version?: number): Promise<{ content: RecordContent; meta: RecordExportMeta; charts: Map<string, Buffer> }> {
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
