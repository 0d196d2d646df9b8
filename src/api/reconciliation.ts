import type { ReconciliationSaveBody, ReconciliationView } from '@shared/api/reconciliation'
import { api } from './client'

export type {
  Consensus, CookeScore, PoolMethod, PoolSummary, ReconcileExpert, ReconciliationHistoryEntry, ReconciliationSaveBody, ReconciliationSettings,
  ReconciliationView, SavedReconciliation, WeightsSetting,
} from '@shared/api/reconciliation'

function query(params: { roundId?: number; cutoff?: number }): string {
  const q = new URLSearchParams()
  if (params.roundId !== undefined) q.set('roundId', String(params.roundId))
  if (params.cutoff !== undefined) q.set('cutoff', String(params.cutoff))
  const s = q.toString()
  return s ? `?${s}` : ''
}

export const reconciliationApi = {
  get: (quantityId: number, params: { roundId?: number; cutoff?: number } = {}) =>
    api.get<ReconciliationView>(`/api/quantities/${quantityId}/reconciliation${query(params)}`),
  save: (quantityId: number, body: ReconciliationSaveBody) => api.put<ReconciliationView>(`/api/quantities/${quantityId}/reconciliation`, body),
}
