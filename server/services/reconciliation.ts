import {
  combine, consensusNarrowerThanSpread, disagreements, fitCombination, fitConsensus, leaveOneOut, resolveWeights, summarise, type Component,
} from '../../shared/elicitation/reconcile'
import type {
  ReconcileExpert, ReconciliationEvaluation, ReconciliationHistoryEntry, ReconciliationSettings, ReconciliationView, SavedReconciliation,
} from '../../shared/api/reconciliation'
import { chosenFit } from '../../shared/elicitation/fits'
import { performanceWeightCautions } from '../../shared/elicitation/weights'
import type { ReconciliationBody } from '../../shared/schemas/reconciliation'
import {
  cookeClassical, EngineInputError, quantile, validateDistribution, type Distribution, type FitResult,
} from '../../shared/stats/index'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { studyExpertLabels } from './expert-labels'
import { getQuantity } from './quantities'
import { followQuantities } from './round-status'

const COOKE_QUANTILES = [0.05, 0.5, 0.95]

/** Rounds that asked this quantity and hold submitted judgements for it, newest first. */
async function roundsFor(db: Db, quantityId: number) {
  return db('rounds as r').join('round_items as i', 'i.round_id', 'r.id').where('i.quantity_id', quantityId)
    .select('r.id', 'r.number', 'r.title', 'r.status',
      db.raw(`(SELECT count(*)::int FROM judgements j WHERE j.round_id = r.id AND j.quantity_id = ? AND j.status = 'submitted') as submitted`, [quantityId]))
    .orderBy('r.number', 'desc')
}

/** Each expert's submitted fit in the round: the family they chose, else the best one. */
async function expertFits(db: Db, roundId: number, quantityId: number): Promise<ReconcileExpert[]> {
  const rows = await db('judgements as j').join('users as u', 'u.id', 'j.expert_id')
    .where({ 'j.round_id': roundId, 'j.quantity_id': quantityId, 'j.status': 'submitted' })
    .select('j.id', 'j.expert_id', 'u.display_name', 'j.fits', 'j.chosen_family', 'j.rationale', 'j.answer', 'j.method').orderBy('j.expert_id')
  // No submitted judgement (or no such round): nothing to label, and the round may not exist to name its study.
  if (rows.length === 0) return []
  const { study_id: studyId } = await db('rounds').where({ id: roundId }).first('study_id')
  const labels = await studyExpertLabels(db, studyId)
  return rows.flatMap((r) => {
    const fit = chosenFit(r.fits as (FitResult & { warnings?: string[] })[], r.chosen_family)
    if (!fit) return []
    const d = fit.distribution
    return [{
      judgementId: r.id, expertId: r.expert_id, name: r.display_name, label: labels.ofUser(r.expert_id),
      distribution: d, sse: fit.sse, method: r.method, answer: r.answer, rationale: r.rationale,
      q05: quantile(d, 0.05), q50: quantile(d, 0.5), q95: quantile(d, 0.95), warnings: fit.warnings ?? [],
    }]
  })
}

/**
 * Calibration data for Cooke's model: questions with a known answer that every listed expert answered (latest answer),
 * each expert under the study's label so that the engine's messages name them as every screen does.
 */
async function calibrationData(db: Db, studyId: number, listed: { expertId: number; label: string }[]) {
  const expertIds = listed.map((e) => e.expertId)
  const questions = await db('calibration_questions').where({ study_id: studyId }).whereNotNull('true_value').select('id', 'true_value').orderBy(['position', 'id'])
  const answers = await db('calibration_answers').whereIn('expert_id', expertIds).whereIn('question_id', questions.map((q) => q.id))
    .select('question_id', 'expert_id', 'q05', 'q50', 'q95').orderBy('updated_at')
  const latest = new Map<string, number[]>()
  for (const a of answers) latest.set(`${a.question_id}:${a.expert_id}`, [a.q05, a.q50, a.q95])
  const usable = questions.filter((q) => expertIds.every((e) => latest.has(`${q.id}:${e}`)))
  return {
    questionCount: usable.length,
    realizations: usable.map((q) => q.true_value as number),
    experts: listed.map(({ expertId, label }) => ({ id: String(expertId), label, assessments: usable.map((q) => latest.get(`${q.id}:${expertId}`)!) })),
  }
}

