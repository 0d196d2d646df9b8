import type { ImpactNotRun, ImpactRequest, ImpactResult } from '@shared/api/impact'
import { api } from './client'

export type { CandidateFlag, CandidateKind, ImpactRequest, ImpactResult } from '@shared/api/impact'
export type { CandidateResult as ImpactCandidate, SweepSummary as ImpactSweep } from '@shared/elicitation/impact'

export const impactApi = {
  run: (quantityId: number, body: ImpactRequest) => api.post<ImpactResult>(`/api/quantities/${quantityId}/impact`, body),
  latest: (quantityId: number) => api.get<ImpactResult | null>(`/api/quantities/${quantityId}/impact`),
  /** Records why the final prior goes into the record without an impact analysis. */
  notRun: (quantityId: number, reason: string) => api.put<ImpactNotRun>(`/api/quantities/${quantityId}/impact/not-run`, { reason }),
}
