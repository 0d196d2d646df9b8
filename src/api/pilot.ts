import type { PilotMapping, PilotModel, PilotSummary } from '@shared/elicitation/pilot'
import type { PilotData } from '@shared/stats'
import { api, type CsrfProvider } from './client'
import { postMultipart } from './upload'

export type Delimiter = ',' | ';' | '\t'

/** A stored pilot dataset (GET /api/studies/:id/datasets, GET /api/datasets/:id). */
export interface Dataset {
  id: number
  studyId: number
  quantityId: number
  /** 1, 2, … per quantity: each upload is a new version. */
  version: number
  name: string
  filename: string
  model: PilotModel
  mapping: PilotMapping & { delimiter?: Delimiter }
  rowCount: number
  data: PilotData
  summary: PilotSummary
  sha256: string
  createdAt: string
  /** Header and the first rows of the stored file (single GET and create only). */
  preview?: string[][]
}

/** The form fields sent beside the file (shared/schemas/pilot.ts); only the ones of the chosen model. */
export interface PilotUploadFields {
  quantityId: number
  name: string
  model: PilotModel
  delimiter: Delimiter
  valueColumn?: string
  sigma?: number
  sigmaPriorScale?: number
  binomialLayout?: 'counts' | 'binary'
  successesColumn?: string
  trialsColumn?: string
  binaryColumn?: string
  countColumn?: string
  exposureColumn?: string
  /** Store the file although the same file is already a version of this quantity's pilot data. */
  allowDuplicate?: boolean
}

export { postMultipart } from './upload'

export const pilotApi = {
  list: (studyId: number) => api.get<Dataset[]>(`/api/studies/${studyId}/datasets`),
  get: (id: number) => api.get<Dataset>(`/api/datasets/${id}`),
  upload: (studyId: number, fields: PilotUploadFields, file: File, csrf: CsrfProvider) =>
    postMultipart<Dataset>(`/api/studies/${studyId}/datasets`, { ...fields, allowDuplicate: fields.allowDuplicate ? 'true' : undefined }, file, file.name, csrf, undefined, 'Pilot data files may be at most 2 MB.'),
}