/** The experts a saved reconciliation's weights belong to, in the order of its weights: the round's fitted experts, minus those left out. */
export async function weightedExpertIds(db: Db, rec: { quantity_id: number; round_id: number; excluded_experts: number[] }): Promise<number[]> {
  return (await expertFits(db, rec.round_id, rec.quantity_id)).filter((e) => !rec.excluded_experts.includes(e.expertId)).map((e) => e.expertId)
}

/**
 * How many calibration questions and experts a saved reconciliation's performance weights rest on, and the cautions
 * that follow (for the record; the same rule as the reconciliation screen).
 */
export async function savedWeightCautions(db: Db, rec: { quantity_id: number; round_id: number; weights_mode: string; excluded_experts: number[] }, studyId: number): Promise<string[]> {
  if (rec.weights_mode !== 'performance') return []
  const experts = (await expertFits(db, rec.round_id, rec.quantity_id)).filter((e) => !rec.excluded_experts.includes(e.expertId))
  const cal = await calibrationData(db, studyId, experts)
  return performanceWeightCautions(cal.questionCount, experts.length)
}

function performanceScores(cal: Awaited<ReturnType<typeof calibrationData>>, cutoff: number) {
  if (cal.questionCount === 0 || cal.experts.length === 0) return null
  const result = cookeClassical({ quantiles: COOKE_QUANTILES, experts: cal.experts, realizations: cal.realizations, cutoff })
  return result.experts.map((e) => ({ expertId: Number(e.id), calibration: e.calibration, information: e.information, weight: e.weight, normalizedWeight: e.normalizedWeight }))
}

/** Everything the reconciliation screen shows for one set of settings; the server's numbers are the record's. */
async function evaluate(db: Db, quantityId: number, settings: ReconciliationSettings): Promise<ReconciliationEvaluation> {
  const quantity = await getQuantity(db, quantityId)
  const support = quantity.support
  const experts = await expertFits(db, settings.roundId, quantityId)
  const included = experts.filter((e) => !settings.excludedExperts.includes(e.expertId))
  const cal = await calibrationData(db, quantity.studyId, included)
  const performance = performanceScores(cal, settings.cutoff)
  const components: Component[] = included.map((e) => ({ expertId: e.expertId, label: e.label, distribution: e.distribution }))
  const problems: Record<string, string> = {}
  let weights: number[] = []
  let pool = null
  let fits: FitResult[] = []
  let loo: ReturnType<typeof leaveOneOut> = []
  let consensusCheck = null
  try {
    if (components.length === 0 && settings.method !== 'consensus') throw new EngineInputError('roundId', 'No submitted judgements to combine in this round')
    if (settings.method === 'consensus') {
      if (!settings.consensus) throw new EngineInputError('consensus', 'Enter the agreed values')
      fits = fitConsensus(settings.consensus.points, support)
      const best = fits[0].distribution
      pool = { q05: quantile(best, 0.05), q50: quantile(best, 0.5), q95: quantile(best, 0.95) }
      consensusCheck = consensusNarrowerThanSpread(best, components)
    } else {
      const mode = Array.isArray(settings.weights) ? 'custom' : settings.weights
      if (mode === 'performance' && !performance) throw new EngineInputError('weights', 'Performance weights need calibration questions with known answers that every included expert answered')
      const given = mode === 'performance' ? performance!.map((p) => p.normalizedWeight) : Array.isArray(settings.weights) ? settings.weights : undefined
      weights = resolveWeights(mode, components.length, given)
      const u = combine(settings.method, components, weights)
      pool = summarise(u)
      fits = fitCombination(u, support)
      loo = leaveOneOut(settings.method, components, weights)
    }
  } catch (err) {
    if (err instanceof EngineInputError) problems[err.field] = err.message
    else throw err
  }
  return {
    quantity, support, experts, included: components.map((c) => c.expertId), weights, pool, fits, leaveOneOut: loo,
    disagreements: disagreements(components), consensusCheck, problems,
    weightCautions: settings.method !== 'consensus' && settings.weights === 'performance' ? performanceWeightCautions(cal.questionCount, components.length) : [],
    calibration: { questionCount: cal.questionCount, cutoff: settings.cutoff, scores: performance, realizations: cal.realizations, assessments: cal.experts.map(({ id, assessments }) => ({ id, assessments })) },
  }
}

