import type { AddressInfo } from 'node:net'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ensureCluster, ensureDatabase, stopCluster } from '../../scripts/lib/postgres.mjs'
import { seedDemo } from '../../seeds/demo'
import { createApp, type PriorsmithApp } from '../../server/app'
import { createDb, type Db } from '../../server/db/knex'

// A cluster of its own, so stopping it does not disturb the other suites running at the same time.
const root = path.resolve(import.meta.dirname, '../..')
const env = { ...process.env, PG_CLUSTER_DIR: `/tmp/priorsmith-fault-${process.pid}`, PGPORT_LOCAL: String(55000 + (process.pid % 1000)) }
let db: Db
let built: PriorsmithApp
let base: string
let server: import('node:http').Server

async function json(url: string, init: RequestInit = {}) {
  const res = await fetch(`${base}${url}`, init)
  return { status: res.status, body: await res.json().catch(() => null), headers: res.headers }
}

beforeAll(async () => {
  const cluster = ensureCluster(root, { env, fast: true })
  const url = ensureDatabase(cluster, 'priorsmith_faults', { recreate: true })
  db = createDb(url)
  await db.migrate.latest()
  await seedDemo(db)
  built = createApp({ db, databaseUrl: url, sessionSecret: 'faults', signInLimitPerWindow: 1000 })
  server = built.app.listen(0, '127.0.0.1')
  await new Promise((r) => server.once('listening', r))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
}, 60_000)
afterAll(async () => {
  server?.close()
  await built?.close().catch(() => {})
  await db?.destroy()
  stopCluster(root, { env })
})

describe('PostgreSQL restarted under a running app', () => {
  it('fails requests cleanly while it is down and serves again after it returns, with no app restart and the session kept', async () => {
    const csrf = await json('/api/auth/csrf')
    let cookie = (csrf.headers.get('set-cookie') ?? '').split(';')[0]
    const signIn = await fetch(`${base}/api/auth/sign-in`, {
      method: 'POST', headers: { cookie, 'x-csrf-token': csrf.body.token, 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'analyst@kestrel.example', password: 'priorsmith-demo' }),
    })
    expect(signIn.status).toBe(200)
    cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0]
    expect((await json('/api/studies', { headers: { cookie } })).status).toBe(200)

    stopCluster(root, { env })
    const health = await json('/api/health')
    expect(health.status).toBe(503)
    expect(health.body).toEqual({ ok: false, db: false })
    const down = await json('/api/auth/me', { headers: { cookie } })
    expect(down.status).toBeGreaterThanOrEqual(500)
    expect(down.body.error.message).toEqual(expect.any(String))

    ensureCluster(root, { env, fast: true })
    let back = await json('/api/studies', { headers: { cookie } })
    for (let i = 0; i < 20 && back.status !== 200; i++) {
      await new Promise((r) => setTimeout(r, 250))
      back = await json('/api/studies', { headers: { cookie } })
    }
    expect(back.status).toBe(200)
    expect(back.body.map((s: { title: string }) => s.title)).toContain('Kestrel Valley Water Board: cast-iron mains renewal')
    expect((await json('/api/health')).body).toEqual({ ok: true, db: true })
  }, 60_000)
})
