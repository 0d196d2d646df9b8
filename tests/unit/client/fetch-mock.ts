import { vi } from 'vitest'
import type { User } from '@shared/types'

export interface RecordedCall {
  method: string
  url: string
  headers: Record<string, string>
  body: unknown
  credentials: RequestCredentials | undefined
}

export type Reply = { status: number; body?: unknown; raw?: string }
export type Route = (call: RecordedCall) => Reply | undefined

/**
 * A fetch stand-in answering from `route` (first matching reply wins; unmatched → 404 error body)
 * and recording every call.
 */
export function mockFetch(route: Route) {
  const calls: RecordedCall[] = []
  const fetchFn = vi.fn(async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const headers: Record<string, string> = {}
    for (const [k, v] of Object.entries((init.headers ?? {}) as Record<string, string>)) headers[k.toLowerCase()] = v
    const call: RecordedCall = {
      method: (init.method ?? 'GET').toUpperCase(),
      url: String(input),
      headers,
      body: typeof init.body === 'string' ? JSON.parse(init.body) : undefined,
      credentials: init.credentials,
    }
    calls.push(call)
    const reply = route(call) ?? { status: 404, body: { error: { message: 'No such API route' } } }
    const text = reply.raw ?? (reply.body === undefined ? '' : JSON.stringify(reply.body))
    return new Response(reply.status === 204 ? null : text, {
      status: reply.status,
      headers: { 'content-type': reply.raw ? 'text/html' : 'application/json' },
    })
  })
  return { fetch: fetchFn as unknown as typeof fetch, calls }
}

export const adminUser: User = {
  id: 1,
  email: 'admin@kestrel.example',
  displayName: 'Ada Admin',
  role: 'admin',
  disabled: false,
  createdAt: '2026-01-05T10:00:00.000Z',
  updatedAt: '2026-01-05T10:00:00.000Z',
}

export const expertUser: User = { ...adminUser, id: 3, email: 'expert1@kestrel.example', displayName: 'Erin Expert', role: 'expert' }
