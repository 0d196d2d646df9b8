// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { ApiClient, ApiError, toApiError } from '@/api/client'
import { mockFetch } from './fetch-mock'

describe('toApiError', () => {
  it('maps the error body to status, message and fields', () => {
    const error = toApiError(400, { error: { message: 'Some values are not valid', fields: { email: 'Enter a valid e-mail address' } } })
    expect(error).toBeInstanceOf(ApiError)
    expect(error.status).toBe(400)
    expect(error.message).toBe('Some values are not valid')
    expect(error.fields).toEqual({ email: 'Enter a valid e-mail address' })
  })

  it('falls back to a readable message when the body is not an API error', () => {
    const error = toApiError(429, '<html>busy</html>')
    expect(error.message).toBe('Too many attempts. Wait a moment and try again.')
    expect(error.fields).toEqual({})
    expect(toApiError(502, null).message).toBe('The server answered with an error (502).')
  })
})

describe('ApiClient', () => {
  it('GETs JSON with same-origin credentials and no CSRF header', async () => {
    const { fetch, calls } = mockFetch((c) => (c.url === '/api/health' ? { status: 200, body: { ok: true, db: true } } : undefined))
    const client = new ApiClient({ fetch })
    await expect(client.get('/api/health')).resolves.toEqual({ ok: true, db: true })
    expect(calls).toHaveLength(1)
    expect(calls[0].credentials).toBe('same-origin')
    expect(calls[0].headers['x-csrf-token']).toBeUndefined()
  })

  it('fetches the CSRF token once and sends it with every write', async () => {
    const { fetch, calls } = mockFetch((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 'tok-1' } }
      if (c.url === '/api/users' && c.method === 'POST') return { status: 201, body: { id: 9 } }
      if (c.url === '/api/users/9' && c.method === 'PATCH') return { status: 200, body: { id: 9, disabled: true } }
    })
    const client = new ApiClient({ fetch })
    await client.post('/api/users', { email: 'a@b.example' })
    await client.patch('/api/users/9', { disabled: true })
    expect(calls.map((c) => `${c.method} ${c.url}`)).toEqual(['GET /api/auth/csrf', 'POST /api/users', 'PATCH /api/users/9'])
    expect(calls[1].headers['x-csrf-token']).toBe('tok-1')
    expect(calls[1].headers['content-type']).toBe('application/json')
    expect(calls[1].body).toEqual({ email: 'a@b.example' })
    expect(calls[2].headers['x-csrf-token']).toBe('tok-1')
  })

  it('throws ApiError with the field errors of a 400', async () => {
    const { fetch } = mockFetch((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 't' } }
      return { status: 400, body: { error: { message: 'Some values are not valid', fields: { password: 'Use at least 10 characters' } } } }
    })
    const client = new ApiClient({ fetch })
    const error = await client.post('/api/users', {}).catch((e: unknown) => e)
    expect(error).toBeInstanceOf(ApiError)
    expect((error as ApiError).status).toBe(400)
    expect((error as ApiError).fields).toEqual({ password: 'Use at least 10 characters' })
  })

  it('refetches the token and retries once when the server rejects it as CSRF', async () => {
    let tokens = 0
    const { fetch, calls } = mockFetch((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: `tok-${++tokens}` } }
      if (c.headers['x-csrf-token'] === 'tok-1') return { status: 403, body: { error: { message: 'Invalid CSRF token' } } }
      return { status: 204 }
    })
    const client = new ApiClient({ fetch })
    await expect(client.post('/api/auth/sign-out')).resolves.toBeUndefined()
    expect(calls.map((c) => `${c.method} ${c.url} ${c.headers['x-csrf-token'] ?? ''}`.trim())).toEqual([
      'GET /api/auth/csrf',
      'POST /api/auth/sign-out tok-1',
      'GET /api/auth/csrf',
      'POST /api/auth/sign-out tok-2',
    ])
  })

  it('does not retry a 403 that is about the role, and retries a CSRF rejection only once', async () => {
    const role = mockFetch((c) =>
      c.url === '/api/auth/csrf' ? { status: 200, body: { token: 't' } } : { status: 403, body: { error: { message: 'Only admins can do this' } } },
    )
    const e1 = await new ApiClient({ fetch: role.fetch }).post('/api/users', {}).catch((e: unknown) => e)
    expect((e1 as ApiError).message).toBe('Only admins can do this')
    expect(role.calls.filter((c) => c.method === 'POST')).toHaveLength(1)

    const csrf = mockFetch((c) =>
      c.url === '/api/auth/csrf' ? { status: 200, body: { token: 't' } } : { status: 403, body: { error: { message: 'Invalid CSRF token' } } },
    )
    const e2 = await new ApiClient({ fetch: csrf.fetch }).post('/api/users', {}).catch((e: unknown) => e)
    expect((e2 as ApiError).isCsrf).toBe(true)
    expect(csrf.calls.filter((c) => c.method === 'POST')).toHaveLength(2)
  })

  it('reports a network failure as status 0 and tells the 401 listener about ended sessions', async () => {
    const offline = new ApiClient({ fetch: (() => Promise.reject(new TypeError('Failed to fetch'))) as typeof fetch })
    const e = await offline.get('/api/studies').catch((x: unknown) => x)
    expect((e as ApiError).status).toBe(0)
    expect((e as ApiError).message).toMatch(/could not be reached/)

    const { fetch } = mockFetch(() => ({ status: 401, body: { error: { message: 'Sign in to continue' } } }))
    const client = new ApiClient({ fetch })
    const seen: string[] = []
    client.onUnauthorized = (error, url) => seen.push(`${url}: ${error.message}`)
    await client.get('/api/studies').catch(() => undefined)
    expect(seen).toEqual(['/api/studies: Sign in to continue'])
  })
})
