// Sign-in flood benchmark (prints figures; not a test): experts' autosave latency on a quiet server, then while one
// client address floods the sign-in with failed attempts under invented e-mails, 32 at a time. The app runs in a
// process of its own on loopback, with the production sign-in limits, on a database of its own (`priorsmith_flood`,
// made anew each run). Run with `npm run bench:flood` after `npm run db:up`.
import { percentile, serveBenchApp, type Session } from './served-app'

const EXPERTS = Number(process.env.FLOOD_EXPERTS ?? 10)
const SECONDS = Number(process.env.FLOOD_SECONDS ?? 15)
const FLOOD_CONCURRENCY = 32
const FLOOD_MAX = 20_000
const PASSWORD = 'flood-test-pass-1'

const { db, base, session, call, stop } = await serveBenchApp({ database: 'priorsmith_flood', port: Number(process.env.FLOOD_PORT ?? 3918), env: { SESSION_SECRET: 'flood-bench', SIGN_IN_LIMIT: '20' } })

const stamp = Date.now()
console.log(`setting up: ${EXPERTS} experts on an open round…`)
const admin = await session('admin@kestrel.example', 'priorsmith-demo')
const analyst = await session('analyst@kestrel.example', 'priorsmith-demo')
const emails = Array.from({ length: EXPERTS }, (_, i) => `flood-${stamp}-${i}@kestrel.example`)
for (const [i, email] of emails.entries()) await call(admin, 'POST', '/api/users', { email, displayName: `Flood expert ${i}`, role: 'expert', password: PASSWORD })
const study = await call(analyst, 'POST', '/api/studies', { title: `Flood test ${new Date(stamp).toISOString()}`, context: 'Created by the flood benchmark.' })
const quantity = await call(analyst, 'POST', `/api/studies/${study.id}/quantities`, { name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'positive' } })
const round = await call(analyst, 'POST', `/api/studies/${study.id}/rounds`, { title: 'Flood round', opensAt: new Date(stamp - 3600e3).toISOString(), closesAt: new Date(stamp + 86400e3).toISOString(), items: [{ quantityId: quantity.id, method: 'quantile' }] })
for (const email of emails) await call(analyst, 'POST', `/api/rounds/${round.id}/invitations`, { email, name: 'Flood expert' })
await call(analyst, 'POST', `/api/rounds/${round.id}/open`)
const experts: Session[] = []
for (const e of emails) experts.push(await session(e, PASSWORD))

/** Each expert saves once a second (a typing expert's pace), starting at a random moment; returns every save's latency. */
async function autosaves(seconds: number): Promise<{ latencies: number[]; errors: number }> {
  const latencies: number[] = []
  let errors = 0
  const until = Date.now() + seconds * 1000
  await Promise.all(experts.map(async (s) => {
    await new Promise((r) => setTimeout(r, Math.random() * 1000))
    let version = (await call(s, 'GET', `/api/rounds/${round.id}/judgements`))[0]?.version ?? 0
    while (Date.now() < until) {
      const started = performance.now()
      const m = 3 + Math.random() * 2
      const res = await fetch(`${base}/api/rounds/${round.id}/judgements/${quantity.id}`, {
        method: 'PUT', headers: { cookie: s.cookie, 'x-csrf-token': s.token, 'content-type': 'application/json' },
        body: JSON.stringify({ method: 'quantile', lower: 0.5, upper: 12, points: [{ value: m - 0.8, prob: 0.25 }, { value: m, prob: 0.5 }, { value: m + 1.1, prob: 0.75 }], rationale: 'Flood benchmark answer.', version }),
      })
      const body = await res.json()
      latencies.push(performance.now() - started)
      if (res.status === 200) version = body.judgement.version
      else errors++
      await new Promise((r) => setTimeout(r, Math.max(0, 1000 - (performance.now() - started))))
    }
  }))
  return { latencies: latencies.sort((a, b) => a - b), errors }
}

/** Failed sign-ins with invented e-mails from one address, `FLOOD_CONCURRENCY` in flight, until `stop` or the cap. */
async function flood(stop: () => boolean) {
  const client = await session()
  const statuses = new Map<number, number>()
  const latencies: number[] = []
  let sent = 0
  await Promise.all(Array.from({ length: FLOOD_CONCURRENCY }, async () => {
    while (!stop() && sent < FLOOD_MAX) {
      const n = sent++
      const started = performance.now()
      const res = await fetch(`${base}/api/auth/sign-in`, {
        method: 'POST', headers: { cookie: client.cookie, 'x-csrf-token': client.token, 'content-type': 'application/json' },
        body: JSON.stringify({ email: `invented-${stamp}-${n}@flood.example`, password: 'guess-guess-guess' }),
      })
      await res.arrayBuffer()
      latencies.push(performance.now() - started)
      statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
    }
  }))
  return { sent, statuses, latencies: latencies.sort((a, b) => a - b) }
}

const line = (label: string, r: { latencies: number[]; errors: number }) =>
  `${label}: ${r.latencies.length} saves, p50 ${percentile(r.latencies, 50).toFixed(1)} ms, p95 ${percentile(r.latencies, 95).toFixed(1)} ms, max ${percentile(r.latencies, 100).toFixed(1)} ms, errors ${r.errors}`

console.log('warming up 3 s (not counted)…')
await autosaves(3)
const auditBefore = Number((await db('audit_events').count({ n: '*' }))[0].n)
console.log(`running ${SECONDS} s quiet, then ${SECONDS} s under a sign-in flood (${FLOOD_CONCURRENCY} at a time, at most ${FLOOD_MAX})…`)
const quiet = await autosaves(SECONDS)
console.log(line(`autosave, quiet (${EXPERTS} experts × 1/s)`, quiet))
let floodDone = false
const floodRun = flood(() => floodDone)
const loud = await autosaves(SECONDS)
floodDone = true
const f = await floodRun
console.log(line(`autosave, during the flood (${EXPERTS} experts × 1/s)`, loud))
console.log(`flood: ${f.sent} sign-in attempts in ${SECONDS} s (${[...f.statuses].map(([s, n]) => `${n} × ${s}`).join(', ')}), p50 ${percentile(f.latencies, 50).toFixed(1)} ms`)
console.log(`save median under the flood / quiet: ${(percentile(loud.latencies, 50) / percentile(quiet.latencies, 50)).toFixed(2)}×`)
const auditAfter = Number((await db('audit_events').count({ n: '*' }))[0].n)
const logged = await db('sign_in_failures').sum({ n: 'attempts' }).count({ rows: '*' })
console.log(`audit events added during the flood: ${auditAfter - auditBefore}; failure log: ${logged[0].rows} rows holding ${logged[0].n} failed attempts`)
await stop()
process.exit(0)
