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
