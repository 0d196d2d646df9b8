import type { ApiErrorBody } from '@shared/types'

/** An error answered by the API (or a network failure, status 0). */
export class ApiError extends Error {
  readonly status: number
  readonly fields: Record<string, string>
  /** Structured facts beside the message (a file's line and column, the version a duplicate file matches…). */
  readonly details: Record<string, unknown>

  constructor(status: number, message: string, fields: Record<string, string> = {}, details: Record<string, unknown> = {}) {
    super(message)
    this.name = 'ApiError'
    this.status = status
    this.fields = fields
    this.details = details
  }

  /** True when the server rejected the CSRF token (it changes after sign-in and sign-out). */
  get isCsrf(): boolean {
    return this.status === 403 && /csrf/i.test(this.message)
  }
}

const FALLBACK_MESSAGES: Record<number, string> = {
  0: 'The server could not be reached. Check your connection and try again.',
  400: 'Some values are not valid.',
  401: 'Please sign in.',
  403: 'Your account is not allowed to do this.',
  404: 'Not found.',
  409: 'Someone else changed this in the meantime. Reload and try again.',
  429: 'Too many attempts. Wait a moment and try again.',
}

function isErrorBody(body: unknown): body is ApiErrorBody {
  if (typeof body !== 'object' || body === null || !('error' in body)) return false
  const error = (body as { error: unknown }).error
  return typeof error === 'object' && error !== null && typeof (error as { message?: unknown }).message === 'string'
}

/** Builds an ApiError from a status and a parsed (or unparseable) response body. */
export function toApiError(status: number, body: unknown): ApiError {
  if (isErrorBody(body)) {
    const fields: Record<string, string> = {}
    for (const [name, message] of Object.entries(body.error.fields ?? {})) {
      if (typeof message === 'string') fields[name] = message
    }
    const details = Object.fromEntries(Object.entries(body.error).filter(([k]) => k !== 'message' && k !== 'fields'))
    return new ApiError(status, body.error.message, fields, details)
  }
  return new ApiError(status, FALLBACK_MESSAGES[status] ?? `The server answered with an error (${status}).`)
}

/** A readable message for anything thrown by an API call or by code around it. */
export function errorMessage(error: unknown): string {
  if (error instanceof Error && error.message) return error.message
  return 'Something went wrong.'
}

/** Source of the CSRF token sent with state-changing requests. */
export interface CsrfProvider {
  /** The current token, fetched if there is none yet. */
  get(): Promise<string>
  /** Forget the current token and fetch a new one. */
  refresh(): Promise<string>
}

export type HttpMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'
const UNSAFE = new Set<HttpMethod>(['POST', 'PUT', 'PATCH', 'DELETE'])

export interface ApiClientOptions {
  fetch?: typeof fetch
}

/** Small JSON fetch wrapper: same-origin cookies, CSRF header on writes, ApiError on failure. */
export class ApiClient {
  private readonly fetchFn: typeof fetch
  private csrf: CsrfProvider
  /** Called with every error whose status is 401 (the session ended). */
  onUnauthorized: ((error: ApiError, url: string) => void) | null = null

  constructor(options: ApiClientOptions = {}) {
    this.fetchFn = options.fetch ?? ((input, init) => globalThis.fetch(input, init))
    this.csrf = this.createCsrfCache()
  }

  /** Replace where the CSRF token comes from (the auth store keeps it in its state). */
  setCsrfProvider(provider: CsrfProvider): void {
    this.csrf = provider
  }

  /** A provider that caches the token in this client, sharing one request between callers. */
  createCsrfCache(): CsrfProvider {
    let token: string | null = null
    let pending: Promise<string> | null = null
    const load = (): Promise<string> => {
      pending ??= this.fetchCsrfToken().then(
        (value) => {
          token = value
          pending = null
          return value
        },
        (error: unknown) => {
          pending = null
          throw error
        },
      )
      return pending
    }
    return {
      get: () => (token !== null ? Promise.resolve(token) : load()),
      refresh: () => {
        token = null
        return load()
      },
    }
  }

  /** GET /api/auth/csrf → token. */
  async fetchCsrfToken(): Promise<string> {
    const body = await this.send<{ token: string }>('GET', '/api/auth/csrf')
    if (!body || typeof body.token !== 'string') throw new ApiError(500, 'The server sent no CSRF token.')
    return body.token
  }

  get<T>(url: string): Promise<T> {
    return this.request<T>('GET', url)
  }

  post<T>(url: string, body?: unknown): Promise<T> {
    return this.request<T>('POST', url, body)
  }

  put<T>(url: string, body?: unknown): Promise<T> {
    return this.request<T>('PUT', url, body)
  }

  patch<T>(url: string, body?: unknown): Promise<T> {
    return this.request<T>('PATCH', url, body)
  }

  delete<T = void>(url: string): Promise<T> {
    return this.request<T>('DELETE', url)
  }

  /** Sends a request; on a write rejected for its CSRF token, refetches the token once and retries. */
  async request<T>(method: HttpMethod, url: string, body?: unknown): Promise<T> {
    if (!UNSAFE.has(method)) return this.send<T>(method, url, body)
    const token = await this.csrf.get()
    try {
      return await this.send<T>(method, url, body, token)
    } catch (error) {
      if (!(error instanceof ApiError) || !error.isCsrf) throw error
      const fresh = await this.csrf.refresh()
      return this.send<T>(method, url, body, fresh)
    }
  }

  private async send<T>(method: HttpMethod, url: string, body?: unknown, csrfToken?: string): Promise<T> {
    const headers: Record<string, string> = { accept: 'application/json' }
    if (body !== undefined) headers['content-type'] = 'application/json'
    if (csrfToken !== undefined) headers['x-csrf-token'] = csrfToken

    let response: Response
    try {
      response = await this.fetchFn(url, {
        method,
        headers,
        credentials: 'same-origin',
        body: body === undefined ? undefined : JSON.stringify(body),
      })
    } catch {
      throw new ApiError(0, FALLBACK_MESSAGES[0])
    }

    const parsed = await readBody(response)
    if (!response.ok) {
      const error = toApiError(response.status, parsed)
      if (error.status === 401) this.onUnauthorized?.(error, url)
      throw error
    }
    return parsed as T
  }
}

async function readBody(response: Response): Promise<unknown> {
  if (response.status === 204) return undefined
  const text = await response.text()
  if (!text) return undefined
  try {
    return JSON.parse(text) as unknown
  } catch {
    return text
  }
}

/** The app's single client. */
export const api = new ApiClient()
