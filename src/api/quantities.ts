import type { EvidenceFile, Quantity, QuantityInput } from '@shared/api/quantities'
import { api, type CsrfProvider } from './client'
import { uploadFile } from './upload'

export type { EvidenceFile, Quantity, QuantityInput } from '@shared/api/quantities'
export type { Support } from '@shared/stats'

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