function toSaved(r: Record<string, any> | undefined): SavedReconciliation | null {
  if (!r) return null
  return {
    id: r.id, roundId: r.round_id, method: r.method, weightsMode: r.weights_mode, weights: r.weights, weightsReason: r.weights_reason, cutoff: r.cutoff,
    excludedExperts: r.excluded_experts, consensus: r.consensus, family: r.family, distribution: r.distribution, fits: r.fits, summary: r.summary,
    adjusted: r.adjusted, adjustReason: r.adjust_reason, rationale: r.rationale, status: r.status,
    reconciledAt: r.reconciled_at ? r.reconciled_at.toISOString() : null, version: r.version, updatedAt: r.updated_at.toISOString(),
  }
}

/** The reconciliation workspace: rounds, experts' fits, calibration scores, the saved choice and its computed consequences. */
export async function getReconciliation(db: Db, quantityId: number, query: { roundId?: number; cutoff?: number }): Promise<ReconciliationView> {
  const saved = await db('reconciliations').where({ quantity_id: quantityId }).first()
  const rounds = await roundsFor(db, quantityId)
  const roundId = query.roundId ?? saved?.round_id ?? rounds.find((r) => r.submitted > 0)?.id ?? rounds[0]?.id
  if (!roundId) throw new HttpError(409, 'No round has asked about this quantity yet')
  if (!rounds.some((r) => r.id === roundId)) throw new HttpError(404, 'That round did not ask about this quantity')
  const settings: ReconciliationSettings = saved && saved.round_id === roundId
    ? { roundId, method: saved.method, weights: saved.weights_mode === 'custom' ? saved.weights : saved.weights_mode, cutoff: query.cutoff ?? saved.cutoff, excludedExperts: saved.excluded_experts, consensus: saved.consensus }
    : { roundId, method: 'linear', weights: 'equal', cutoff: query.cutoff ?? 0, excludedExperts: [] }
  const view = await evaluate(db, quantityId, settings)
  const history: ReconciliationHistoryEntry[] = saved
    ? (await db('reconciliation_versions as v').join('users as u', 'u.id', 'v.saved_by').where('v.reconciliation_id', saved.id)
      .select('v.version', 'v.saved_at', 'u.display_name as saved_by', db.raw(`v.snapshot->>'status' as status`), db.raw(`v.snapshot->>'method' as method`), db.raw(`v.snapshot->>'family' as family`)).orderBy('v.version', 'desc'))
      .map((h) => ({ version: h.version, savedAt: h.saved_at.toISOString(), savedBy: h.saved_by, status: h.status, method: h.method, family: h.family }))
    : []
  return { rounds: rounds.map((r) => ({ id: r.id, number: r.number, title: r.title, status: r.status, submitted: r.submitted })), roundId, settings, ...view, saved: toSaved(saved), history }
}

