import { createHash } from 'node:crypto'
import type { QuantityBody } from '../../shared/schemas/quantities'
import { EVIDENCE_EXTENSIONS, EVIDENCE_MAX_BYTES, EVIDENCE_TYPES, nameFitsType } from '../../shared/schemas/quantities'
import type { CalibrationQuestion } from '../../shared/api/calibration'
import type { EvidenceFile, Quantity } from '../../shared/api/quantities'
import type { Support } from '../../shared/stats/index'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { compositionsOfQuantity } from './compositions'

interface QuantityRow {
  id: number
  study_id: number
  name: string
  symbol: string
  unit: string
  question: string
  support_kind: Support['kind']
  support_lower: number | null
  support_upper: number | null
  assumptions: string
  evidence_notes: string
  position: number
  version: number
  created_at: Date
  updated_at: Date
}

/** A quantity's support from its table columns. */
export function supportFromRow(r: Pick<QuantityRow, 'support_kind' | 'support_lower' | 'support_upper'>): Support {
  return r.support_kind === 'bounded' ? { kind: 'bounded', lower: Number(r.support_lower), upper: Number(r.support_upper) } : { kind: r.support_kind }
}

export function toQuantity(r: QuantityRow, files: EvidenceFile[] = []): Quantity {
  return {
    id: r.id,
    studyId: r.study_id,
    name: r.name,
    symbol: r.symbol,
    unit: r.unit,
    question: r.question,
    support: supportFromRow(r),
    assumptions: r.assumptions,
    evidenceNotes: r.evidence_notes,
    position: r.position,
    version: r.version,
    files,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }
}

async function filesByQuantity(db: Db, quantityIds: number[]): Promise<Map<number, EvidenceFile[]>> {
  const map = new Map<number, EvidenceFile[]>()
  if (quantityIds.length === 0) return map
  const rows = await db('evidence_files').whereIn('quantity_id', quantityIds).select('id', 'quantity_id', 'filename', 'mime_type', 'size_bytes', 'created_at').orderBy('id')
  for (const r of rows) {
    const list = map.get(r.quantity_id) ?? []
    list.push({ id: r.id, filename: r.filename, mimeType: r.mime_type, sizeBytes: r.size_bytes, createdAt: r.created_at.toISOString() })
    map.set(r.quantity_id, list)
  }
  return map
}

export async function listQuantities(db: Db, studyId: number): Promise<Quantity[]> {
  const rows: QuantityRow[] = await db('quantities').where({ study_id: studyId }).orderBy(['position', 'id'])
  const files = await filesByQuantity(db, rows.map((r) => r.id))
  return rows.map((r) => toQuantity(r, files.get(r.id)))
}

export async function getQuantity(db: Db, id: number): Promise<Quantity> {
  const row: QuantityRow | undefined = await db('quantities').where({ id }).first()
  if (!row) throw new HttpError(404, 'Quantity not found')
  const files = await filesByQuantity(db, [id])
  return toQuantity(row, files.get(id))
}

function columns(body: QuantityBody) {
  const support = body.support as { kind: Support['kind']; lower?: number; upper?: number }
  return {
    name: body.name,
    symbol: body.symbol,
    unit: body.unit ?? '',
    question: body.question,
    support_kind: support.kind,
    support_lower: support.kind === 'bounded' ? support.lower : null,
    support_upper: support.kind === 'bounded' ? support.upper : null,
    assumptions: body.assumptions ?? '',
    evidence_notes: body.evidenceNotes ?? '',
  }
}

async function assertSymbolFree(db: Db, studyId: number, symbol: string, exceptId?: number) {
  const q = db('quantities').where({ study_id: studyId }).whereRaw('lower(symbol) = lower(?)', [symbol])
  if (exceptId) q.whereNot({ id: exceptId })
  if (await q.first('id')) throw new HttpError(400, 'Another quantity in this study uses this symbol', { symbol: 'Another quantity in this study uses this symbol' })
}

