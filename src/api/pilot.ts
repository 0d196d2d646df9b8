import type { PilotMapping, PilotModel, PilotSummary } from '@shared/elicitation/pilot'
import type { PilotData } from '@shared/stats'
import { api, ApiError, toApiError, type CsrfProvider } from './client'

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
}

/**
 * POSTs form fields and one file as multipart/form-data with the session's CSRF header (as
 * uploadFile in upload.ts does for a bare file): a rejected token is refreshed once, errors become
 * ApiError, a 401 ends the session.
 */
export async function postMultipart<T>(
  url: string,
  fields: Record<string, string | number | undefined>,
  file: Blob,
  filename: string,
  csrf: CsrfProvider,
  fetchFn: typeof fetch = (i, init) => globalThis.fetch(i, init),
): Promise<T> {
  const send = async (token: string): Promise<T> => {
    const form = new FormData()
    for (const [key, value] of Object.entries(fields)) if (value !== undefined) form.append(key, String(value))
    form.append('file', file, filename)
    let response: Response
    try {
      response = await fetchFn(url, { method: 'POST', headers: { accept: 'application/json', 'x-csrf-token': token }, credentials: 'same-origin', body: form })
    } catch {
      throw new ApiError(0, 'The server could not be reached. Check your connection and try again.')
    }
    const text = await response.text()
    let body: unknown = undefined
    if (text) {
      try {
        body = JSON.parse(text) as unknown
      } catch {
        body = text
      }
    }
    if (!response.ok) {
      const error = response.status === 413 ? new ApiError(413, 'The file is too large for the server.', { file: 'Pilot data files may be at most 2 MB.' }) : toApiError(response.status, body)
      if (error.status === 401) api.onUnauthorized?.(error, url)
      throw error
    }
    return body as T
  }
  try {
    return await send(await csrf.get())
  } catch (error) {
    if (!(error instanceof ApiError) || !error.isCsrf) throw error
    return send(await csrf.refresh())
  }
}

export const pilotApi = {
  list: (studyId: number) => api.get<Dataset[]>(`/api/studies/${studyId}/datasets`),
  get: (id: number) => api.get<Dataset>(`/api/datasets/${id}`),
  upload: (studyId: number, fields: PilotUploadFields, file: File, csrf: CsrfProvider) =>
    postMultipart<Dataset>(`/api/studies/${studyId}/datasets`, { ...fields }, file, file.name, csrf),
}
