// Impact analyses computed by worker processes, as on worker machines: the app here runs no worker and computes
// nothing itself; two `tsx server/worker.ts` processes (what `npm run worker` starts) work one queue on one database.
// Every analysis asked for is done exactly once: one stored analysis, one audit event and one completed queue job per
// request, each request answered with its own result, and both workers take part.
import { spawn, type ChildProcess } from 'node:child_process'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createDb, type Db } from '../../server/db/knex'
import { seedDemo } from '../../seeds/demo'
import { signedIn, startApi, type ApiHarness, type Client } from '../support/api'
import { waitFor } from '../support/wait'

const root = path.resolve(import.meta.dirname, '../..')
const NAME = 'priorsmith_test_workers'

interface WorkerProcess {
  name: string
  proc: ChildProcess
  output: string[]
  exited: Promise<number | null>
}

function spawnWorker(name: string, databaseUrl: string): WorkerProcess {
  const proc = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/worker.ts'], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NODE_ENV: 'production', DATABASE_URL: databaseUrl, ANALYSIS_WORKER_NAME: name, ANALYSIS_POLL_SECONDS: '0.5' },
  })
  const output: string[] = []
  proc.stdout!.on('data', (d: Buffer) => output.push(d.toString()))
  proc.stderr!.on('data', (d: Buffer) => output.push(d.toString()))
  const exited = new Promise<number | null>((resolve) => proc.once('exit', (code) => resolve(code)))
  return { name, proc, output, exited }
}

async function stopWorker(w: WorkerProcess): Promise<number | null> {
  if (w.proc.exitCode === null && w.proc.signalCode === null) {
    w.proc.kill('SIGTERM')
    const timer = setTimeout(() => w.proc.kill('SIGKILL'), 20_000)
    await w.exited
    clearTimeout(timer)
  }
  return w.proc.exitCode
}

let databaseUrl: string
let admin: Db
let h: ApiHarness
let analyst: Client
let quantityId: number
let datasetId: number
let workers: WorkerProcess[] = []

beforeAll(async () => {
  // A database of its own: no other suite's jobs, and no other worker (the suites' own runs in the global setup).
  const url = new URL(inject('databaseUrl'))
  url.pathname = `/${NAME}`
  databaseUrl = url.toString()
  admin = createDb(inject('databaseUrl'))
  await admin.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [NAME])
  await admin.raw('CREATE DATABASE ??', [NAME])
  h = startApi({ databaseUrl })
  await h.db.migrate.latest()
  await seedDemo(h.db)
  analyst = await signedIn(h, 'analyst@kestrel.example')
  const studyId = (await analyst.post('/api/studies', { title: 'queue: two workers', context: 'Analyses computed by worker processes.' }).expect(201)).body.id
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'positive' },
  }).expect(201)).body.id
  datasetId = (await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantityId)).field('name', 'Pilot districts').field('model', 'normal-known-sigma').field('valueColumn', 'reduction').field('sigma', '2')
    .attach('file', Buffer.from('district,reduction\nKV-01,2.2\nKV-02,3.5\nKV-03,2.8\nKV-04,3.9\nKV-05,2.6\n'), { filename: 'pilot.csv', contentType: 'text/csv' }).expect(201)).body.id
  await h.db('reconciliations').insert({
    quantity_id: quantityId, method: 'linear', weights_mode: 'equal', family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 3, sigma: 1.5 }),
    status: 'reconciled', rationale: 'Test fixture: the panel’s agreed prior for the night-flow reduction.',
  })
}, 60_000)

afterAll(async () => {
  await Promise.all(workers.map(stopWorker))
  await h?.close()
  await admin?.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [NAME])
  await admin?.destroy()
}, 40_000)

const request = (threshold: number) => ({ datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 }, decision: { direction: 'above', threshold, probability: 0.8 } })

