import { rmSync } from 'node:fs'
import { createServer, type Server } from 'node:net'
import path from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { ensureCluster, pgSettings, portInUse, stopCluster } from '../../scripts/lib/postgres.mjs'

// Two checkouts on one machine, played with cluster folders and ports of this suite's own (never the shared test cluster):
// "first" is the checkout whose cluster already runs; "second" is a new clone trying to start on the same port.
const root = path.resolve(import.meta.dirname, '../..')
const port = 57000 + (process.pid % 1000)
const dir = (name: string) => `/tmp/priorsmith-${name}-checkout-${process.pid}`
const first = { ...process.env, PG_CLUSTER_DIR: dir('first'), PGPORT_LOCAL: String(port) }
const second = { ...process.env, PG_CLUSTER_DIR: dir('second'), PGPORT_LOCAL: String(port) }
let blocker: Server | undefined

afterAll(async () => {
  await new Promise((r) => (blocker ? blocker.close(r) : r(null)))
  for (const env of [first, second, { ...second, PGPORT_LOCAL: String(port + 1) }]) stopCluster(root, { env })
  for (const name of ['first', 'second']) rmSync(dir(name), { recursive: true, force: true })
}, 60_000)

describe('a second checkout whose PostgreSQL port is held', () => {
  it('stops with a message naming the port, the other cluster’s folder and both ways out, leaving the other cluster running', () => {
    const running = ensureCluster(root, { env: first, fast: true })
    expect(running.port).toBe(port)

    let message = ''
    try {
      ensureCluster(root, { env: second, fast: true })
    } catch (err) {
      message = (err as Error).message
    }
    expect(message).toContain(`127.0.0.1:${port} is already held by another PostgreSQL cluster`)
    expect(message).toContain(`data in ${pgSettings(root, first).dataDir}`)
    expect(message).toContain('probably another Priorsmith checkout')
    expect(message).toContain('`npm run db:stop`')
    expect(message).toMatch(new RegExp(`PGPORT_LOCAL=(\\d+) npm start`))
    const suggested = Number(/PGPORT_LOCAL=(\d+) npm start/.exec(message)![1])
    expect(suggested).toBeGreaterThan(port)
    expect(portInUse(suggested)).toBe(false)

    // The first checkout's cluster is untouched, and the suggested way out works.
    expect(ensureCluster(root, { env: first }).port).toBe(port)
    const moved = ensureCluster(root, { env: { ...second, PGPORT_LOCAL: String(suggested) }, fast: true })
    expect(moved.port).toBe(suggested)
    stopCluster(root, { env: { ...second, PGPORT_LOCAL: String(suggested) } })
    stopCluster(root, { env: first })
  }, 60_000)

  it('names the port and PGPORT_LOCAL when the port is held by a program that is not PostgreSQL', async () => {
    blocker = createServer()
    await new Promise((r) => blocker!.listen(port, '127.0.0.1', () => r(null)))
    expect(() => ensureCluster(root, { env: second, fast: true })).toThrow(
      new RegExp(`127\\.0\\.0\\.1:${port} is already held by another program[\\s\\S]*stop the program that holds the port[\\s\\S]*PGPORT_LOCAL=\\d+ npm start`),
    )
  }, 60_000)
})
