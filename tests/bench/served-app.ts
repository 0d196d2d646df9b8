// The app as the benchmarks run it: in a process of its own, as `npm start` runs it (so the load generator does not
// share its event loop), on loopback, on a database of its own made anew (migrated and seeded) each run.
import { spawn } from 'node:child_process'
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import path from 'node:path'
import { ensureCluster, ensureDatabase } from '../../scripts/lib/postgres.mjs'
import { createDb } from '../../server/db/knex'
import { seedDemo } from '../../seeds/demo'

export interface Session { cookie: string; token: string }

export async function serveBenchApp(opts: { database: string; port: number; env: Record<string, string>; instances?: number }) {
  const root = path.resolve(import.meta.dirname, '../..')
  const databaseUrl = process.env.DATABASE_URL ?? ensureDatabase(ensureCluster(root), opts.database, { recreate: true })
  const db = createDb(databaseUrl)
  const dbUser = decodeURIComponent(new URL(databaseUrl).username)
  const dbName = new URL(databaseUrl).pathname.slice(1)
  await db.migrate.latest()
  await seedDemo(db)
  // LOAD_CPU_PROFILE=<folder>: each app writes a V8 CPU profile there when it stops (summary: tests/bench/cpu-profile.ts).
  const profile = process.env.LOAD_CPU_PROFILE ? ['--cpu-prof', `--cpu-prof-dir=${path.resolve(process.env.LOAD_CPU_PROFILE)}`] : []
  // Several instances (as production runs several app processes): ports port, port + 1, … on the same database.
  const ports = Array.from({ length: opts.instances ?? 1 }, (_, i) => opts.port + i)
  const servers = ports.map((port) => spawn(process.execPath, [...profile, '--import', 'tsx', 'server/index.ts'], {
    cwd: root, stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, NODE_ENV: 'production', PORT: String(port), PUBLIC_URL: `http://localhost:${port}`, DATABASE_URL: databaseUrl, ...opts.env },
  }))
  const bases = ports.map((port) => `http://127.0.0.1:${port}`)
  const base = bases[0]
  // A failed run must not leave the apps holding their ports.
  process.on('exit', () => servers.forEach((server) => server.kill('SIGTERM')))
  for (const url of bases) {
    for (let i = 0; ; i++) {
      if (await fetch(`${url}/api/health`).then((r) => r.ok, () => false)) break
      if (i > 120) throw new Error(`the app at ${url} did not start`)
      await new Promise((r) => setTimeout(r, 250))
    }
  }

  /** A session with its CSRF token: signed in when an e-mail is given, anonymous otherwise. */
  async function session(email?: string, password?: string): Promise<Session> {
    const r1 = await fetch(`${base}/api/auth/csrf`)
    let cookie = (r1.headers.get('set-cookie') ?? '').split(';')[0]
    const { token: t1 } = await r1.json()
    if (!email) return { cookie, token: t1 }
    const r2 = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { cookie, 'x-csrf-token': t1, 'content-type': 'application/json' }, body: JSON.stringify({ email, password }) })
    // The whole answer is read before going on: express-session sends its last byte only once the signed-in session is
    // stored, and a token asked for before then is lost when that store lands after it (every write then answers 403).
    const signedIn = await r2.text()
    if (r2.status !== 200) throw new Error(`sign-in ${email}: ${r2.status} ${signedIn}`)
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
    // Waits for the apps to finish stopping, so their CPU profiles (if asked for) are written before the bench exits.
    await Promise.all(servers.map((server) => {
      const exited = new Promise((resolve) => server.once('exit', resolve))
      server.kill('SIGTERM')
      return exited
    }))
    await db.destroy()
  }

  /**
   * CPU time (ms) used so far by the app processes (with their threads) and by the PostgreSQL backends serving this
   * database, read from /proc (Linux only; undefined elsewhere). Backends that ended are no longer counted.
   */
  function cpuTimes(): { app: number; appMain: number; postgres: number } | undefined {
    if (!existsSync('/proc/self/stat')) return undefined
    /** CPU ms of a process (`pid`) or one of its threads (`pid/task/tid`). */
    const ticks = (proc: string) => {
      // Fields after the command's closing parenthesis: utime and stime are the 12th and 13th.
      const stat = readFileSync(`/proc/${proc}/stat`, 'utf8')
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
      return (Number(f[11]) + Number(f[12])) * (1000 / CLOCK_TICKS)
    }
    let postgres = 0
    for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
      try {
        if (readFileSync(`/proc/${pid}/cmdline`, 'utf8').startsWith(`postgres: ${dbUser} ${dbName} `)) postgres += ticks(pid)
      } catch {
        // the process ended while being read
      }
    }
    // The main thread is the event loop that answers requests; the app's total adds the compute and password threads.
    const appMain = servers.reduce((sum, server) => sum + ticks(`${server.pid}/task/${server.pid}`), 0)
    return { app: servers.reduce((sum, server) => sum + ticks(String(server.pid)), 0), appMain, postgres }
  }
  return { root, db, base, bases, session, call, stop, cpuTimes }
}

/** Linux's USER_HZ: /proc reports CPU time in these ticks (100 a second on every common build). */
const CLOCK_TICKS = 100

/** Nearest-rank percentile of sorted values (common practice). */
export function percentile(sorted: number[], p: number): number {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN
}
