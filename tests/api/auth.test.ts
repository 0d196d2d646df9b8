import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { verifyAuditChain } from '../../server/services/audit'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
beforeAll(() => {
  h = startApi()
})
afterAll(async () => {
  await h.close()
})

describe('GET /api/health', () => {
  it('reports the database as reachable', async () => {
    const res = await new Client(h).get('/api/health').expect(200)
    expect(res.body).toEqual({ ok: true, db: true })
  })
})

describe('sign-in', () => {
  it('signs in a demo analyst, keeps the session, and returns the user without its password hash', async () => {
    const c = new Client(h)
    const res = await c.signIn('analyst@kestrel.example')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ email: 'analyst@kestrel.example', role: 'analyst', displayName: 'Priya Natarajan', disabled: false })
    expect(res.body.passwordHash).toBeUndefined()
    expect(res.body.password_hash).toBeUndefined()
    const me = await c.get('/api/auth/me').expect(200)
    expect(me.body.email).toBe('analyst@kestrel.example')
  })

  it('accepts the e-mail in any letter case', async () => {
    const res = await new Client(h).signIn('Analyst@Kestrel.Example')
    expect(res.status).toBe(200)
  })

  it('refuses a wrong password with 401 and the same message as an unknown e-mail', async () => {
    const wrong = await new Client(h).signIn('analyst@kestrel.example', 'not-the-password')
    const unknown = await new Client(h).signIn('nobody@kestrel.example', 'not-the-password')
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body).toEqual({ error: { message: 'E-mail or password is incorrect' } })
    expect(unknown.body).toEqual(wrong.body)
  })

  it('answers 400 with field errors for a bad body', async () => {
    const c = new Client(h)
    await c.csrf()
    const res = await c.post('/api/auth/sign-in', { email: 'not-an-email', password: '' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ email: 'Enter a valid e-mail address', password: 'Enter your password' })
  })

  it('answers 400 when the body is not an object', async () => {
    const c = new Client(h)
    await c.csrf()
    const res = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.token).set('content-type', 'application/json').send('[1,2]')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe('The request body must be a JSON object')
  })

  it('refuses a state-changing request without the CSRF token', async () => {
    const c = new Client(h)
    const res = await c.agent.post('/api/auth/sign-in').send({ email: 'analyst@kestrel.example', password: 'priorsmith-demo' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/CSRF/)
  })

  it('stores no session before sign-in and regenerates the session id on every sign-in (no session fixation)', async () => {
    const c = new Client(h)
    const pre = await c.agent.get('/api/auth/csrf')
    expect(String(pre.headers['set-cookie'] ?? '')).not.toMatch(/priorsmith\.sid=/)
    c.token = pre.body.token
    const res = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.token).send({ email: 'expert1@kestrel.example', password: 'priorsmith-demo' })
    const first = String(res.headers['set-cookie'] ?? '').match(/priorsmith\.sid=([^;]+)/)?.[1]
    expect(first).toBeTruthy()
    // Signing in again over an existing session (one an attacker could have planted) gives a new id.
    await c.csrf()
    const again = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.token).send({ email: 'expert2@kestrel.example', password: 'priorsmith-demo' })
    const second = String(again.headers['set-cookie'] ?? '').match(/priorsmith\.sid=([^;]+)/)?.[1]
    expect(second).toBeTruthy()
    expect(second).not.toBe(first)
  })

  it('sets an httpOnly, SameSite=Lax session cookie at sign-in and an httpOnly, SameSite=Strict token cookie before it', async () => {
    const c = new Client(h)
    const pre = String((await c.agent.get('/api/auth/csrf')).headers['set-cookie'])
    expect(pre).not.toMatch(/priorsmith\.sid=/)
    expect(pre).toMatch(/priorsmith\.csrf=[^;]+; Path=\/api; HttpOnly; SameSite=Strict/)
    const token = await c.csrf()
    const res = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', token).send({ email: 'expert1@kestrel.example', password: 'priorsmith-demo' })
    const cookie = String(res.headers['set-cookie'])
    expect(cookie).toMatch(/priorsmith\.sid=/)
    expect(cookie).toMatch(/HttpOnly/)
    expect(cookie).toMatch(/SameSite=Lax/)
  })

  it('signs out: the session is destroyed server-side and /me answers 401', async () => {
    const c = await signedIn(h, 'reviewer@kestrel.example')
    const me0 = await c.get('/api/auth/me').expect(200)
    const sessionsOf = () => h.db('session').whereRaw(`(sess->'passport'->>'user')::int = ?`, [me0.body.id])
    const before = (await sessionsOf()).length
    expect(before).toBeGreaterThanOrEqual(1)
    await c.post('/api/auth/sign-out').expect(204)
    expect(await sessionsOf()).toHaveLength(before - 1)
    const me = await c.get('/api/auth/me')
    expect(me.status).toBe(401)
    expect(me.body.error.message).toBe('Sign in to continue')
  })

  it('does not sign in a disabled account', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const created = await admin.post('/api/users', { email: 'temp.disabled@kestrel.example', displayName: 'Temp Person', role: 'expert', password: 'long-enough-1' }).expect(201)
    await admin.patch(`/api/users/${created.body.id}`, { disabled: true }).expect(200)
    const res = await new Client(h).signIn('temp.disabled@kestrel.example', 'long-enough-1')
    expect(res.status).toBe(401)
  })

  it('records sign-ins in the hash-chained audit log, and the chain verifies', async () => {
    await signedIn(h, 'expert2@kestrel.example')
    const row = await h.db('audit_events').where({ action: 'auth.sign-in' }).orderBy('id', 'desc').first()
    expect(row.hash).toMatch(/^[0-9a-f]{64}$/)
    const chain = await verifyAuditChain(h.db)
    expect(chain.intact).toBe(true)
    expect(chain.events).toBeGreaterThan(1)
  })
})

describe('sign-in rate limit', () => {
  it('answers 429 with a clear message once the limit is passed', async () => {
    const limited = startApi({ signInLimitPerWindow: 3 })
    try {
      const statuses: number[] = []
      for (let i = 0; i < 4; i++) statuses.push((await new Client(limited).signIn('expert3@kestrel.example', 'wrong-password')).status)
      expect(statuses).toEqual([401, 401, 401, 429])
      const last = await new Client(limited).signIn('expert3@kestrel.example', 'wrong-password')
      expect(last.body.error.message).toBe('Too many sign-in attempts. Wait 15 minutes and try again.')
    } finally {
      await limited.close()
    }
  })
})

describe('security headers', () => {
  it('sends helmet headers and a content security policy without third-party origins', async () => {
    const res = await new Client(h).get('/api/health')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN')
    expect(res.headers['content-security-policy']).toContain("default-src 'self'")
    expect(res.headers['content-security-policy']).not.toContain('upgrade-insecure-requests')
    expect(res.headers['x-powered-by']).toBeUndefined()
  })

  it('answers unknown API routes with a JSON 404', async () => {
    const res = await new Client(h).get('/api/no-such-thing')
    expect(res.status).toBe(404)
    expect(res.body).toEqual({ error: { message: 'No such API route' } })
  })
})
