import { createHash } from 'node:crypto'
import request from 'supertest'
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest'
import * as passwords from '../../server/auth/passwords'
import { CEILING_FACTOR } from '../../server/auth/sign-in-guard'
import { Client, startApi, type ApiHarness } from '../support/api'

const LIMIT = 3
const CEILING = LIMIT * CEILING_FACTOR
let h: ApiHarness
beforeAll(() => {
  h = startApi({ signInLimitPerWindow: LIMIT })
})
afterAll(async () => {
  await h.close()
})
afterEach(() => {
  vi.restoreAllMocks()
})

/** A client posing as its own address (documentation range, RFC 5737), so each test starts with clean counters. */
let nextHost = 1
const freshAddress = () => `198.51.100.${nextHost++}`

async function signInFrom(c: Client, body: object) {
  if (!c.token) await c.csrf()
  return c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.token).send(body)
}

const count = async (table: string) => Number((await h.db(table).count({ n: '*' }))[0].n)

describe('a flood of failed sign-ins from one address', () => {
  it('meets 429s once the address has failed its ceiling, and adds no audit event per failure', async () => {
    const flooder = new Client(h, freshAddress())
    const auditBefore = await count('audit_events')
    const statuses: number[] = []
    for (let batch = 0; batch < 5; batch++) {
      const res = await Promise.all(Array.from({ length: 8 }, (_, i) => signInFrom(flooder, { email: `invented-${batch}-${i}@flood.example`, password: 'guess-guess' })))
      statuses.push(...res.map((r) => r.status))
    }
    expect(statuses.filter((s) => s === 401)).toHaveLength(CEILING)
    expect(statuses.filter((s) => s === 429)).toHaveLength(40 - CEILING)
    expect(await count('audit_events')).toBe(auditBefore)
    // The failures are counted, per hour, address and e-mail, in the bounded log beside the chain.
    const logged = await h.db('sign_in_failures').where({ address: '198.51.100.1' }).sum({ n: 'attempts' })
    expect(Number(logged[0].n)).toBe(CEILING)
  })

  it('answers a refused address from memory: further attempts write nothing to the database', async () => {
    const address = freshAddress()
    const flooder = new Client(h, address)
    for (let i = 0; i < CEILING + 1; i++) await signInFrom(flooder, { email: `remembered-${i}@flood.example`, password: 'guess-guess' })
    const key = 'address:' + createHash('sha256').update(address).digest('hex')
    const hitsNow = async () => Number((await h.db('rate_limit_hits').where({ key }).first())?.hits)
    expect(await hitsNow()).toBe(CEILING + 1)
    const statuses = await Promise.all(Array.from({ length: 16 }, (_, i) => signInFrom(flooder, { email: `remembered-more-${i}@flood.example`, password: 'guess-guess' }).then((r) => r.status)))
    expect(statuses).toEqual(Array(16).fill(429))
    // Without the memory each refused attempt was one more upsert of the counter (CEILING + 17 here).
    expect(await hitsNow()).toBe(CEILING + 1)
    // The refusal comes before sessions and CSRF: a bare request from the refused address, with no session cookie and
    // no token, is answered 429 (not 403), so a flood from it costs no session look-up either.
    const bare = await request(h.built.app).post('/api/auth/sign-in').set('X-Forwarded-For', address).send({ email: 'bare@flood.example', password: 'guess-guess' })
    expect(bare.status).toBe(429)
    expect(bare.headers['set-cookie']).toBeUndefined()
    expect(Number(bare.headers['retry-after'])).toBeGreaterThan(0)
  })

  it('a second address is not held back by the first one’s flood', async () => {
    const res = await new Client(h, freshAddress()).signIn('expert2@kestrel.example')
    expect(res.status).toBe(200)
  })

  it('limits one account guessed from many addresses', async () => {
    const statuses: number[] = []
    // An address no other test signs in with: the counters live in the database every test file shares.
    for (let i = 0; i < CEILING + 2; i++) statuses.push((await new Client(h, freshAddress()).signIn('guessed.account@kestrel.example', 'wrong-password')).status)
    expect(statuses.slice(0, CEILING).every((s) => s === 401)).toBe(true)
    expect(statuses.slice(CEILING)).toEqual([429, 429])
  })
})

describe('spellings of one address', () => {
  it('count as one address once locked out: spaces, tabs, no-break and ideographic spaces, capitals, full-width letters', async () => {
    const c = new Client(h, freshAddress())
    for (let i = 0; i < LIMIT; i++) expect((await c.signIn('reviewer@kestrel.example', 'wrong-password')).status).toBe(401)
    const spellings = [' reviewer@kestrel.example ', '\treviewer@kestrel.example', '\u00a0reviewer@kestrel.example', 'reviewer@kestrel.example\u3000',
      'REVIEWER@kestrel.example', '\u200breviewer@kestrel.example', 'ｒｅｖｉｅｗｅｒ@kestrel.example']
    for (const email of spellings) {
      const res = await signInFrom(c, { email, password: 'priorsmith-demo' })
      expect(res.status, JSON.stringify(email)).toBe(429)
    }
  })

  it('each spelling signs in to the one account when not locked out', async () => {
    for (const email of [' admin@kestrel.example\u00a0', '\u3000ADMIN@kestrel.example', 'ａｄｍｉｎ@kestrel.example']) {
      const res = await new Client(h, freshAddress()).signIn(email)
      expect(res.status, JSON.stringify(email)).toBe(200)
      expect(res.body.email).toBe('admin@kestrel.example')
    }
  })
})

describe('unknown accounts', () => {
  it('are checked against a bcrypt hash too, so the refusal takes as long as a wrong password', async () => {
    const compare = vi.spyOn(passwords, 'checkPassword')
    const unknown = await new Client(h, freshAddress()).signIn('no-such-person@kestrel.example', 'some-password-1')
    expect(unknown.status).toBe(401)
    expect(compare).toHaveBeenCalledTimes(1)
    expect(compare.mock.calls[0][0]).toBe('some-password-1')
    expect(String(compare.mock.calls[0][1])).toMatch(/^\$2[aby]\$10\$/)
  })
})

describe('prototype keys at the top of a body', () => {
  it('sign-in with a __proto__ key answers 400 naming it', async () => {
    const c = new Client(h, freshAddress())
    await c.csrf()
    const res = await c.agent.post('/api/auth/sign-in').set('x-csrf-token', c.token).set('Content-Type', 'application/json')
      .send('{"__proto__": {"isAdmin": true}, "email": "admin@kestrel.example", "password": "priorsmith-demo"}')
    expect(res.status).toBe(400)
    expect(Object.entries(res.body.error.fields)).toEqual([['__proto__', 'This field name is not accepted']])
  })

  it('invitation acceptance with a __proto__ key answers 400 naming it', async () => {
    const c = new Client(h, freshAddress())
    await c.csrf()
    const res = await c.agent.post(`/api/invitations/${'x'.repeat(43)}/accept`).set('x-csrf-token', c.token).set('Content-Type', 'application/json')
      .send('{"__proto__": {"role": "admin"}, "name": "Mara Lindqvist", "password": "rivers-and-pipes-7"}')
    expect(res.status).toBe(400)
    expect(Object.entries(res.body.error.fields)).toEqual([['__proto__', 'This field name is not accepted']])
  })
})
