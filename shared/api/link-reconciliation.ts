import type { LinkedSetCodeLine } from '../elicitation/linked-sets'
import type { Distribution } from '../stats/types'

/** Response shapes of the link-reconciliation routes, returned by the server's service and read by the client. */

/** One side of a link: a quantity of the study. */
export interface LinkSide {
  quantityId: number
  name: string
  symbol: string
}

/** One expert's submitted answer to the link's question, as a Gaussian-copula correlation, with its weight in the pool. */
export interface LinkExpertCorrelation {
  expertId: number
  /** The study-wide label: "Expert 1", "Expert 2", … */
  label: string
  /** The expert's name, for the study team. */
  name: string
  /** P(second above the expert's median | first above theirs). */
  probability: number
  /** The expert's reason for their answer, as they gave it ('' when they gave none). */
  rationale: string
  /** sin(π(p − 1/2)). */
  correlation: number
  /** The expert's share of the pool (the weights add up to 1; 0 for an expert left out of both reconciliations). */
  weight: number
}

export type LinkDecision = 'confirm' | 'override'

/** The analyst's saved decision on a link's correlation. */
export interface LinkReconciliationSaved {
  decision: LinkDecision
  correlation: number
  /** The experts' pooled correlation when the decision was taken (null when nobody had answered). */
  pooledCorrelation: number | null
  reason: string
  decidedBy: string
  decidedAt: string
  version: number
}

/** Where the correlation a linked set uses for a link comes from. */
export type LinkCorrelationSource = 'confirmed' | 'overridden' | 'pooled' | 'none'

/** A link at reconciliation: the experts' correlations, their pool, and the analyst's decision. */
export interface LinkReconciliationView {
  linkId: number
  roundId: number
  roundNumber: number
  roundTitle: string
  first: LinkSide
  second: LinkSide
  wording: string
  answers: LinkExpertCorrelation[]
  /** How the weights were set, in plain words. */
  weightRule: string
  /** tanh(Σ wᵢ atanh ρᵢ): null when no expert with weight has answered. */
  pooledCorrelation: number | null
  /** The conditional probability the pooled correlation means: 1/2 + arcsin(ρ)/π. */
  pooledProbability: number | null
  /** Lowest and highest of the experts' correlations. */
  spread: { min: number; max: number } | null
  saved: LinkReconciliationSaved | null
  /** A confirmation whose pooled value has changed since (answers or weights changed): confirm again or override. */
  stale: boolean
  /** The correlation the linked set's matrix uses: the decision, else the pool, else 0. */
  correlation: number
  source: LinkCorrelationSource
}

/** A quantity of a linked set with the prior it enters the joint prior with: its reconciled distribution. */
export interface LinkedSetMarginal {
  quantityId: number
  name: string
  symbol: string
  /** The reconciled prior; null while the quantity is not reconciled. */
  distribution: Distribution | null
}

/** The nearest correlation matrix of a set whose correlations cannot hold together (its eigenvalues kept at 10⁻⁶ or more), with how far each entry moved. */
export interface LinkedSetRepair {
  matrix: number[][]
  /** repaired − asked, entry by entry. */
  changes: number[][]
  maxChange: number
  iterations: number
}

/** Quantities joined by links (directly or through each other), with their correlation matrix. */
export interface LinkedSetView {
  /** Quantities in the study's order; rows and columns of the matrices follow it. */
  marginals: LinkedSetMarginal[]
  linkIds: number[]
  /** The correlations as decided (or pooled): 1 on the diagonal, 0 for pairs without a link. */
  matrix: number[][]
  /** Pairs of the set that no link joins: their correlation is taken as 0. */
  unlinkedPairs: { first: string; second: string }[]
  positiveSemiDefinite: boolean
  minEigenvalue: number
  /** Present when the matrix is not positive semi-definite. */
  repair: LinkedSetRepair | null
  /** The matrix the joint draws and model code use: the repaired one when a repair was needed. */
  jointMatrix: number[][]
  /** Every link of the set has the analyst's decision. */
  decided: boolean
  /** Names of quantities of the set not reconciled yet (joint draws and model code wait for them). */
  waitingFor: string[]
  /** Model code for the joint prior with its read-back check; empty while a quantity waits. */
  modelCode: LinkedSetCodeLine[]
}

/** GET /api/studies/:id/linked-quantities: every link of the study at reconciliation and the linked sets they make. */
export interface StudyLinkedQuantities {
  links: LinkReconciliationView[]
  sets: LinkedSetView[]
}

/** Body of PUT /api/links/:id/reconciliation (`version` 0 for a first decision); an override carries a correlation and a reason. */
export interface LinkReconciliationSaveBody {
  decision: LinkDecision
  correlation?: number
  reason?: string
  version: number
}