describe('two worker processes and an app that computes nothing', () => {
  it('do every analysis exactly once, each request getting its own result', async () => {
    // Asked before any worker runs: answered at once (202) and left queued, since the app computes nothing itself.
    const early = await Promise.all([2.1, 2.2, 2.3, 2.4].map((t) => analyst.post(`/api/quantities/${quantityId}/impact`, request(t))))
    expect(early.map((r) => [r.status, r.body.state])).toEqual(early.map(() => [202, 'queued']))
    const waiting = await h.db('impact_jobs').whereIn('id', early.map((r) => r.body.id)).select('state', 'attempts', 'worker')
    expect(waiting).toEqual(early.map(() => ({ state: 'queued', attempts: 0, worker: null })))

    workers = [spawnWorker('worker-A', databaseUrl), spawnWorker('worker-B', databaseUrl)]
    for (const w of workers) {
      await waitFor(`${w.name} ready`, async () => {
        if (w.proc.exitCode !== null) throw new Error(`${w.name} exited: ${w.output.join('')}`)
        return w.output.join('').includes('computing impact analyses')
      }, 40_000)
    }
    // Eight more at once, with both workers polling. Each worker takes one job per fetch and, after a short job, waits
    // out the rest of its half-second polling interval; one worker alone needs about 2.5 s for the twelve, and the other
    // asks the queue every half second meanwhile, so both take part by construction.
    const thresholds = [2.5, 2.6, 2.7, 2.8, 2.9, 3.0, 3.1, 3.2]
    const late = await Promise.all(thresholds.map((t) => analyst.post(`/api/quantities/${quantityId}/impact`, request(t))))
    expect(late.map((r) => r.status)).toEqual(thresholds.map(() => 202))
    const asked = [...early, ...late].map((r, i) => ({ id: r.body.id as string, threshold: [2.1, 2.2, 2.3, 2.4, ...thresholds][i] }))
    expect(new Set(asked.map((a) => a.id)).size).toBe(12)

    const jobs = await waitFor('all twelve analyses done', async () => {
      const read = await Promise.all(asked.map(async (a) => (await analyst.get(`/api/impact-jobs/${a.id}`).expect(200)).body))
      return read.every((j) => j.state === 'done' || j.state === 'failed') ? read : null
    }, 60_000)

    // Each request got its own analysis: done, with the threshold it asked for.
    expect(jobs.map((j) => [j.state, j.result?.decision?.threshold, j.result?.cached])).toEqual(asked.map((a) => ['done', a.threshold, false]))
    // Exactly once: one stored analysis per job, one audit event per analysis, one completed queue job per request.
    const ids = asked.map((a) => a.id)
    const perJob = await h.db('impact_analyses').whereIn('job_id', ids).groupBy('job_id').select('job_id', h.db.raw('count(*)::int AS n'))
    expect(perJob.map((r) => r.n)).toEqual(ids.map(() => 1))
    expect(await h.db('impact_analyses').where({ quantity_id: quantityId }).count({ n: '*' })).toEqual([{ n: '12' }])
    const analysisIds = jobs.map((j) => j.result.id as number).sort((a, b) => a - b)
    const events = await h.db('audit_events').where({ action: 'impact.run' }).select(h.db.raw(`(details->>'analysisId')::int AS id`))
    expect(events.map((e) => e.id).sort((a: number, b: number) => a - b)).toEqual(analysisIds)
    const { rows: queueJobs } = await h.db.raw(`SELECT state, retry_count FROM pgboss.job WHERE id = ANY(?::uuid[])`, [ids])
    expect(queueJobs).toEqual(ids.map(() => ({ state: 'completed', retry_count: 0 })))

    // Computed by the two worker processes, each job once (attempts), and both took part.
    const rows = await h.db('impact_jobs').whereIn('id', ids).select('worker', 'attempts')
    expect(rows.every((r) => r.attempts === 1 && (r.worker === 'worker-A' || r.worker === 'worker-B'))).toBe(true)
    const byWorker = (name: string) => rows.filter((r) => r.worker === name).length
    console.log(`[workers] analyses computed by worker-A: ${byWorker('worker-A')}, by worker-B: ${byWorker('worker-B')}`)
    expect(byWorker('worker-A')).toBeGreaterThan(0)
    expect(byWorker('worker-B')).toBeGreaterThan(0)
  }, 120_000)

  it('stop cleanly on SIGTERM', async () => {
    const codes = await Promise.all(workers.map(stopWorker))
    expect(codes, workers.map((w) => w.output.join('')).join('\n')).toEqual([0, 0])
  }, 40_000)
})
