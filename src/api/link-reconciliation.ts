import type { LinkReconciliationSaveBody, LinkReconciliationView, StudyLinkedQuantities } from '@shared/api/link-reconciliation'
import { api } from './client'

export type {
  LinkedSetView, LinkExpertCorrelation, LinkReconciliationSaveBody, LinkReconciliationView, StudyLinkedQuantities,
} from '@shared/api/link-reconciliation'

const drawsQuery = (n?: number, seed?: number) => {
  const q = new URLSearchParams()
  if (n !== undefined) q.set('n', String(n))
  if (seed !== undefined) q.set('seed', String(seed))
  return q.size ? `?${q}` : ''
}

export const linkReconciliationApi = {
  studyLinks: (studyId: number) => api.get<StudyLinkedQuantities>(`/api/studies/${studyId}/linked-quantities`),
  decide: (linkId: number, body: LinkReconciliationSaveBody) => api.put<LinkReconciliationView>(`/api/links/${linkId}/reconciliation`, body),
  /** Where the joint draws of the quantity's linked set download from (CSV). */
  drawsUrl: (quantityId: number, n?: number, seed?: number) => `/api/quantities/${quantityId}/joint-draws${drawsQuery(n, seed)}`,
  /** The joint draws as CSV text (for the scatter). */
  draws: (quantityId: number, n: number, seed?: number) => api.get<string>(`/api/quantities/${quantityId}/joint-draws${drawsQuery(n, seed)}`),
}
