import { ApiError, api, toApiError, type CsrfProvider } from './client'

/**
 * POSTs form fields and one file (field `file`) as multipart/form-data with the session's CSRF header. Mirrors
 * ApiClient: a rejected CSRF token is refreshed once, errors become ApiError, a 401 ends the session.
 * `tooLarge` is the field message shown when a proxy refuses the body before the server's own check (413).
 */
export async function postMultipart<T>(
  url: string,
  fields: Record<string, string | number | undefined>,
  file: Blob,
  filename: string,
  csrf: CsrfProvider,
  fetchFn: typeof fetch = (i, init) => globalThis.fetch(i, init),
  tooLarge?: string,
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
      const error = response.status === 413
        ? new ApiError(413, 'The file is too large for the server.', tooLarge ? { file: tooLarge } : undefined)
        : toApiError(response.status, body)
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

/** One file, no other fields. */
export function uploadFile<T>(url: string, file: Blob, filename: string, csrf: CsrfProvider, fetchFn?: typeof fetch): Promise<T> {
  return postMultipart<T>(url, {}, file, filename, csrf, fetchFn)
}
