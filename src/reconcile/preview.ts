import {
  combine, consensusNarrowerThanSpread, disagreements, fitCombination, fitConsensus, leaveOneOut, POOL_FIT_PROBS, resolveWeights, summarise,
  type Component, type LeaveOneOut, type Summary,
} from '@shared/elicitation/reconcile'
import {
  cookeClassical, EngineInputError, optimisedCutoff, quantile, toUnivariate,
  type CookeInput, type Distribution, type FitResult, type Point, type Support, type Univariate,
} from '@shared/stats'
import type { CookeScore, PoolMethod, ReconcileExpert, ReconciliationView } from '@/api/reconciliation'

/** The probabilities of the calibration answers (5 / 50 / 95 %), as the server scores them. */
export const COOKE_QUANTILES = [0.05, 0.5, 0.95]

export type WeightsMode = 'equal' | 'performance' | 'custom'

/** A consensus row as typed (cells may still be empty). */
export interface ConsensusRow {
  value: number | null
  prob: number | null
}

export interface PreviewInput {
  method: PoolMethod
  experts: ReconcileExpert[]
  excluded: number[]
  weightsMode: WeightsMode
  /** Custom weights by expert id. */
  customWeights: Record<number, number | null | undefined>
  cutoff: number
  calibration: ReconciliationView['calibration']
  consensus: ConsensusRow[]
  support: Support
}

export interface LiveCooke {
  scores: CookeScore[] | null
  /** Why performance weights cannot be computed here (no calibration data, an expert without answers, a bad cutoff). */
  problem: string | null
}

export interface Preview {
  included: ReconcileExpert[]
  /** Normalised weights aligned with `included` (empty for a consensus). */
  weights: number[]
  cooke: LiveCooke
  /** The pool, or the consensus' best fit, as a distribution to draw and summarise. */
  combination: Univariate | null
  summary: Summary | null
  /** The combination fitted to each family valid for the support, best first. */
  fits: FitResult[]
  /** The points the fits were matched to (pool quantiles at POOL_FIT_PROBS, or the consensus values). */
  fitPoints: Point[]
  leaveOneOut: LeaveOneOut[]
  disagreements: { a: string; b: string }[]
  consensusCheck: { narrow: boolean; width: number; spread: number } | null
  problems: Record<string, string>
}

export function componentsOf(experts: ReconcileExpert[]): Component[] {
  return experts.map((e) => ({ expertId: e.expertId, label: e.label, distribution: e.distribution }))
}

/**
 * Cooke's classical model for the included experts at the given cutoff, from the calibration answers the
 * server sent (the same function the server runs; it recomputes on save).
 */
export function liveCooke(calibration: ReconciliationView['calibration'], included: Pick<ReconcileExpert, 'expertId' | 'label'>[], cutoff: number): LiveCooke {
  const made = cookeInputFor(calibration, included, cutoff)
  if ('problem' in made) return { scores: null, problem: made.problem }
  try {
    const result = cookeClassical(made.input)
    return {
      scores: result.experts.map((e) => ({
        expertId: Number(e.id), calibration: e.calibration, information: e.information, weight: e.weight, normalizedWeight: e.normalizedWeight,
      })),
      problem: null,
    }
  } catch (err) {
    if (err instanceof EngineInputError) return { scores: null, problem: err.message }
    throw err
  }
}

/** The input of Cooke's model for the included experts, or why there is none yet. */
function cookeInputFor(calibration: ReconciliationView['calibration'], included: Pick<ReconcileExpert, 'expertId' | 'label'>[], cutoff: number): { input: CookeInput } | { problem: string } {
  const includedIds = included.map((e) => e.expertId)
  if (calibration.questionCount === 0) return { problem: 'No calibration question has a known true value that every included expert answered.' }
  if (includedIds.length === 0) return { problem: 'No expert is included.' }
  const byId = new Map(calibration.assessments.map((a) => [Number(a.id), a]))
  if (includedIds.some((id) => !byId.has(id))) return { problem: 'The calibration answers of an expert you included again are computed when you save.' }
  return {
    input: {
      quantiles: COOKE_QUANTILES,
      experts: included.map((e) => ({ id: String(e.expertId), label: e.label, assessments: byId.get(e.expertId)!.assessments })),
      realizations: calibration.realizations,
      cutoff,
    },
  }
}

/** The largest cutoff the cutoff field takes. */
export const MAX_CUTOFF = 0.99

/**
 * The cutoff at which the combined decision maker scores best (Cooke's optimised cutoff, `optimisedCutoff`), capped at the
 * field's 0.99; null while the scores cannot be computed.
 */
