// Load benchmark (prints figures; not a test): 50 experts autosaving judgements while the analyst runs impact
// analyses, against an app instance served on loopback from the development database. Run with `npm run bench:load`
// after `npm run db:up` (and `npm run build` for the bundle figures).
import { readdirSync, readFileSync, existsSync } from 'node:fs'
import { spawn } from 'node:child_process'
import path from 'node:path'
import { gzipSync } from 'node:zlib'
import autocannon from 'autocannon'
import { ensureCluster, ensureDatabase } from '../../scripts/lib/postgres.mjs'
import { createDb } from '../../server/db/knex'

const root = path.resolve(import.meta.dirname, '../..')
const EXPERTS = Number(process.env.LOAD_EXPERTS ?? 50)
const SECONDS = Number(process.env.LOAD_SECONDS ?? 20)
const PASSWORD = 'load-test-pass-1'

const databaseUrl = process.env.DATABASE_URL ?? ensureDatabase(ensureCluster(root), 'priorsmith')
const db = createDb(databaseUrl)
// The app runs in a process of its own, as `npm start` runs it, so the load generator does not share its event loop.
const port = Number(process.env.LOAD_PORT ?? 3917)
const server = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/index.ts'], {
  cwd: root, stdio: ['ignore', 'ignore', 'inherit'],
  env: { ...process.env, NODE_ENV: 'production', PORT: String(port), PUBLIC_URL: `http://localhost:${port}`, DATABASE_URL: databaseUrl, SESSION_SECRET: 'load-bench', SIGN_IN_LIMIT: '100000' },
})
const base = `http://127.0.0.1:${port}`
for (let i = 0; ; i++) {
  const up = await fetch(`${base}/api/health`).then((r) => r.ok, () => false)
  if (up) break
  if (i > 120) throw new Error('the app did not start')
  await new Promise((r) => setTimeout(r, 250))
}

interface Session { cookie: string; token: string }
async function session(email: string, password: string): Promise<Session> {
  const r1 = await fetch(`${base}/api/auth/csrf`)
  let cookie = (r1.headers.get('set-cookie') ?? '').split(';')[0]
  const { token: t1 } = await r1.json()
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

const stamp = Date.now()
console.log(`setting up: ${EXPERTS} expert accounts, a study, a round, a pilot dataset and a reconciled prior…`)
const admin = await session('admin@kestrel.example', 'priorsmith-demo')
const analyst = await session('analyst@kestrel.example', 'priorsmith-demo')
const emails = Array.from({ length: EXPERTS }, (_, i) => `load-${stamp}-${i}@kestrel.example`)
for (const [i, email] of emails.entries()) await call(admin, 'POST', '/api/users', { email, displayName: `Load expert ${i}`, role: 'expert', password: PASSWORD })
const study = await call(analyst, 'POST', '/api/studies', { title: `Load test ${new Date(stamp).toISOString()}`, context: 'Created by the load benchmark.' })
const quantity = await call(analyst, 'POST', `/api/studies/${study.id}/quantities`, { name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'positive' } })
const round = await call(analyst, 'POST', `/api/studies/${study.id}/rounds`, { title: 'Load round', opensAt: new Date(stamp - 3600e3).toISOString(), closesAt: new Date(stamp + 86400e3).toISOString(), items: [{ quantityId: quantity.id, method: 'quantile' }] })
for (const email of emails) await call(analyst, 'POST', `/api/rounds/${round.id}/invitations`, { email, name: 'Load expert' })
await call(analyst, 'POST', `/api/rounds/${round.id}/open`)
const form = new FormData()
for (const [k, v] of Object.entries({ quantityId: String(quantity.id), name: 'Load pilot', model: 'normal-known-sigma', valueColumn: 'v', sigma: '1.5', delimiter: ',' })) form.append(k, v)
form.append('file', new Blob(['v\n3.1\n4.6\n2.4\n3.8\n5.2\n2.9\n4.1\n3.5\n']), 'pilot.csv')
const dataset = await (await fetch(`${base}/api/studies/${study.id}/datasets`, { method: 'POST', headers: { cookie: analyst.cookie, 'x-csrf-token': analyst.token }, body: form })).json()
await db('reconciliations').insert({ quantity_id: quantity.id, round_id: round.id, method: 'linear', weights_mode: 'equal', family: 'gamma', distribution: JSON.stringify({ family: 'gamma', shape: 6, rate: 1.6 }), status: 'reconciled', rationale: 'Load benchmark fixture.' })
const sessions = await Promise.all(emails.map((e) => session(e, PASSWORD)))

