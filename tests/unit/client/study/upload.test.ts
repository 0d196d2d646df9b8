import { describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/client'
import { uploadFile } from '@/api/upload'

function fetchReplying(...replies: { status: number; body: unknown }[]) {
  const calls: { url: string; init: RequestInit }[] = []
  const fn = vi.fn(async (url: RequestInfo | URL, init: RequestInit = {}) => {
    calls.push({ url: String(url), init })
    const reply = replies.shift()!
    return new Response(JSON.stringify(reply.body), { status: reply.status, headers: { 'content-type': 'application/json' } })
  })
  return { fetch: fn as unknown as typeof fetch, calls }
}

const csrf = (tokens: string[]) => ({ get: vi.fn(async () => tokens[0]!), refresh: vi.fn(async () => tokens[1]!) })

describe('uploadFile', () => {
  it('posts the file as multipart form data with the CSRF header', async () => {
    const { fetch, calls } = fetchReplying({ status: 201, body: { id: 9, filename: 'a.csv' } })
    const file = new Blob(['year,bursts\n2021,12\n'], { type: 'text/csv' })
    const info = await uploadFile<{ id: number }>('/api/quantities/7/files', file, 'a.csv', csrf(['tok']), fetch)
    expect(info.id).toBe(9)
    const { url, init } = calls[0]!
    expect(url).toBe('/api/quantities/7/files')
    expect(init.method).toBe('POST')
    expect((init.headers as Record<string, string>)['x-csrf-token']).toBe('tok')
    expect((init.headers as Record<string, string>)['content-type']).toBeUndefined() // the browser sets the boundary
    const form = init.body as FormData
    expect((form.get('file') as File).name).toBe('a.csv')
  })

  it("turns the server's refusal into an ApiError with its message", async () => {
    const { fetch } = fetchReplying({ status: 400, body: { error: { message: 'Only PDF, CSV, PNG image, JPEG image files are accepted', fields: { file: 'Upload a PDF, CSV, PNG or JPEG file' } } } })
    const error = await uploadFile('/api/quantities/7/files', new Blob(['x']), 'x.exe', csrf(['tok']), fetch).catch((e: unknown) => e)
    expect(error).toBeInstanceOf(ApiError)
    expect((error as ApiError).status).toBe(400)
    expect((error as ApiError).message).toBe('Only PDF, CSV, PNG image, JPEG image files are accepted')
  })

  it('refreshes a rejected CSRF token once and retries', async () => {
    const { fetch, calls } = fetchReplying(
      { status: 403, body: { error: { message: 'Invalid or missing CSRF token; reload the page and try again' } } },
      { status: 201, body: { id: 3 } },
    )
    const provider = csrf(['old', 'new'])
    await uploadFile('/api/quantities/7/files', new Blob(['%PDF-']), 'a.pdf', provider, fetch)
    expect(provider.refresh).toHaveBeenCalledOnce()
    expect(calls.map((c) => (c.init.headers as Record<string, string>)['x-csrf-token'])).toEqual(['old', 'new'])
  })
})
