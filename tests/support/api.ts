import { inject } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { createApp, type AppOptions, type PriorsmithApp } from '../../server/app'
import { createDb, type Db } from '../../server/db/knex'
import { DEMO_PASSWORD } from '../../seeds/demo'

export interface ApiHarness {
  db: Db
  built: PriorsmithApp
  close(): Promise<void>
}

/** The real app on the suite's PostgreSQL test database (or the database given). */
export function startApi(options: Partial<Pick<AppOptions, 'signInLimitPerWindow' | 'kickMail' | 'mailFake' | 'timeZone' | 'databaseUrl'>> = {}): ApiHarness {
  const databaseUrl = options.databaseUrl ?? inject('databaseUrl')
  const db = createDb(databaseUrl)
  const built = createApp({
    db, databaseUrl, sessionSecret: 'test-secret', publicUrl: 'http://localhost:3000', ...options,
    signInLimitPerWindow: options.signInLimitPerWindow ?? 1000,
    holdRefusedSignInMs: 0,
  })
  return {
    db,
    built,
    close: async () => {
      await built.close()
      await db.destroy()
    },
  }
}

/** A cookie-keeping client that fetches a CSRF token and sends it on every write. */
export class Client {
  readonly agent: TestAgent
  token = ''
  /** `address` poses as that client address (the app trusts X-Forwarded-For from loopback, as behind a local proxy). */
  constructor(h: ApiHarness, address?: string) {
    this.agent = request.agent(h.built.app)
    if (address) this.agent.set('X-Forwarded-For', address)
  }
  async csrf(): Promise<string> {
    const res = await this.agent.get('/api/auth/csrf').expect(200)
    this.token = res.body.token
    return this.token
  }
  async signIn(email: string, password = DEMO_PASSWORD) {
    await this.csrf()
    const res = await this.agent.post('/api/auth/sign-in').set('x-csrf-token', this.token).send({ email, password })
    if (res.status === 200) await this.csrf()
    return res
  }
  get(url: string) {
    return this.agent.get(url)
  }
  post(url: string, body?: object) {
    return this.agent.post(url).set('x-csrf-token', this.token).send(body)
  }
  patch(url: string, body?: object) {
    return this.agent.patch(url).set('x-csrf-token', this.token).send(body)
  }
  delete(url: string) {
    return this.agent.delete(url).set('x-csrf-token', this.token)
  }
  put(url: string, body?: object) {
    return this.agent.put(url).set('x-csrf-token', this.token).send(body)
  }
}

export async function signedIn(h: ApiHarness, email: string): Promise<Client> {
  const c = new Client(h)
  const res = await c.signIn(email)
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  return c
}

/** Standard normal 0.75 quantile (from memory; 17 digits). */
export const Z75 = 0.674489750196081743
/** Standard normal 0.99 quantile (scipy.special.ndtri(0.99)): where the fit reads the plausible bounds. */
export const Z99 = 2.326347874040841

/**
 * A quantile answer whose quartiles are those of N(mu, sigma) and whose bounds are its 1 % and 99 % points (how the fit
 * reads them): least squares on the CDF recovers N(mu, sigma) exactly.
 */
export const normalQuantileAnswer = (mu: number, sigma: number) => ({
  method: 'quantile', lower: mu - Z99 * sigma, upper: mu + Z99 * sigma,
  points: [{ value: mu - sigma * Z75, prob: 0.25 }, { value: mu, prob: 0.5 }, { value: mu + sigma * Z75, prob: 0.75 }],
  chosenFamily: 'normal', rationale: 'Night-flow records of the eight pilot districts.',
})

/** Creates round 1 asking the quantities by the quantile method, invites the experts and opens it; returns its id. */
export async function openQuantileRound(analyst: Client, studyId: number, quantityIds: number[], expertEmails: string[]): Promise<number> {
  const roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'Round 1', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 24 * 3600e3).toISOString(),
    items: quantityIds.map((quantityId) => ({ quantityId, method: 'quantile' })),
  }).expect(201)).body.id as number
  for (const email of expertEmails) await analyst.post(`/api/rounds/${roundId}/invitations`, { email, name: 'Panel member' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
  return roundId
}
