import type { LeaveOneOut } from '@shared/elicitation/reconcile'
import type { Distribution, Family, FitResult, Point, Support } from '@shared/stats'
import type { Quantity } from './quantities'
import type { RoundStatus } from './rounds'
import { api } from './client'

export type PoolMethod = 'linear' | 'logarithmic' | 'consensus'
export type WeightsSetting = 'equal' | 'performance' | number[]

export interface Consensus {
  points: Point[]
  participants: string
  notes: string
}

/** One expert's submitted answer for the quantity in the round, with the fit that enters the combination. */
export interface ReconcileExpert {
  judgementId: number
  expertId: number
  name: string
  /** The study-wide label: "Expert 1", "Expert 2", … in the order the experts first joined the study's panels */
  label: string
  distribution: Distribution
  sse: number
  method: string
  answer: { lower?: number | null; upper?: number | null; points?: Point[]; edges?: number[]; probs?: (number | null)[]; chips?: number[] }
  rationale: string
  q05: number
  q50: number
  q95: number
  /** Where the expert's fit contradicts their plausible range (shared/elicitation/fits.ts); empty when it does not. */
  warnings: string[]
}

export interface PoolSummary {
  q05: number
  q50: number
  q95: number
  mean?: number
  sd?: number
}

export interface CookeScore {
  expertId: number
  calibration: number
  information: number
  weight: number
  normalizedWeight: number
}

export interface SavedReconciliation {
  id: number
  roundId: number
  method: PoolMethod
  weightsMode: 'equal' | 'performance' | 'custom'
  weights: number[]
  weightsReason: string
  cutoff: number
  excludedExperts: number[]
  consensus: Consensus | null
  family: Family | null
  distribution: Distribution | null
  fits: FitResult[]
  summary: PoolSummary | null
  adjusted: boolean
  adjustReason: string
  rationale: string
  status: 'draft' | 'reconciled'
  reconciledAt: string | null
  version: number
  updatedAt: string
}

export interface HistoryEntry {
  version: number
  savedAt: string
  savedBy: string
  status: 'draft' | 'reconciled'
  method: PoolMethod
  family: Family | null
}

/** GET/PUT /api/quantities/:id/reconciliation: everything the workspace shows, computed by the server for `settings`. */
export interface ReconciliationView {
  rounds: { id: number; number: number; title: string; status: RoundStatus; submitted: number }[]
  roundId: number
  settings: {
    roundId: number
    method: PoolMethod
    weights: WeightsSetting
    cutoff: number
    excludedExperts: number[]
    consensus?: Consensus | null
  }
  quantity: Quantity
  support: Support
  experts: ReconcileExpert[]
  included: number[]
  weights: number[]
  pool: PoolSummary | null
  fits: FitResult[]
  leaveOneOut: LeaveOneOut[]
  disagreements: { a: string; b: string }[]
  consensusCheck: { narrow: boolean; width: number; spread: number } | null
  problems: Record<string, string>
  /** Cautions on performance weights from too few calibration questions or experts (shared/elicitation/weights.ts). */
  weightCautions: string[]
  calibration: {
    questionCount: number
    cutoff: number
    scores: CookeScore[] | null
    realizations: number[]
    assessments: { id: string; assessments: number[][] }[]
  }
  saved: SavedReconciliation | null
  history: HistoryEntry[]
}

/** PUT body (shared/schemas/reconciliation.ts). */
export interface ReconciliationSaveBody {
  roundId: number
  method: PoolMethod
  weights: WeightsSetting
  weightsReason?: string
  cutoff: number
  excludedExperts: number[]
  consensus?: Consensus
  family: Family | null
  distribution?: Distribution | null
  adjustReason?: string
  rationale: string
  reconciled: boolean
  version: number
}

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
