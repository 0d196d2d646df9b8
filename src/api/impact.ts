import type { CandidateResult, DecisionRule, SweepSummary } from '@shared/elicitation/impact'
import type { TippingPoint } from '@shared/elicitation/tipping'
import type { PilotModel, PilotSummary } from '@shared/elicitation/pilot'
import type { Distribution } from '@shared/stats'
import type { ImpactJob as ImpactJobOf } from '@shared/api/impact-jobs'
import { api } from './client'

export type CandidateKind = CandidateResult['kind']
export type CandidateFlag = 'prior-dominates' | 'prior-data-conflict' | 'prior-driven-bayes-factor'

/** POST /api/quantities/:id/impact (shared/schemas/impact.ts). */
export interface ImpactRequest {
  datasetId: number
  comparison: Distribution
  mixtureWeight?: number | null
  mixtureWide?: Distribution | null
  decision?: DecisionRule | null
  factors?: number[]
  /** Training fraction b of the fractional Bayes factors; null or absent: m₀/n. */
  trainingFraction?: number | null
}

export type ImpactCandidate = CandidateResult
export type ImpactSweep = SweepSummary
export type ImpactTipping = TippingPoint

/** One analysis of every candidate prior on one pilot dataset, as the server computed (or cached) it. */
export interface ImpactResult {
  id: number
  cached: boolean
  createdAt: string
  quantityId: number
  datasetId: number
  dataset: { name: string; version: number; model: PilotModel; summary: PilotSummary }
  /** Sample size the prior ESS is compared with (observations, trials or total exposure). */
  n: number
  candidates: ImpactCandidate[]
  sweep: ImpactSweep | null
  tipping: ImpactTipping | null
  decision: DecisionRule | null
  findings: string[]
  computeMs: number
  /** GET only: the request that produced it. */
  input?: ImpactRequest
}

/** An analysis on the server's queue (shared/api/impact-jobs.ts); `result` once it is done. */
export type ImpactJob = ImpactJobOf<ImpactResult>
export type { ImpactJobState } from '@shared/api/impact-jobs'

export const impactApi = {
  /** Queues an analysis; answered at once with its job (already done when the same inputs were analysed before). */
  run: (quantityId: number, body: ImpactRequest) => api.post<ImpactJob>(`/api/quantities/${quantityId}/impact`, body),
  job: (jobId: string) => api.get<ImpactJob>(`/api/impact-jobs/${encodeURIComponent(jobId)}`),
  latest: (quantityId: number) => api.get<ImpactResult | null>(`/api/quantities/${quantityId}/impact`),
  /** Records why the final prior goes into the record without an impact analysis. */
  notRun: (quantityId: number, reason: string) => api.put<{ quantityId: number; priorHash: string; reason: string }>(`/api/quantities/${quantityId}/impact/not-run`, { reason }),
}
