import type { ImpactComputation } from '../../shared/api/impact'
import { candidateSteps, evaluateCandidates, findings, sweepOf, sweepSteps, type CandidateInput, type DecisionRule } from '../../shared/elicitation/impact'
import { tippingPoint, type TippingPoint } from '../../shared/elicitation/tipping'
import { sampleJoint, type Distribution, type PilotData, type PriorDistribution, type Support } from '../../shared/stats/index'

export interface ImpactTask {
  candidates: CandidateInput[]
  data: PilotData
  decision: DecisionRule | null
  reconciled: Distribution | null
  support: Support
  factors: number[]
  /** Training fraction b of the fractional Bayes factors; null: m₀/n. */
  trainingFraction?: number | null
  n: number
}

/** The last step of every analysis: storing its result with its audit event (the worker reports it, not the computation). */
export const STORE_STEPS = 1

/** Steps the computation reports (computeImpact): the candidates with their diagnostics, the sweep with its curves, the tipping point. */
export function computeSteps(t: ImpactTask): number {
  return candidateSteps(t.candidates) + (t.reconciled ? sweepSteps(t.factors) : 0) + (t.reconciled && t.decision ? 1 : 0)
}

/** Steps of an analysis, for its progress bar: the computation's, then storing the result; done equals this only once stored. */
export function impactSteps(t: ImpactTask): number {
  return computeSteps(t) + STORE_STEPS
}

/**
 * The heavy part of an impact analysis: every candidate's evidence, posterior and diagnostics, the width sweep with its
 * curves, the tipping point. `onProgress` hears the steps finished after each one (computeSteps in all); it may throw
 * to stop the computation at that step.
 */
export function computeImpact(t: ImpactTask, onProgress: (done: number) => void = () => {}): ImpactComputation {
  const started = Date.now()
  let done = 0
  const step = () => onProgress(++done)
  const candidates = evaluateCandidates(t.candidates, t.data, t.decision, t.trainingFraction ?? null, step)
  const sweep = t.reconciled ? sweepOf(t.reconciled, t.data, t.support, t.factors, t.trainingFraction ?? null, step) : null
  if (sweep?.priorDriven) candidates.find((c) => c.kind === 'reconciled')?.flags.push('prior-driven-bayes-factor')
  let tipping: TippingPoint | null = null
  if (t.reconciled && t.decision) {
    tipping = tippingPoint(t.reconciled, t.data, t.decision, t.support)
    step()
  }
  return { candidates, sweep, tipping, findings: findings(candidates, sweep, t.n), computeMs: Date.now() - started }
}

/** A linked set's joint draws: the marginals in column order with their symbols, the correlation matrix, n and the seed. */
export interface JointDrawsTask {
  symbols: string[]
  marginals: PriorDistribution[]
  matrix: number[][]
  n: number
  seed: number
}

/**
 * The joint draws (sampleJoint) as CSV: one column per quantity named by its symbol, one draw per line, each number
 * written with the digits that read back to the same double, so the same seed gives the same bytes.
 */
export function computeJointDraws(t: JointDrawsTask): string {
  const draws = sampleJoint(t.marginals, t.matrix, t.n, t.seed)
  return `${t.symbols.join(',')}\n${draws.map((row) => row.map(String).join(',')).join('\n')}\n`
}
