// The app as the benchmarks run it: in a process of its own, as `npm start` runs it (so the load generator does not
// share its event loop), on loopback, on a database of its own made anew (migrated and seeded) each run.
import { spawn } from 'node:child_process'
import path from 'node:path'
import { ensureCluster, ensureDatabase } from '../../scripts/lib/postgres.mjs'
import { createDb } from '../../server/db/knex'
import { seedDemo } from '../../seeds/demo'

export interface Session { cookie: string; token: string }

export async function serveBenchApp(opts: { database: string; port: number; env: Record<string, string> }) {
  const root = path.resolve(import.meta.dirname, '../..')
  const databaseUrl = process.env.DATABASE_URL ?? ensureDatabase(ensureCluster(root), opts.database, { recreate: true })
  const db = createDb(databaseUrl)
  await db.migrate.latest()
  await seedDemo(db)
  const server = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/index.ts'], {
    cwd: root, stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, NODE_ENV: 'production', PORT: String(opts.port), PUBLIC_URL: `http://localhost:${opts.port}`, DATABASE_URL: databaseUrl, ...opts.env },
  })
  const base = `http://127.0.0.1:${opts.port}`
  // A failed run must not leave the app holding the port.
  process.on('exit', () => server.kill('SIGTERM'))
  for (let i = 0; ; i++) {
    if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) break
    if (i > 120) throw new Error('the app did not start')
    await new Promise((r) => setTimeout(r, 250))
  }

  /** A session with its CSRF token: signed in when an e-mail is given, anonymous otherwise. */
  async function session(email?: string, password?: string): Promise<Session> {
    const r1 = await fetch(`${base}/api/auth/csrf`)
    let cookie = (r1.headers.get('set-cookie') ?? '').split(';')[0]
    const { token: t1 } = await r1.json()
    if (!email) return { cookie, token: t1 }
    const r2 = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { cookie, 'x-csrf-token': t1, 'content-type': 'application/json' }, body: JSON.stringify({ email, password }) })
    if (r2.status !== 200) throw new Error(`sign-in ${email}: ${r2.status} ${await r2.text()}`)
    cookie = (r2.headers.get('set-cookie') ?? '').split(';')[0]
    const { token } = await (await fetch(`${base}/api/auth/csrf`, { headers: { cookie } })).json()
    return { cookie, token }
  }

  async function call(s: Session, method: string, url: string, body?: unknown) {
    const res = await fetch(`${base}${url}`, { method, headers: { cookie: s.cookie, 'x-csrf-token': s.token, 'content-type': 'application/json' }, body: body === undefined ? undefined : JSON.stringify(body) })
    const text = await res.text()
    if (res.status >= 400) throw new Error(`${method} ${url}: ${res.status} ${text}`)
    return text ? JSON.parse(text) : null
  }

  async function stop() {
    server.kill('SIGTERM')
    await db.destroy()
  }
  return { root, db, base, session, call, stop }
}

/** Nearest-rank percentile of sorted values (common practice). */
export function percentile(sorted: number[], p: number): number {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN
}
