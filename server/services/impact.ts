import { createHash } from 'node:crypto'
import type { ImpactNotRun, ImpactResult } from '../../shared/api/impact'
import { chosenFit } from '../../shared/elicitation/fits'
import { dataSize, mixtureLabel, SWEEP_FACTORS, type CandidateInput, type DecisionRule } from '../../shared/elicitation/impact'
import { combine, fitCombination, fitConsensus, resolveWeights } from '../../shared/elicitation/reconcile'
import { ENGINE_VERSION, EngineInputError, validateDistribution, type Distribution, type FitResult, type PilotData } from '../../shared/stats/index'
import { impactSteps } from '../compute/tasks'
import type { AnalysisQueue } from '../compute/analysis-queue'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { canonicalJson, recordAudit } from './audit'
import { getDataset } from './datasets'
import { studyExpertLabels } from './expert-labels'
import type { Quantity } from '../../shared/api/quantities'
import { getQuantity } from './quantities'
import { analysisOf, type ImpactJobTask, type StoredImpactJob } from './impact-jobs'

export interface ImpactInput {
  datasetId: number
  comparison: Record<string, unknown>
  mixtureWeight?: number | null
  mixtureWide?: Record<string, unknown> | null
  decision?: DecisionRule | null
  factors?: number[]
  excludedExperts?: number[]
  /** Training fraction b of the fractional Bayes factors; null or absent: m₀/n. */
  trainingFraction?: number | null
}

function checkedDistribution(d: unknown, field: string): Distribution {
  try {
    validateDistribution(d as Distribution, field)
    return d as Distribution
  } catch (err) {
    if (err instanceof EngineInputError) throw new HttpError(400, 'The distribution is not valid', { [field]: err.message })
    throw err
  }
}

/** Candidate priors for a quantity: each expert's fit, the pool, the consensus, the reconciled choice, the comparison prior. */
async function candidatesFor(db: Db, quantity: Quantity, input: ImpactInput): Promise<{ list: CandidateInput[]; reconciled: Distribution | null; excluded: { expertId: number; label: string }[] }> {
  const { id: quantityId, support } = quantity
  const rec = await db('reconciliations').where({ quantity_id: quantityId }).first()
  const list: CandidateInput[] = []
  const roundId = rec?.round_id ?? (await db('judgements').where({ quantity_id: quantityId, status: 'submitted' }).max('round_id as r'))[0]?.r
  const experts: Distribution[] = []
  const excluded: { expertId: number; label: string }[] = []
  const leftOut = new Set(input.excludedExperts ?? [])
  if (roundId) {
    const rows = await db('judgements').where({ round_id: roundId, quantity_id: quantityId, status: 'submitted' }).orderBy('expert_id').select('expert_id', 'fits', 'chosen_family')
    const labels = await studyExpertLabels(db, quantity.studyId)
    rows.forEach((r, i) => {
      const label = labels.ofUser(r.expert_id)
      if (leftOut.has(r.expert_id)) {
        excluded.push({ expertId: r.expert_id, label })
        return
      }
      const fit = chosenFit(r.fits as FitResult[], r.chosen_family)
      if (!fit) return
      experts.push(fit.distribution)
      list.push({ key: `expert-${i + 1}`, label, kind: 'expert', prior: fit.distribution })
    })
  }
  if (experts.length > 1) {
    const pool = combine('linear', experts.map((d, i) => ({ expertId: i, label: '', distribution: d })), resolveWeights('equal', experts.length))
    const [best] = fitCombination(pool, support)
    list.push({ key: 'pooled', label: 'Pooled (linear, equal weights)', kind: 'pooled', prior: best.distribution })
  }
  if (rec?.consensus) {
    const [best] = fitConsensus(rec.consensus.points, support)
    list.push({ key: 'consensus', label: 'Agreed consensus', kind: 'consensus', prior: best.distribution })
  }
  const reconciled: Distribution | null = rec?.distribution ?? null
  if (reconciled) list.push({ key: 'reconciled', label: rec.status === 'reconciled' ? 'Reconciled prior' : 'Reconciled prior (draft)', kind: 'reconciled', prior: reconciled })
  list.push({ key: 'comparison', label: 'Comparison prior', kind: 'comparison', prior: checkedDistribution(input.comparison, 'comparison') })
  if (input.mixtureWeight && reconciled) {
    const wide = checkedDistribution(input.mixtureWide, 'mixtureWide')
    const w = input.mixtureWeight
    list.push({
      key: 'mixture', label: mixtureLabel(w), kind: 'mixture', prior: reconciled,
      mixture: { components: [reconciled, wide], weights: [1 - w, w] },
    })
  }
  return { list, reconciled, excluded }
}

