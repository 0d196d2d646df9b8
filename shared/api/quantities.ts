import type { QuantityBody } from '../schemas/quantities'
import type { Support } from '../stats/types'

/** Response shapes of the quantity routes, returned by the server's mappers and read by the client. */

export interface EvidenceFile {
  id: number
  filename: string
  mimeType: string
  sizeBytes: number
  createdAt: string
}

export interface Quantity {
  id: number
  studyId: number
  name: string
  symbol: string
  unit: string
  question: string
  support: Support
  assumptions: string
  evidenceNotes: string
  position: number
  version: number
  files: EvidenceFile[]
  createdAt: string
  updatedAt: string
}

/** Body of POST /api/studies/:id/quantities and (with `version`) PATCH /api/quantities/:id: lower/upper only for bounded support. */
export type QuantityInput = Omit<QuantityBody, 'support'> & { support: Support }
