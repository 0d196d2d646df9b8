import { ApiError, api, toApiError, type CsrfProvider } from './client'

/**
 * Sends one file as multipart/form-data (field `file`) with the session's CSRF header. Mirrors
 * ApiClient: a rejected CSRF token is refreshed once, errors become ApiError, a 401 ends the session.
 */
export async function uploadFile<T>(url: string, file: Blob, filename: string, csrf: CsrfProvider, fetchFn: typeof fetch = (i, init) => globalThis.fetch(i, init)): Promise<T> {
  const send = async (token: string): Promise<T> => {
    const form = new FormData()
    form.append('file', file, filename)
    let response: Response
    try {
      response = await fetchFn(url, {
        method: 'POST',
        headers: { accept: 'application/json', 'x-csrf-token': token },
        credentials: 'same-origin',
        body: form,
      })
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
      const error = response.status === 413 ? new ApiError(413, 'The file is too large for the server.') : toApiError(response.status, body)
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
