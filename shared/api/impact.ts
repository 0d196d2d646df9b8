import type { CandidateResult, DecisionRule, SweepSummary } from '../elicitation/impact'
import type { PilotModel, PilotSummary } from '../elicitation/pilot'
import type { TippingPoint } from '../elicitation/tipping'
import type { Distribution } from '../stats/types'

/** Request and response shapes of the impact routes (POST/GET /api/quantities/:id/impact, PUT …/impact/not-run). */

export type CandidateKind = CandidateResult['kind']
/** The flags an analysis may raise on a candidate prior. */
export type CandidateFlag = 'prior-dominates' | 'prior-data-conflict' | 'prior-driven-bayes-factor'

/** POST /api/quantities/:id/impact (checked by shared/schemas/impact.ts). */
export interface ImpactRequest {
  datasetId: number
  comparison: Distribution
  mixtureWeight?: number | null
  mixtureWide?: Distribution | null
  decision?: DecisionRule | null
  factors?: number[]
  /** Training fraction b of the fractional Bayes factors; null or absent: m₀/n. */
  trainingFraction?: number | null
  /** Experts (user ids) whose priors the analysis leaves out. */
  excludedExperts?: number[]
}

/** The computed part of an analysis: every candidate's evidence and posterior, the width sweep, the tipping point. */
export interface ImpactComputation {
  candidates: CandidateResult[]
  sweep: SweepSummary | null
  tipping: TippingPoint | null
  findings: string[]
  computeMs: number
}

/** An analysis as stored: what it was run on and what it found. */
export interface ImpactFindings extends ImpactComputation {
  quantityId: number
  datasetId: number
  dataset: { name: string; version: number; model: PilotModel; summary: PilotSummary }
  /** Sample size the prior ESS is compared with (observations, trials or total exposure). */
  n: number
  decision: DecisionRule | null
  /** Experts left out of the analysis, under their labels (absent in analyses stored before experts could be left out). */
  excludedExperts?: { expertId: number; label: string }[]
}

/** One analysis of every candidate prior on one pilot dataset, as the server computed (or cached) it. */
export interface ImpactResult extends ImpactFindings {
  id: number
  cached: boolean
  createdAt: string
  /** GET only: the request that produced it. */
  input?: ImpactRequest
}

/** PUT /api/quantities/:id/impact/not-run: the reason recorded for this final prior. */
export interface ImpactNotRun {
  quantityId: number
  priorHash: string
  reason: string
}
