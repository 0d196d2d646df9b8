import type { ImpactComputation } from '../../shared/api/impact'
import { evaluateCandidates, findings, sweepOf, type CandidateInput, type DecisionRule } from '../../shared/elicitation/impact'
import { tippingPoint } from '../../shared/elicitation/tipping'
import type { Distribution, PilotData, Support } from '../../shared/stats/index'

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

/** The heavy part of an impact analysis: every candidate's evidence and posterior, the width sweep, the tipping point. */
export function computeImpact(t: ImpactTask): ImpactComputation {
  const started = Date.now()
  const candidates = evaluateCandidates(t.candidates, t.data, t.decision, t.trainingFraction ?? null)
  const sweep = t.reconciled ? sweepOf(t.reconciled, t.data, t.support, t.factors, t.trainingFraction ?? null) : null
  if (sweep?.priorDriven) candidates.find((c) => c.kind === 'reconciled')?.flags.push('prior-driven-bayes-factor')
  const tipping = t.reconciled && t.decision ? tippingPoint(t.reconciled, t.data, t.decision, t.support) : null
  return { candidates, sweep, tipping, findings: findings(candidates, sweep, t.n), computeMs: Date.now() - started }
}
