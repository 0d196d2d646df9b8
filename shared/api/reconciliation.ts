import type { AnswerInput } from '../elicitation/answers'
import type { LeaveOneOut } from '../elicitation/reconcile'
import type { ElicitationMethod } from '../schemas/rounds'
import type { Distribution, Family, FitResult, Point, Support } from '../stats/types'
import type { Quantity } from './quantities'
import type { RoundStatus } from './rounds'

/** Request and response shapes of GET/PUT /api/quantities/:id/reconciliation. */

export type PoolMethod = 'linear' | 'logarithmic' | 'consensus'
export type WeightsSetting = 'equal' | 'performance' | number[]
export type WeightsMode = 'equal' | 'performance' | 'custom'
export type ReconciliationStatus = 'draft' | 'reconciled'

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
  method: ElicitationMethod
  answer: AnswerInput
  rationale: string
  q05: number
  q50: number
  q95: number
  /** Where the expert's fit contradicts their plausible range; empty when it does not. */
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
  weightsMode: WeightsMode
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
  status: ReconciliationStatus
  reconciledAt: string | null
  version: number
  updatedAt: string
}

/** One saved version of the reconciliation, newest first. */
export interface ReconciliationHistoryEntry {
  version: number
  savedAt: string
  savedBy: string
  status: ReconciliationStatus
  method: PoolMethod
  family: Family | null
}

/** The combination settings a view was computed for. */
export interface ReconciliationSettings {
  roundId: number
  method: PoolMethod
  weights: WeightsSetting
  cutoff: number
  excludedExperts: number[]
  consensus?: Consensus | null
}

/** What the server computes for one set of settings: the numbers the screen shows are the record's. */
export interface ReconciliationEvaluation {
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
  /** Cautions on performance weights from too few calibration questions or experts. */
  weightCautions: string[]
  calibration: {
    questionCount: number
    cutoff: number
    scores: CookeScore[] | null
    realizations: number[]
    assessments: { id: string; assessments: number[][] }[]
  }
}

/** GET/PUT /api/quantities/:id/reconciliation: everything the workspace shows, computed by the server for `settings`. */
export interface ReconciliationView extends ReconciliationEvaluation {
  rounds: { id: number; number: number; title: string; status: RoundStatus; submitted: number }[]
  roundId: number
  settings: ReconciliationSettings
  saved: SavedReconciliation | null
  history: ReconciliationHistoryEntry[]
}

/** PUT body (checked by shared/schemas/reconciliation.ts). */
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
