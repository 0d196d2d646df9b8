// Load benchmark (prints figures; not a test): 50 experts autosaving judgements while the analyst runs impact
// analyses, against an app instance served on loopback. Its data goes to a database of its own, `priorsmith_load`,
// made anew (migrated and seeded) each run, so the development database is left as it was. Run with
// `npm run bench:load` after `npm run db:up` (and `npm run build` for the bundle figures).
import { readdirSync, readFileSync, existsSync } from 'node:fs'
import { cpus } from 'node:os'
import path from 'node:path'
import { gzipSync } from 'node:zlib'
import autocannon from 'autocannon'
import { percentile, serveBenchApp, type Session } from './served-app'

const EXPERTS = Number(process.env.LOAD_EXPERTS ?? 50)
const SECONDS = Number(process.env.LOAD_SECONDS ?? 20)
const PASSWORD = 'load-test-pass-1'

// Two app instances on the one database: the first serves every phase, the second only the last one (what it adds).
const { root, db, base, bases, session, call, stop, cpuTimes } = await serveBenchApp({ database: 'priorsmith_load', port: Number(process.env.LOAD_PORT ?? 3917), instances: 2, env: { SESSION_SECRET: 'load-bench', SIGN_IN_LIMIT: '100000' } })

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
// One sign-in at a time: the app checks passwords on one thread with a bounded queue and answers a burst of 50 with 429s.
const sessions: Session[] = []
for (const email of emails) sessions.push(await session(email, PASSWORD))

interface Measured {
  requests: number
  seconds: number
  errors: number
  non2xx: number
  /** Every response's own latency (ms), sorted. */
  latencies: number[]
}

/**
 * Runs autocannon and keeps every response's own latency: autocannon's histogram has no p95, and when requests are
 * paced it corrects for coordinated omission with an expected interval of 1/rate taken as milliseconds (autocannon
 * 8.0.0, lib/run.js), which fills the histogram with made-up short samples. The raw times are the honest figures.
 */
async function measured(opts: autocannon.Options): Promise<Measured> {
  const latencies: number[] = []
  const r = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ ...opts, ignoreCoordinatedOmission: Boolean(opts.connectionRate ?? opts.overallRate) }, (err, res) => (err ? reject(err) : resolve(res)))
    instance.on('response', (_client, _status, _bytes, ms) => latencies.push(ms))
  })
  return { requests: r.requests.total, seconds: r.duration, errors: r.errors + r.timeouts + r.non2xx, non2xx: r.non2xx, latencies: latencies.sort((x, y) => x - y) }
}

/** Several runs side by side as one: requests and errors add up over the same stretch of time. */
function together(runs: Measured[]): Measured {
  const sum = (f: (m: Measured) => number) => runs.reduce((s, m) => s + f(m), 0)
  return { requests: sum((m) => m.requests), seconds: Math.max(...runs.map((m) => m.seconds)), errors: sum((m) => m.errors), non2xx: sum((m) => m.non2xx), latencies: runs.flatMap((m) => m.latencies).sort((x, y) => x - y) }
}

function summary(label: string, m: Measured) {
  const ms = (p: number) => percentile(m.latencies, p).toFixed(1)
  console.log(`${label}: ${m.requests} requests, ${(m.requests / m.seconds).toFixed(1)} req/s, latency p50 ${ms(50)} ms, p95 ${ms(95)} ms, p99 ${ms(99)} ms, max ${ms(100)} ms, errors ${m.errors} (non-2xx ${m.non2xx})`)
}

/** CPU time per save over a phase: the app processes' and the PostgreSQL backends' (the analyst's requests included). */
function cpuPerSave(before: ReturnType<typeof cpuTimes>, m: Measured) {
  const after = cpuTimes()
  if (!before || !after) return
  const per = (ms: number) => (ms / m.requests).toFixed(2)
  const app = after.app - before.app
  const main = after.appMain - before.appMain
  const postgres = after.postgres - before.postgres
  const s = (ms: number) => `${(ms / 1000).toFixed(1)} s`
  console.log(`CPU per save: app's main thread ${per(main)} ms (whole app ${per(app)} ms, its analysis thread included), PostgreSQL backends ${per(postgres)} ms; in all ${s(main)}, ${s(app)}, ${s(postgres)} over ${m.seconds} s on ${cpus().length} cores`)
}

// Each expert's current draft version, by session cookie: a save sends the version the previous save returned, as
// the client does. autocannon resets a connection's context before each new cycle of its request list, so the
// version is kept here, and the context only carries which expert the request in flight belongs to.
const versions = new Map<string, number>(sessions.map((s) => [s.cookie, 0]))
let firstFailure = ''

/** Autosaves of the given experts, one connection each, at `rate` saves per second each or back to back. */
function autosaves(experts: Session[], rate: number | undefined, seconds = SECONDS, url = base) {
  let connection = 0
  return measured({
    url, connections: experts.length, duration: seconds, ...(rate ? { connectionRate: rate } : {}),
    setupClient: (client) => {
      const s = experts[connection++ % experts.length]
      client.setHeaders({ cookie: s.cookie, 'x-csrf-token': s.token, 'content-type': 'application/json' })
    },
    requests: [{
      method: 'PUT', path: `/api/rounds/${round.id}/judgements/${quantity.id}`,
      setupRequest: (req, ctx) => {
        const cookie = String((req.headers as Record<string, string>).cookie)
        ;(ctx as Record<string, unknown>).cookie = cookie
        const m = 3 + Math.random() * 2
        const answer = { method: 'quantile', lower: 0.5, upper: 12, points: [{ value: m - 0.8, prob: 0.25 }, { value: m, prob: 0.5 }, { value: m + 1.1, prob: 0.75 }] }
        return { ...req, body: JSON.stringify({ ...answer, rationale: 'Load benchmark answer.', version: versions.get(cookie) ?? 0 }) }
      },
      onResponse: (status, body, ctx) => {
        if (status === 200) versions.set(String((ctx as Record<string, unknown>).cookie), JSON.parse(body).judgement.version as number)
        else if (!firstFailure) firstFailure = `${status} ${body.slice(0, 200)}`
      },
    }],
  })
}

