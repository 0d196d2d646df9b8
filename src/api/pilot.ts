import type { Dataset, PilotUploadFields } from '@shared/api/datasets'
import { api, type CsrfProvider } from './client'
import { postMultipart } from './upload'

export type { Dataset, Delimiter, PilotUploadFields } from '@shared/api/datasets'

export { postMultipart } from './upload'

export const pilotApi = {
  list: (studyId: number) => api.get<Dataset[]>(`/api/studies/${studyId}/datasets`),
  get: (id: number) => api.get<Dataset>(`/api/datasets/${id}`),
  upload: (studyId: number, fields: PilotUploadFields, file: File, csrf: CsrfProvider) =>
    postMultipart<Dataset>(`/api/studies/${studyId}/datasets`, { ...fields, allowDuplicate: fields.allowDuplicate ? 'true' : undefined }, file, file.name, csrf, undefined, 'Pilot data files may be at most 2 MB.'),
}