function summary(label: string, r: autocannon.Result) {
  const errors = r.errors + r.timeouts + r.non2xx
  console.log(`${label}: ${r.requests.total} requests, ${r.requests.average.toFixed(0)} req/s, latency p50 ${r.latency.p50} ms, p95 ${(r.latency as any).p95 ?? r.latency.p97_5} ms, p99 ${r.latency.p99} ms, errors ${errors} (non-2xx ${r.non2xx})`)
}

let connection = 0
let firstFailure = ''
const autosave = autocannon({
  url: base, connections: EXPERTS, duration: SECONDS,
  setupClient: (client) => {
    const s = sessions[connection++ % sessions.length]
    client.setHeaders({ cookie: s.cookie, 'x-csrf-token': s.token, 'content-type': 'application/json' })
  },
  // autocannon resets a connection's context each time its request list starts over, so each cycle first reads the
  // expert's current draft version (as a reloaded page would) and then saves with it.
  requests: [
    {
      method: 'GET', path: `/api/rounds/${round.id}/judgements`,
      onResponse: (status, body, ctx) => {
        if (status === 200) (ctx as Record<string, unknown>).version = (JSON.parse(body)[0]?.version as number | undefined) ?? 0
      },
    },
    {
      method: 'PUT', path: `/api/rounds/${round.id}/judgements/${quantity.id}`,
      setupRequest: (req, ctx) => {
        const context = ctx as Record<string, unknown>
        const m = 3 + Math.random() * 2
        return { ...req, body: JSON.stringify({ method: 'quantile', lower: 0.5, upper: 12, points: [{ value: m - 0.8, prob: 0.25 }, { value: m, prob: 0.5 }, { value: m + 1.1, prob: 0.75 }], rationale: 'Load benchmark answer.', version: (context.version as number) ?? 0 }) }
      },
      onResponse: (status, body) => {
        if (status !== 200 && !firstFailure) firstFailure = `${status} ${body.slice(0, 200)}`
      },
    },
  ],
})
let k = 0
const impact = autocannon({
  url: base, connections: 1, duration: SECONDS,
  headers: { cookie: analyst.cookie, 'x-csrf-token': analyst.token, 'content-type': 'application/json' },
  requests: [{
    method: 'POST', path: `/api/quantities/${quantity.id}/impact`,
    setupRequest: (req) => ({ ...req, body: JSON.stringify({ datasetId: dataset.id, reference: { family: 'gamma', shape: 1, rate: 0.05 }, decision: { direction: 'above', threshold: 3 + (k++ % 1000) / 1000, probability: 0.8 } }) }),
  }],
})
console.log(`running ${SECONDS} s: ${EXPERTS} experts autosaving, 1 analyst running uncached impact analyses…`)
const [a, b] = await Promise.all([autosave, impact])
summary('autosave cycle (GET own draft + PUT judgement)', a)
if (firstFailure) console.log(`first autosave refusal: ${firstFailure}`)
summary('impact analysis (POST, uncached)', b)

const assets = path.join(root, 'dist', 'assets')
if (existsSync(assets)) {
  const html = readFileSync(path.join(root, 'dist', 'index.html'), 'utf8')
  const firstScreen = [...html.matchAll(/(?:src|href)="\/assets\/([^"]+\.(?:js|css))"/g)].map((m) => m[1])
  const gz = (f: string) => gzipSync(readFileSync(path.join(assets, f))).length
  const total = firstScreen.reduce((s, f) => s + gz(f), 0)
  console.log(`first screen (entry + preloads in index.html): ${(total / 1024).toFixed(1)} KB gzip across ${firstScreen.length} files`)
  const chunks = readdirSync(assets).filter((f) => f.endsWith('.js')).map((f) => ({ f, kb: gz(f) / 1024 })).sort((x, y) => y.kb - x.kb)
  console.log(`largest JS chunks (gzip): ${chunks.slice(0, 6).map((c) => `${c.f} ${c.kb.toFixed(1)} KB`).join(', ')}`)
} else {
  console.log('no dist/ build: run `npm run build` for the bundle figures')
}
server.kill('SIGTERM')
await db.destroy()
process.exit(0)