export function liveOptimisedCutoff(calibration: ReconciliationView['calibration'], included: Pick<ReconcileExpert, 'expertId' | 'label'>[]): number | null {
  const made = cookeInputFor(calibration, included, 0)
  if ('problem' in made) return null
  try {
    return Math.min(MAX_CUTOFF, optimisedCutoff(made.input).best.cutoff)
  } catch (err) {
    if (err instanceof EngineInputError) return null
    throw err
  }
}

/** Custom weights aligned with the included experts (missing ones count as 0). */
export function customWeightList(included: ReconcileExpert[], custom: Record<number, number | null | undefined>): number[] {
  return included.map((e) => {
    const w = custom[e.expertId]
    return typeof w === 'number' && Number.isFinite(w) ? w : 0
  })
}

/** Consensus rows that are complete, sorted by probability. */
export function consensusPoints(rows: ConsensusRow[]): Point[] {
  return rows
    .filter((r): r is Point => typeof r.value === 'number' && Number.isFinite(r.value) && typeof r.prob === 'number' && Number.isFinite(r.prob))
    .map((r) => ({ value: r.value, prob: r.prob }))
    .sort((a, b) => a.prob - b.prob)
}

/** The weights the preview uses for the mode chosen, or the problem that prevents them (same rules as the server). */
export function previewWeights(mode: WeightsMode, included: ReconcileExpert[], custom: Record<number, number | null | undefined>, cooke: LiveCooke): { weights: number[] | null; problem: string | null } {
  try {
    if (mode === 'equal') return { weights: resolveWeights('equal', included.length), problem: null }
    if (mode === 'performance') {
      if (!cooke.scores) return { weights: null, problem: cooke.problem ?? 'Performance weights cannot be computed.' }
      return { weights: resolveWeights('performance', included.length, cooke.scores.map((s) => s.normalizedWeight)), problem: null }
    }
    return { weights: resolveWeights('custom', included.length, customWeightList(included, custom)), problem: null }
  } catch (err) {
    if (err instanceof EngineInputError) return { weights: null, problem: err.message }
    throw err
  }
}

/** Quantiles of a combination at the fixed fitting probabilities (increasing values only), as fitCombination uses them. */
export function poolPoints(u: Univariate): Point[] {
  const points = POOL_FIT_PROBS.map((prob) => ({ value: u.quantile(prob), prob }))
  return points.filter((p, i) => i === 0 || p.value > points[i - 1].value)
}

/**
 * Everything the workspace shows for the analyst's current choices, computed in the browser with the shared
 * engine so changes appear at once. The server computes the same on save; its answer is the record.
 */
export function computePreview(input: PreviewInput): Preview {
  const included = input.experts.filter((e) => !input.excluded.includes(e.expertId))
  const components = componentsOf(included)
  const problems: Record<string, string> = {}
  const cooke = liveCooke(input.calibration, included, input.cutoff)
  const preview: Preview = {
    included, weights: [], cooke, combination: null, summary: null, fits: [], fitPoints: [], leaveOneOut: [],
    disagreements: disagreements(components), consensusCheck: null, problems,
  }
  try {
    if (input.method === 'consensus') {
      const points = consensusPoints(input.consensus)
      if (points.length < 2) throw new EngineInputError('consensus', 'Enter at least two agreed values to fit the consensus')
      preview.fits = fitConsensus(points, input.support)
      preview.fitPoints = points
      const best: Distribution = preview.fits[0].distribution
      preview.combination = toUnivariate(best)
      preview.summary = summarise(preview.combination)
      preview.consensusCheck = consensusNarrowerThanSpread(best, components)
      return preview
    }
    if (components.length === 0) throw new EngineInputError('experts', 'Include at least one expert to combine')
    const resolved = previewWeights(input.weightsMode, included, input.customWeights, cooke)
    if (!resolved.weights) throw new EngineInputError('weights', resolved.problem ?? 'The weights cannot be used')
    preview.weights = resolved.weights
    const u = combine(input.method, components, resolved.weights)
    preview.combination = u
    preview.summary = summarise(u)
    preview.fits = fitCombination(u, input.support)
    preview.fitPoints = poolPoints(u)
    preview.leaveOneOut = leaveOneOut(input.method, components, resolved.weights)
  } catch (err) {
    // A live preview must not break the page: anything else the engine throws is shown as a problem too.
    if (err instanceof EngineInputError) problems[err.field] = err.message
    else problems.combination = err instanceof Error ? err.message : 'The combination cannot be computed'
  }
  return preview
}

/** 5 / 50 / 95 % values of a distribution. */
export function implied(d: Distribution): { q05: number; q50: number; q95: number } {
  return { q05: quantile(d, 0.05), q50: quantile(d, 0.5), q95: quantile(d, 0.95) }
}
