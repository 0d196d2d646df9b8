import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { listRoutes } from '../../server/http/routes'
import { Client, signedIn } from '../support/api'
import { fill, MATRIX, matrixFixture, ROLES, send, type MatrixFixture } from '../support/route-matrix'

let f: MatrixFixture
beforeAll(async () => {
  f = await matrixFixture()
}, 60_000)
afterAll(async () => {
  await f.h.close()
})

describe('authorization matrix', () => {
  it('has an entry for every route the app serves, and no stale entries', () => {
    const served = listRoutes(f.h.built.app).map((r) => `${r.method} ${r.path}`).sort()
    expect(served).toEqual(Object.keys(MATRIX).sort())
  })

  const routes = Object.entries(MATRIX).filter(([k]) => k !== 'POST /api/auth/sign-out' && k !== 'POST /api/auth/sign-in')
  it.each(routes)('%s', async (key, rule) => {
    const [method, path] = key.split(' ')
    const url = fill(path, f.params)
    const seen: Record<string, number> = {}
    for (const role of ROLES) {
      const res = await send(f.clients[role], method, url)
      seen[role] = res.status
      expect(res.status, `${role} → ${res.status} ${JSON.stringify(res.body)}`).toBeLessThan(500)
      const allowed = rule === 'public' || (rule === 'signed-in' ? role !== 'anon' : rule.includes(role))
      if (allowed) {
        expect([401, 403], `${role} should pass: ${JSON.stringify(res.body)}`).not.toContain(res.status)
      } else if (role === 'anon') {
        expect(res.status).toBe(401)
      } else {
        expect(res.status, `${role} should be refused`).toBe(403)
      }
    }
  })

  it('signs out any signed-in role and refuses sign-out when not signed in', async () => {
    const anon = new Client(f.h)
    await anon.csrf()
    expect((await anon.post('/api/auth/sign-out')).status).toBe(401)
    const someone = await signedIn(f.h, 'expert2@kestrel.example')
    expect((await someone.post('/api/auth/sign-out')).status).toBe(204)
  })
})
