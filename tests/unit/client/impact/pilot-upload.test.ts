import { describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/client'
import { postMultipart } from '@/api/pilot'

function replying(status: number, body: unknown) {
  const calls: RequestInit[] = []
  const fn = vi.fn(async (_url: RequestInfo | URL, init: RequestInit = {}) => {
    calls.push(init)
    return new Response(JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } })
  })
  return { fetch: fn as unknown as typeof fetch, calls }
}
const csrf = { get: async () => 'tok', refresh: async () => 'tok2' }

describe('pilot-data upload request', () => {
  it('sends the mapping fields and the file as multipart form data with the CSRF header', async () => {
    const { fetch, calls } = replying(201, { id: 5, version: 2 })
    const file = new File(['district,bursts,exposure\nA,3,1.2\n'], 'burst-logs.csv', { type: 'text/csv' })
    const out = await postMultipart<{ version: number }>('/api/studies/1/datasets', { quantityId: 1, name: 'Burst logs', model: 'poisson', delimiter: ',', countColumn: 'bursts', exposureColumn: 'exposure', sigma: undefined }, file, file.name, csrf, fetch)
    expect(out.version).toBe(2)
    const form = calls[0].body as FormData
    expect((calls[0].headers as Record<string, string>)['x-csrf-token']).toBe('tok')
    expect([...form.keys()]).toEqual(['quantityId', 'name', 'model', 'delimiter', 'countColumn', 'exposureColumn', 'file'])
    expect(form.get('quantityId')).toBe('1')
    expect((form.get('file') as File).name).toBe('burst-logs.csv')
  })

  it("keeps the server's located message for the file field", async () => {
    const { fetch } = replying(400, { error: { message: 'The file does not fit the chosen model', fields: { file: 'Line 3, column "bursts": expected a number, found "three"' } } })
    const error = await postMultipart('/api/studies/1/datasets', {}, new Blob(['x']), 'x.csv', csrf, fetch).catch((e: unknown) => e)
    expect(error).toBeInstanceOf(ApiError)
    expect((error as ApiError).fields.file).toBe('Line 3, column "bursts": expected a number, found "three"')
  })
})