export async function createQuantity(db: Db, user: User, studyId: number, body: QuantityBody): Promise<Quantity> {
  await assertSymbolFree(db, studyId, body.symbol)
  const row = await db.transaction(async (trx) => {
    const [{ max }] = await trx('quantities').where({ study_id: studyId }).max('position as max')
    const [r] = await trx('quantities').insert({ ...columns(body), study_id: studyId, position: (max ?? 0) + 1 }).returning('*')
    await recordAudit(trx, { actorId: user.id, studyId, action: 'quantity.create', subject: `quantity:${r.id}`, details: { name: body.name, symbol: body.symbol, support: body.support } })
    return r
  })
  return toQuantity(row)
}

/** Wording changes once judgements exist are allowed but audited with before/after, so the record shows them. */
export async function updateQuantity(db: Db, user: User, id: number, body: QuantityBody & { version: number }): Promise<Quantity> {
  const before: QuantityRow | undefined = await db('quantities').where({ id }).first()
  if (!before) throw new HttpError(404, 'Quantity not found')
  await assertSymbolFree(db, before.study_id, body.symbol, id)
  if (before.support_kind === 'proportion' && body.support.kind !== 'proportion') {
    const wholes = await compositionsOfQuantity(db, id)
    if (wholes.length) {
      const message = `This quantity is a share of ${wholes.map((n) => `“${n}”`).join(', ')}: take it out of ${wholes.length > 1 ? 'those compositions' : 'that composition'} before changing its scale`
      throw new HttpError(400, message, { support: message })
    }
  }
  await db.transaction(async (trx) => {
    const n = await trx('quantities').where({ id, version: body.version }).update({ ...columns(body), version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this quantity since you opened it; reload to see their version')
    const changed = Object.entries(columns(body)).filter(([k, v]) => (before as unknown as Record<string, unknown>)[k] !== v).map(([k]) => k)
    await recordAudit(trx, {
      actorId: user.id, studyId: before.study_id, action: 'quantity.update', subject: `quantity:${id}`,
      details: { changed, before: { name: before.name, question: before.question, support: supportFromRow(before) }, after: { name: body.name, question: body.question, support: body.support } },
    })
  })
  return getQuantity(db, id)
}

/** Identifies the real type from the first bytes; the browser's claimed type is not trusted. */
export function sniffEvidenceType(buf: Buffer, filename: string): string | null {
  if (buf.subarray(0, 5).toString('latin1') === '%PDF-') return 'application/pdf'
  if (buf.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) return 'image/png'
  if (buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff) return 'image/jpeg'
  if (/\.csv$/i.test(filename) && !buf.includes(0) && isUtf8(buf)) return 'text/csv'
  return null
}

function isUtf8(buf: Buffer): boolean {
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(buf)
    return true
  } catch {
    return false
  }
}

export async function addEvidenceFile(db: Db, user: User, quantityId: number, file: { originalname: string; buffer: Buffer }): Promise<EvidenceFile> {
  const q = await db('quantities').where({ id: quantityId }).first('study_id')
  if (!q) throw new HttpError(404, 'Quantity not found')
  if (file.buffer.length === 0) throw new HttpError(400, 'The file is empty', { file: 'The file is empty' })
  if (file.buffer.length > EVIDENCE_MAX_BYTES) throw new HttpError(400, 'The file is larger than 5 MB', { file: 'Files may be at most 5 MB' })
  const mime = sniffEvidenceType(file.buffer, file.originalname)
  if (!mime) throw new HttpError(400, `Only ${Object.values(EVIDENCE_TYPES).join(', ')} files are accepted`, { file: 'Upload a PDF, CSV, PNG or JPEG file' })
  // The name must say what the content is, so that no program later opens a PDF as a web page because it ends in .html.
  if (!nameFitsType(file.originalname, mime)) {
    const message = `This file is a ${EVIDENCE_TYPES[mime]}; give it a name ending in ${EVIDENCE_EXTENSIONS[mime].join(' or ')}`
    throw new HttpError(400, message, { file: message })
  }
  const filename = file.originalname
  const row = await db.transaction(async (trx) => {
    const [r] = await trx('evidence_files').insert({
      quantity_id: quantityId, filename, mime_type: mime, size_bytes: file.buffer.length, content: file.buffer,
      sha256: createHash('sha256').update(file.buffer).digest('hex'), uploaded_by: user.id,
    }).returning(['id', 'filename', 'mime_type', 'size_bytes', 'created_at'])
    await recordAudit(trx, { actorId: user.id, studyId: q.study_id, action: 'evidence.upload', subject: `quantity:${quantityId}`, details: { fileId: r.id, filename, mime, bytes: file.buffer.length } })
    return r
  })
  return { id: row.id, filename: row.filename, mimeType: row.mime_type, sizeBytes: row.size_bytes, createdAt: row.created_at.toISOString() }
}

export async function getEvidenceFile(db: Db, fileId: number) {
  const row = await db('evidence_files as f').join('quantities as q', 'q.id', 'f.quantity_id').where('f.id', fileId)
    .first('f.id', 'f.filename', 'f.mime_type', 'f.content', 'f.quantity_id', 'q.study_id')
  if (!row) throw new HttpError(404, 'File not found')
  return row as { id: number; filename: string; mime_type: string; content: Buffer; quantity_id: number; study_id: number }
}

export async function deleteEvidenceFile(db: Db, user: User, fileId: number) {
  const file = await getEvidenceFile(db, fileId)
  await db.transaction(async (trx) => {
    await trx('evidence_files').where({ id: fileId }).delete()
    await recordAudit(trx, { actorId: user.id, studyId: file.study_id, action: 'evidence.delete', subject: `quantity:${file.quantity_id}`, details: { fileId, filename: file.filename } })
  })
}

export async function listCalibrationQuestions(db: Db, studyId: number, withTrueValues: boolean): Promise<CalibrationQuestion[]> {
  const rows = await db('calibration_questions').where({ study_id: studyId }).orderBy(['position', 'id'])
  return rows.map((r) => ({
    id: r.id, studyId: r.study_id, question: r.question, unit: r.unit, position: r.position, version: r.version,
    ...(withTrueValues ? { trueValue: r.true_value } : {}),
  }))
}

export async function createCalibrationQuestion(db: Db, user: User, studyId: number, body: { question: string; unit: string; trueValue: number | null }): Promise<CalibrationQuestion> {
  const row = await db.transaction(async (trx) => {
    const [{ max }] = await trx('calibration_questions').where({ study_id: studyId }).max('position as max')
    const [r] = await trx('calibration_questions').insert({ study_id: studyId, question: body.question, unit: body.unit ?? '', true_value: body.trueValue, position: (max ?? 0) + 1 }).returning('*')
    await recordAudit(trx, { actorId: user.id, studyId, action: 'calibration.create', subject: `calibration:${r.id}`, details: { question: body.question, hasTrueValue: body.trueValue !== null } })
    return r
  })
  return { id: row.id, studyId, question: row.question, unit: row.unit, trueValue: row.true_value, position: row.position, version: row.version }
}

export async function updateCalibrationQuestion(db: Db, user: User, id: number, body: { question: string; unit: string; trueValue: number | null; version: number }): Promise<CalibrationQuestion> {
  const before = await db('calibration_questions').where({ id }).first()
  if (!before) throw new HttpError(404, 'Calibration question not found')
  await db.transaction(async (trx) => {
    const n = await trx('calibration_questions').where({ id, version: body.version })
      .update({ question: body.question, unit: body.unit ?? '', true_value: body.trueValue, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this question since you opened it; reload to see their version')
    await recordAudit(trx, { actorId: user.id, studyId: before.study_id, action: 'calibration.update', subject: `calibration:${id}`, details: { trueValueBefore: before.true_value, trueValueAfter: body.trueValue, questionChanged: before.question !== body.question } })
  })
  const row = await db('calibration_questions').where({ id }).first()
  return { id: row.id, studyId: row.study_id, question: row.question, unit: row.unit, trueValue: row.true_value, position: row.position, version: row.version }
}
