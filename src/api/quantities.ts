import type { QuantityBody, SupportKind } from '@shared/schemas/quantities'
import { api, type CsrfProvider } from './client'
import { uploadFile } from './upload'

export type Support =
  | { kind: Exclude<SupportKind, 'bounded'> }
  | { kind: 'bounded'; lower: number; upper: number }

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

/** What POST/PATCH accept: lower/upper only for bounded support. */
export type QuantityInput = Omit<QuantityBody, 'support'> & { support: Support }

export const quantitiesApi = {
  list: (studyId: number) => api.get<Quantity[]>(`/api/studies/${studyId}/quantities`),
  get: (id: number) => api.get<Quantity>(`/api/quantities/${id}`),
  create: (studyId: number, body: QuantityInput) => api.post<Quantity>(`/api/studies/${studyId}/quantities`, body),
  update: (id: number, body: QuantityInput & { version: number }) => api.patch<Quantity>(`/api/quantities/${id}`, body),
  uploadFile: (quantityId: number, file: File, csrf: CsrfProvider) =>
    uploadFile<EvidenceFile>(`/api/quantities/${quantityId}/files`, file, file.name, csrf),
  deleteFile: (fileId: number) => api.delete(`/api/files/${fileId}`),
}

/** Download address of an evidence file (members only; served as an attachment). */
export const fileUrl = (fileId: number): string => `/api/files/${fileId}`