/** Saves the analyst's choice (optimistic lock); marking it reconciled needs a family and a rationale. */
export async function saveReconciliation(db: Db, user: User, quantityId: number, body: ReconciliationBody): Promise<ReconciliationView> {
  const settings: ReconciliationSettings = {
    roundId: body.roundId, method: body.method as ReconciliationSettings['method'], weights: body.weights as ReconciliationSettings['weights'], cutoff: body.cutoff,
    excludedExperts: body.excludedExperts, consensus: body.method === 'consensus' ? body.consensus as ReconciliationSettings['consensus'] : null,
  }
  const rounds = await roundsFor(db, quantityId)
  if (!rounds.some((r) => r.id === body.roundId)) throw new HttpError(400, 'That round did not ask about this quantity', { roundId: 'Choose a round that asked this quantity' })
  const view = await evaluate(db, quantityId, settings)
  if (Object.keys(view.problems).length) throw new HttpError(400, 'The combination cannot be computed', view.problems)
  const fields: Record<string, string> = {}
  let distribution: Distribution | null = null
  if (body.distribution) {
    try {
      validateDistribution(body.distribution as unknown as Distribution)
      distribution = body.distribution as unknown as Distribution
      if (body.family && distribution.family !== body.family) fields.distribution = 'The adjusted parameters belong to another family'
    } catch (err) {
      if (err instanceof EngineInputError) fields[`distribution.${err.field}`] = err.message
      else throw err
    }
  } else if (body.family) {
    const fit = view.fits.find((f) => f.distribution.family === body.family)
    if (!fit) fields.family = 'This family was not fitted to the combination'
    else distribution = fit.distribution
  }
  // The schema asks a reconciled prior for a family (or adjusted parameters) and a reason; a family that was not fitted
  // or parameters that are not valid have their field error above, so a reconciled save here always has its distribution.
  if (Object.keys(fields).length) throw new HttpError(400, 'Some fields need attention', fields)

  const row = {
    round_id: body.roundId, method: body.method, weights_mode: Array.isArray(body.weights) ? 'custom' : body.weights,
    weights: JSON.stringify(view.weights), weights_reason: body.weightsReason ?? '', cutoff: body.cutoff, excluded_experts: JSON.stringify(body.excludedExperts),
    consensus: settings.consensus ? JSON.stringify(settings.consensus) : null, family: distribution?.family ?? body.family ?? null,
    distribution: distribution ? JSON.stringify(distribution) : null, fits: JSON.stringify(view.fits), summary: view.pool ? JSON.stringify(view.pool) : null,
    adjusted: !!body.distribution, adjust_reason: body.distribution ? body.adjustReason : '', rationale: body.rationale,
    status: body.reconciled ? 'reconciled' : 'draft', reconciled_at: body.reconciled ? new Date() : null, reconciled_by: body.reconciled ? user.id : null,
  }
  const studyId = view.quantity.studyId
  const saved = await db.transaction(async (trx) => {
    const existing = await trx('reconciliations').where({ quantity_id: quantityId }).forUpdate().first()
    let r
    if (!existing) {
      if (body.version !== 0) throw new HttpError(409, 'This reconciliation was never saved; reload')
      ;[r] = await trx('reconciliations').insert({ ...row, quantity_id: quantityId, version: 1 }).returning('*')
    } else {
      if (existing.version !== body.version) throw new HttpError(409, 'Another analyst saved this reconciliation since you opened it; reload to see their choice')
      ;[r] = await trx('reconciliations').where({ id: existing.id }).update({ ...row, version: existing.version + 1, updated_at: trx.fn.now() }).returning('*')
    }
    await trx('reconciliation_versions').insert({ reconciliation_id: r.id, version: r.version, snapshot: JSON.stringify({ ...row, weights: view.weights }), saved_by: user.id })
    await recordAudit(trx, {
      actorId: user.id, studyId, action: body.reconciled ? 'reconciliation.reconciled' : 'reconciliation.save', subject: `quantity:${quantityId}`,
      details: { method: body.method, weights: row.weights_mode, family: row.family, adjusted: row.adjusted, version: r.version },
    })
    await followQuantities(trx, user.id, { quantityId })
    return r
  })
  return getReconciliation(db, quantityId, { roundId: saved.round_id })
}
