import { createHash } from 'node:crypto'
import Papa from 'papaparse'
import type { CsvPreview, Dataset, PilotUploadFields } from '../../shared/api/datasets'
import { readCsvTable } from '../../shared/elicitation/csv'
import { extractPilotData, PILOT_MAX_BYTES, PilotDataError, type PilotMapping } from '../../shared/elicitation/pilot'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'

export function mappingFrom(f: PilotUploadFields): PilotMapping {
  switch (f.model) {
    case 'normal-known-sigma':
      return { model: 'normal-known-sigma', valueColumn: f.valueColumn!, sigma: f.sigma! }
    case 'normal':
      return { model: 'normal', valueColumn: f.valueColumn!, sigmaPrior: { family: 'half-normal', scale: f.sigmaPriorScale! } }
    case 'binomial':
      return f.binomialLayout === 'binary'
        ? { model: 'binomial', binaryColumn: f.binaryColumn! }
        : { model: 'binomial', successesColumn: f.successesColumn!, trialsColumn: f.trialsColumn! }
    default:
      return { model: 'poisson', countColumn: f.countColumn!, exposureColumn: f.exposureColumn! }
  }
}

/** Decodes and parses the CSV text; any problem becomes a 400 with a located message under `file` and its line and column. */
export function parseCsv(buffer: Buffer, delimiter: string): { text: string; table: string[][]; lines: number[] } {
  if (buffer.length === 0) throw new HttpError(400, 'The file is empty', { file: 'The file is empty.' })
  if (buffer.length > PILOT_MAX_BYTES) throw new HttpError(400, 'The file is too large', { file: 'Pilot data files may be at most 2 MB.' })
  if (buffer.includes(0)) throw new HttpError(400, 'Not a text file', { file: 'This is not a CSV text file.' })
  let text: string
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buffer).replace(/^\uFEFF/, '')
  } catch {
    throw new HttpError(400, 'Not UTF-8 text', { file: 'The file is not UTF-8 text; save it as CSV (UTF-8).' })
  }
  const { rows, lines, problem } = readCsvTable(text, delimiter)
  if (problem) throw new HttpError(400, 'The file could not be read', { file: `Line ${problem.line}: ${problem.message}.` }, { line: problem.line, column: problem.column })
  return { text, table: rows, lines }
}

/** The first rows and the columns of a file, for the mapping form. */
export function previewCsv(buffer: Buffer, delimiter: string): CsvPreview {
  const { table } = parseCsv(buffer, delimiter)
  return { columns: table[0] ?? [], rows: table.slice(1, 11), rowCount: Math.max(0, table.length - 1) }
}

function toDataset(r: Record<string, any>, withCsv = false): Dataset {
  return {
    id: r.id, studyId: r.study_id, quantityId: r.quantity_id, version: r.version, name: r.name, filename: r.filename, model: r.model,
    mapping: r.mapping, rowCount: r.row_count, data: r.data, summary: r.summary, sha256: r.sha256, createdAt: r.created_at.toISOString(),
    ...(withCsv ? { preview: (Papa.parse<string[]>(r.csv, { delimiter: r.mapping.delimiter ?? ',', skipEmptyLines: 'greedy', preview: 11 }).data) } : {}),
  }
}

/** Validates the whole file against the mapping before anything is stored: a bad file saves nothing. */
export async function createDataset(db: Db, user: User, studyId: number, fields: PilotUploadFields, file: { originalname: string; buffer: Buffer }): Promise<Dataset> {
  const quantity = await db('quantities').where({ id: fields.quantityId, study_id: studyId }).first('id')
  if (!quantity) throw new HttpError(400, 'Choose a quantity of this study', { quantityId: 'Choose a quantity of this study' })
  const { text, table, lines } = parseCsv(file.buffer, fields.delimiter)
  const mapping = mappingFrom(fields)
  let extracted
  try {
    extracted = extractPilotData(table, mapping, lines)
  } catch (err) {
    if (err instanceof PilotDataError) throw new HttpError(400, 'The file does not fit the chosen model', { file: err.message }, { line: err.line, column: err.columnNumber })
    throw err
  }
  const sha256 = createHash('sha256').update(file.buffer).digest('hex')
  const row = await db.transaction(async (trx) => {
    await trx.raw('SELECT id FROM quantities WHERE id = ? FOR UPDATE', [fields.quantityId])
    const same = await trx('pilot_datasets').where({ quantity_id: fields.quantityId, sha256 }).orderBy('version', 'desc').first('id', 'version', 'name', 'created_at')
    if (same && !fields.allowDuplicate) {
      throw new HttpError(409, `This file is the same as version ${same.version} (“${same.name}”) already stored for this quantity. Keep that version, or upload again with allowDuplicate to store it as a new version.`, undefined, {
        code: 'duplicate-file', duplicateOfId: same.id, duplicateOfVersion: same.version, duplicateOfName: same.name, duplicateOfCreatedAt: same.created_at.toISOString(),
      })
    }
    const [{ max }] = await trx('pilot_datasets').where({ quantity_id: fields.quantityId }).max('version as max')
    const [r] = await trx('pilot_datasets').insert({
      study_id: studyId, quantity_id: fields.quantityId, version: (max ?? 0) + 1, name: fields.name, filename: file.originalname,
      model: fields.model, mapping: JSON.stringify({ ...mapping, delimiter: fields.delimiter }), csv: text, sha256,
      row_count: extracted.summary.rows, data: JSON.stringify(extracted.data), summary: JSON.stringify(extracted.summary), uploaded_by: user.id,
    }).returning('*')
    await recordAudit(trx, { actorId: user.id, studyId, action: 'dataset.upload', subject: `quantity:${fields.quantityId}`, details: { datasetId: r.id, version: r.version, model: r.model, rows: r.row_count, sha256: r.sha256 } })
    return r
  })
  return toDataset(row, true)
}

export async function listDatasets(db: Db, studyId: number): Promise<Dataset[]> {
  const rows = await db('pilot_datasets').where({ study_id: studyId }).orderBy([{ column: 'quantity_id' }, { column: 'version', order: 'desc' }])
  return rows.map((r) => toDataset(r))
}

export async function getDataset(db: Db, id: number): Promise<Dataset> {
  const row = await db('pilot_datasets').where({ id }).first()
  if (!row) throw new HttpError(404, 'Dataset not found')
  return toDataset(row, true)
}