/**
 * Experts saving at their own pace: autocannon's rate limit lets each connection send its quota at the top of every
 * second, all connections together, which would make 50 experts save in lock step. Real experts are not in step,
 * so each expert is a run of its own, started at a random moment within the first second.
 */
async function pacedAutosaves(rate: number, seconds = SECONDS) {
  return together(await Promise.all(sessions.map(async (s) => {
    await new Promise((r) => setTimeout(r, Math.random() * 1000))
    return autosaves([s], rate, seconds)
  })))
}

/**
 * The analyst at the same time, as the impact screen does it: queue an analysis with a new decision threshold (no cache
 * hit), read its job every half second until it is done, then the next. The latency is each analysis's whole wait, from
 * the POST to the GET that brings the result; the web process's own analysis worker computes them.
 */
let k = 0
async function impactLoad(seconds = SECONDS): Promise<Measured> {
  const latencies: number[] = []
  let errors = 0
  const until = Date.now() + seconds * 1000
  const started = Date.now()
  while (Date.now() < until) {
    const t0 = performance.now()
    try {
      let job = await call(analyst, 'POST', `/api/quantities/${quantity.id}/impact`, {
        datasetId: dataset.id, comparison: { family: 'gamma', shape: 1, rate: 0.05 }, decision: { direction: 'above', threshold: 3 + (k++ % 1000) / 1000, probability: 0.8 },
      })
      while (job.state === 'queued' || job.state === 'running') {
        await new Promise((r) => setTimeout(r, 500))
        job = await call(analyst, 'GET', `/api/impact-jobs/${job.id}`)
      }
      if (job.state === 'done') latencies.push(performance.now() - t0)
      else errors++
    } catch {
      errors++
    }
  }
  return { requests: latencies.length + errors, seconds: (Date.now() - started) / 1000, errors, non2xx: 0, latencies: latencies.sort((x, y) => x - y) }
}

// A run stops with saves in flight whose answers the bench never reads; once the server has finished them, start
// from its versions, as a reloaded page would (a save still in flight at the reload would 409 that expert for good).
async function reloadVersions() {
  await new Promise((r) => setTimeout(r, 1000))
  for (const s of sessions) {
    const [draft] = await call(s, 'GET', `/api/rounds/${round.id}/judgements`)
    versions.set(s.cookie, draft?.version ?? 0)
  }
}
// Paced: an expert typing without pause saves at most about once a second (the client saves 800 ms after the last
// keystroke, one save at a time), so 50 experts all typing at once send about 50 saves a second. This is the aim.
const RATE = Number(process.env.LOAD_RATE ?? 1)
// A few seconds first that are not counted, so the figures are of a warm server (JIT-compiled code, open pools, the
// impact worker started), as a server is after its first minutes of a round.
const WARMUP = Number(process.env.LOAD_WARMUP ?? 3)
if (WARMUP > 0) {
  console.log(`warming up ${WARMUP} s (not counted)…`)
  await Promise.all([pacedAutosaves(RATE, WARMUP), impactLoad(WARMUP)])
  await reloadVersions()
}
console.log(`running ${SECONDS} s: ${EXPERTS} experts each autosaving ${RATE}/s, 1 analyst running uncached impact analyses…`)
const [paced, pacedImpact] = await Promise.all([pacedAutosaves(RATE), impactLoad()])
summary(`autosave, paced (PUT judgement, ${EXPERTS} × ${RATE}/s)`, paced)
summary('impact analysis alongside (queued and followed to its result, uncached)', pacedImpact)

await reloadVersions()

// Saturation: every expert saves again the moment the previous save returns. Shows the capacity, and the latency
// once requests queue behind each other.
console.log(`running ${SECONDS} s: ${EXPERTS} experts autosaving back to back, 1 analyst running impact analyses…`)
let cpu = cpuTimes()
const [flat, flatImpact] = await Promise.all([autosaves(sessions, undefined), impactLoad()])
summary(`autosave, saturated (PUT judgement, ${EXPERTS} connections back to back)`, flat)
summary('impact analysis alongside (queued and followed to its result, uncached)', flatImpact)
cpuPerSave(cpu, flat)

await reloadVersions()

// What a second app instance adds: the same back-to-back load, half the experts on each of two app processes on the
// one database (as behind a load balancer). On one 2-core machine both processes and PostgreSQL share the cores.
console.log(`running ${SECONDS} s: ${EXPERTS} experts autosaving back to back on ${bases.length} app instances, 1 analyst running impact analyses…`)
cpu = cpuTimes()
const [two, twoImpact] = await Promise.all([
  Promise.all(bases.map((url, i) => autosaves(sessions.filter((_, j) => j % bases.length === i), undefined, SECONDS, url))).then(together),
  impactLoad(),
])
summary(`autosave, saturated on ${bases.length} instances (PUT judgement, ${EXPERTS} connections back to back)`, two)
summary('impact analysis alongside (queued and followed to its result, uncached)', twoImpact)
cpuPerSave(cpu, two)
if (firstFailure) console.log(`first autosave refusal: ${firstFailure}`)

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
await stop()
process.exit(0)
