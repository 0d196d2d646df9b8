import type { ImpactNotRun, ImpactRequest, ImpactResult } from '@shared/api/impact'
import type { ImpactJob as ImpactJobOf } from '@shared/api/impact-jobs'
import { api } from './client'

export type { CandidateFlag, CandidateKind, ImpactRequest, ImpactResult } from '@shared/api/impact'
export type { CandidateResult as ImpactCandidate, SweepSummary as ImpactSweep } from '@shared/elicitation/impact'

/** An analysis on the server's queue (shared/api/impact-jobs.ts); `result` once it is done. */
export type ImpactJob = ImpactJobOf<ImpactResult>
export type { ImpactJobState } from '@shared/api/impact-jobs'

export const impactApi = {
  /** Queues an analysis; answered at once with its job (already done when the same inputs were analysed before). */
  run: (quantityId: number, body: ImpactRequest) => api.post<ImpactJob>(`/api/quantities/${quantityId}/impact`, body),
  job: (jobId: string) => api.get<ImpactJob>(`/api/impact-jobs/${encodeURIComponent(jobId)}`),
  /** Stops a queued or running analysis; it stores nothing (409 once it has finished). */
  cancel: (jobId: string) => api.post<ImpactJob>(`/api/impact-jobs/${encodeURIComponent(jobId)}/cancel`),
  /** The quantity's analyses still queued or running, newest first. */
  active: (quantityId: number) => api.get<ImpactJob[]>(`/api/quantities/${quantityId}/impact-jobs/active`),
  latest: (quantityId: number) => api.get<ImpactResult | null>(`/api/quantities/${quantityId}/impact`),
  /** Records why the final prior goes into the record without an impact analysis. */
  notRun: (quantityId: number, reason: string) => api.put<ImpactNotRun>(`/api/quantities/${quantityId}/impact/not-run`, { reason }),
}