/** SHA-256 of a prior's canonical JSON: how an analysis, a recorded reason and the record find the same final prior. */
export const priorHash = (prior: Distribution) => createHash('sha256').update(canonicalJson(prior)).digest('hex')

/**
 * Prepares an impact analysis of every candidate prior on one pilot dataset and puts it on the queue; answers with the
 * job. The inputs are checked here, so a bad request is refused at once with field errors. When the same inputs were
 * analysed before, the job is born done with that analysis (`cached`); otherwise a worker computes it (impact-jobs.ts).
 */
export async function submitImpact(db: Db, queue: AnalysisQueue, user: User, quantityId: number, input: ImpactInput): Promise<{ job: StoredImpactJob; queued: boolean }> {
  const dataset = await getDataset(db, input.datasetId)
  const quantity = await getQuantity(db, quantityId)
  // Another study's dataset is answered as if it did not exist: its id says nothing about that study.
  if (dataset.studyId !== quantity.studyId) throw new HttpError(404, 'Dataset not found')
  if (dataset.quantityId !== quantityId) throw new HttpError(400, 'This dataset belongs to another quantity', { datasetId: 'Choose a dataset of this quantity' })
  const support = quantity.support
  const { list, reconciled, excluded } = await candidatesFor(db, quantity, input)
  const data = dataset.data as PilotData
  const factors = input.factors ?? SWEEP_FACTORS
  // Everything the numbers depend on: the data, every candidate prior (the final one included), the options and the engine.
  const hashInput = { datasetSha: dataset.sha256, datasetId: dataset.id, datasetVersion: dataset.version, candidates: list, decision: input.decision ?? null, factors, trainingFraction: input.trainingFraction ?? null, support, engine: ENGINE_VERSION }
  const inputHash = createHash('sha256').update(canonicalJson(hashInput)).digest('hex')
  const row = { quantity_id: quantityId, dataset_id: dataset.id, input_hash: inputHash, input: JSON.stringify(input), created_by: user.id }

  const cached = await db('impact_analyses').where({ quantity_id: quantityId, input_hash: inputHash }).orderBy('id', 'desc').first('id')
  if (cached) {
    const [job] = await db('impact_jobs').insert({ ...row, state: 'done', analysis_id: cached.id, started_at: db.fn.now(), finished_at: db.fn.now() }).returning('*')
    return { job: job as StoredImpactJob, queued: false }
  }

  const n = dataSize(data)
  const task: ImpactJobTask = {
    compute: { candidates: list, data, decision: input.decision ?? null, reconciled, support, factors, trainingFraction: input.trainingFraction ?? null, n },
    studyId: quantity.studyId,
    priorHash: reconciled ? priorHash(reconciled) : null,
    resultBase: {
      quantityId, datasetId: dataset.id, dataset: { name: dataset.name, version: dataset.version, model: dataset.model, summary: dataset.summary },
      n, decision: input.decision ?? null, excludedExperts: excluded,
    },
  }
  // The job row and its queue entry commit together: no job waits without a queue entry, and none is handed out unknown.
  const job = await db.transaction(async (trx) => {
    const [stored] = await trx('impact_jobs').insert({ ...row, task: JSON.stringify(task), progress_total: impactSteps(task.compute) }).returning('*')
    await queue.enqueue(trx, stored.id)
    return stored as StoredImpactJob
  })
  queue.queued()
  return { job, queued: true }
}

/** The newest analysis of a quantity, for the record and for reopening the page. */
export async function latestImpact(db: Db, quantityId: number): Promise<ImpactResult | null> {
  const row = await db('impact_analyses').where({ quantity_id: quantityId }).orderBy('id', 'desc').first()
  return row ? analysisOf(row, true) : null
}

/** The analyst's reason for stating the final prior without an impact analysis; it holds for this prior only. */
export async function recordImpactNotRun(db: Db, user: User, quantityId: number, reason: string): Promise<ImpactNotRun> {
  const quantity = await getQuantity(db, quantityId)
  const rec = await db('reconciliations').where({ quantity_id: quantityId }).first('status', 'distribution')
  if (rec?.status !== 'reconciled' || !rec.distribution) throw new HttpError(409, 'Reconcile the quantity first: the reason is recorded for its final prior')
  const hash = priorHash(rec.distribution)
  await db.transaction(async (trx) => {
    await trx('impact_not_run').insert({ quantity_id: quantityId, prior_hash: hash, reason, created_by: user.id })
      .onConflict(['quantity_id', 'prior_hash']).merge(['reason', 'created_by', 'created_at'])
    await recordAudit(trx, { actorId: user.id, studyId: quantity.studyId, action: 'impact.not-run', subject: `quantity:${quantityId}`, details: { priorHash: hash } })
  })
  return { quantityId, priorHash: hash, reason }
}
