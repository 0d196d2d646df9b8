import type { CompositionPrior } from '../elicitation/composition-prior'
import type { CompositionImpact } from '../elicitation/composition-impact'
import type { PilotSummary } from '../elicitation/pilot'

/** Response shapes of the composition routes, returned by the server's mappers and read by the client. */

/** One share of a composition: a proportion quantity of the study, in the composition's order. */
export interface CompositionShare {
  quantityId: number
  name: string
  symbol: string
  position: number
}

export interface Composition {
  id: number
  studyId: number
  name: string
  wording: string
  shares: CompositionShare[]
  /** A last "other" share takes what the listed shares leave; nobody is asked about it. */
  residual: boolean
  residualLabel: string
  version: number
  createdAt: string
  updatedAt: string
}

/** GET /api/compositions/:id/dirichlet: the composition's joint prior from its shares' reconciled priors. */
export interface CompositionDirichlet extends CompositionPrior {
  compositionId: number
  name: string
  residual: boolean
}

/** A composition's multinomial pilot data (counts per share as recorded). */
export interface CompositionDataset {
  id: number
  compositionId: number
  version: number
  name: string
  filename: string
  mapping: Record<string, unknown>
  rowCount: number
  summary: PilotSummary
  sha256: string
  createdAt: string
}

/** GET/POST /api/compositions/:id/impact: the latest analysis of the composition's Dirichlet on a dataset. */
export interface CompositionAnalysis {
  id: number
  compositionId: number
  datasetId: number
  datasetName: string
  datasetVersion: number
  result: CompositionImpact
  createdAt: string
}
