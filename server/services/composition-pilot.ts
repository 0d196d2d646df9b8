import { createHash } from 'node:crypto'
import type { CompositionAnalysis, CompositionDataset } from '../../shared/api/compositions'
import { compositionImpact } from '../../shared/elicitation/composition-impact'
import { extractMultinomialData, PilotDataError, type MultinomialMapping } from '../../shared/elicitation/pilot'
import type { CompositionDatasetBody } from '../../shared/schemas/compositions'
import { EngineInputError, type MultinomialData } from '../../shared/stats/index'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { compositionDirichlet, getComposition } from './compositions'
import { parseCsv } from './datasets'

function toDataset(r: Record<string, any>): CompositionDataset {
  return {
    id: r.id, compositionId: r.composition_id, version: r.version, name: r.name, filename: r.filename, mapping: r.mapping,
    rowCount: r.row_count, summary: r.summary, sha256: r.sha256, createdAt: r.created_at.toISOString(),
  }
}

export async function listCompositionDatasets(db: Db, compositionId: number): Promise<CompositionDataset[]> {
  const rows = await db('composition_datasets').where({ composition_id: compositionId }).orderBy('version', 'desc')
  return rows.map(toDataset)
}

/**
 * Stores multinomial pilot data for a composition after reading the whole file: one category per share, in the
 * composition's order (the "other" share last). A file that does not fit saves nothing and says where it fails.
 */
export async function createCompositionDataset(db: Db, user: User, compositionId: number, body: CompositionDatasetBody): Promise<CompositionDataset> {
  const composition = await getComposition(db, compositionId)
  const shareNames = [...composition.shares.map((s) => s.name), ...(composition.residual ? [composition.residualLabel] : [])]
  const given = body.layout === 'columns' ? body.categoryColumns ?? [] : body.categories ?? []
  const field = body.layout === 'columns' ? 'categoryColumns' : 'categories'
  if (given.length !== shareNames.length) {
    const message = `Give one ${body.layout === 'columns' ? 'column' : 'value'} for each of the ${shareNames.length} shares: ${shareNames.join(', ')}`
    throw new HttpError(400, message, { [field]: message })
  }
  if (new Set(given).size !== given.length) {
    const message = `Each share needs its own ${body.layout === 'columns' ? 'column' : 'value'}`
    throw new HttpError(400, message, { [field]: message })
  }
  const buffer = Buffer.from(body.csv, 'utf8')
  const { text, table, lines } = parseCsv(buffer, body.delimiter ?? ',')
  const mapping: MultinomialMapping = body.layout === 'columns'
    ? { layout: 'columns', categoryColumns: given }
    : { layout: 'rows', categoryColumn: body.categoryColumn!, categories: given }
  let extracted: { data: MultinomialData; summary: CompositionDataset['summary'] }
  try {
    extracted = extractMultinomialData(table, mapping, lines)
  } catch (err) {
    if (err instanceof PilotDataError) throw new HttpError(400, 'The file does not fit the shares', { csv: err.message }, { line: err.line, column: err.columnNumber })
    throw err
  }
  const row = await db.transaction(async (trx) => {
    await trx.raw('SELECT id FROM compositions WHERE id = ? FOR UPDATE', [compositionId])
    const [{ max }] = await trx('composition_datasets').where({ composition_id: compositionId }).max('version as max')
    const [r] = await trx('composition_datasets').insert({
      composition_id: compositionId, version: (max ?? 0) + 1, name: body.name, filename: body.filename,
      mapping: JSON.stringify({ ...mapping, delimiter: body.delimiter ?? ',' }), csv: text, sha256: createHash('sha256').update(buffer).digest('hex'),
      row_count: extracted.summary.rows, data: JSON.stringify(extracted.data), summary: JSON.stringify(extracted.summary), uploaded_by: user.id,
    }).returning('*')
    await recordAudit(trx, {
      actorId: user.id, studyId: composition.studyId, action: 'composition.dataset-upload', subject: `composition:${compositionId}`,
      details: { datasetId: r.id, version: r.version, rows: r.row_count, sha256: r.sha256 },
    })
    return r
  })
  return toDataset(row)
}

function toAnalysis(r: Record<string, any>): CompositionAnalysis {
  return {
    id: r.id, compositionId: r.composition_id, datasetId: r.dataset_id, datasetName: r.dataset_name, datasetVersion: r.dataset_version,
    result: r.result, createdAt: r.created_at.toISOString(),
  }
}

async function analysisById(db: Db, id: number): Promise<CompositionAnalysis> {
  const row = await db('composition_analyses as a').join('composition_datasets as d', 'd.id', 'a.dataset_id').where('a.id', id)
    .first('a.*', 'd.name as dataset_name', 'd.version as dataset_version')
  return toAnalysis(row)
}

/** The newest analysis of the composition, or null before any. */
export async function latestCompositionAnalysis(db: Db, compositionId: number): Promise<CompositionAnalysis | null> {
  const row = await db('composition_analyses').where({ composition_id: compositionId }).orderBy('id', 'desc').first('id')
  return row ? analysisById(db, row.id) : null
}

/** Runs the composition's Dirichlet (from its reconciled shares) on one of its datasets and keeps the result, audited. */
export async function runCompositionImpact(db: Db, user: User, compositionId: number, datasetId: number): Promise<CompositionAnalysis> {
  const dataset = await db('composition_datasets').where({ id: datasetId }).first()
  if (!dataset || dataset.composition_id !== compositionId) throw new HttpError(400, 'Choose a dataset of this composition', { datasetId: 'Choose a dataset of this composition' })
  const prior = await compositionDirichlet(db, compositionId)
  if (!prior.fit) {
    throw new HttpError(409, prior.waitingFor.length ? `Reconcile every share first; still to reconcile: ${prior.waitingFor.join(', ')}` : `No Dirichlet could be fitted: ${prior.problem}`)
  }
  let result
  try {
    result = compositionImpact(prior.shares.map((s) => s.name), prior.fit.alpha, dataset.data as MultinomialData)
  } catch (err) {
    if (err instanceof EngineInputError) throw new HttpError(400, 'The analysis cannot be run on this dataset', { datasetId: err.message })
    throw err
  }
  const studyId = (await getComposition(db, compositionId)).studyId
  const id = await db.transaction(async (trx) => {
    const [r] = await trx('composition_analyses').insert({ composition_id: compositionId, dataset_id: datasetId, result: JSON.stringify(result), created_by: user.id }).returning('id')
    await recordAudit(trx, {
      actorId: user.id, studyId, action: 'composition.impact', subject: `composition:${compositionId}`,
      details: { datasetId, alpha: prior.fit!.alpha, logEvidence: result.prior.analysis.logEvidence },
    })
    return r.id as number
  })
  return analysisById(db, id)
}
