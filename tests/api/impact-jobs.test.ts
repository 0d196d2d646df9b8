// Impact jobs as users meet them, with the suites' real analysis worker (tests/support/global-setup.ts, one compute
// thread): progress that counts every step and never goes back, cancelling a queued or a running job (nothing stored,
// the audit event beside the change), and the quantity's active jobs for a page opened again.
//
// The worker is held where needed with PostgreSQL locks, never with timing: the study's audit-chain lock (which the
// worker's store waits for) keeps a job running with its computed steps shown, and a row lock on a job keeps the worker's
// claim waiting.
import type { Knex } from 'knex'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AUDIT_LOCK_CLASS } from '../../server/services/audit'
import type { ImpactJob } from '../../shared/api/impact-jobs'
import { signedIn, startApi, type ApiHarness, type Client } from '../support/api'
import { waitFor } from '../support/wait'

let h: ApiHarness
let analyst: Client
let reviewer: Client

interface Fixture {
  studyId: number
  quantityId: number
  datasetId: number
}
let held: Fixture
let other: Fixture

/** A study of its own with one quantity, five pilot values with known σ and a reconciled prior (constructed). */
async function fixture(title: string): Promise<Fixture> {
  const studyId = (await analyst.post('/api/studies', { title, context: 'Impact jobs: progress, cancelling, picking up.' }).expect(201)).body.id as number
  const quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'positive' },
  }).expect(201)).body.id as number
  const datasetId = (await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantityId)).field('name', 'Pilot districts').field('model', 'normal-known-sigma').field('valueColumn', 'reduction').field('sigma', '2')
    .attach('file', Buffer.from('district,reduction\nKV-01,2.2\nKV-02,3.5\nKV-03,2.8\nKV-04,3.9\nKV-05,2.6\n'), { filename: 'pilot.csv', contentType: 'text/csv' }).expect(201)).body.id as number
  await h.db('reconciliations').insert({
    quantity_id: quantityId, method: 'linear', weights_mode: 'equal', family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 3, sigma: 1.5 }),
    status: 'reconciled', rationale: 'Test fixture: the panel’s agreed prior for the night-flow reduction.',
  })
  return { studyId, quantityId, datasetId }
}

/** 60 sweep widths (the most the API takes) from 0.25 to about 7.8. */
const WIDTHS = Array.from({ length: 60 }, (_, i) => Number((0.25 * 1.06 ** i).toFixed(4)))
const request = (f: Fixture, threshold: number, factors?: number[]) => ({
  datasetId: f.datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 }, decision: { direction: 'above', threshold, probability: 0.8 }, ...(factors ? { factors } : {}),
})

/** Holds a study's audit-chain lock until released: a worker storing an analysis of that study waits meanwhile. */
async function holdStore(studyId: number): Promise<Knex.Transaction> {
  const trx = await h.db.transaction()
  await trx.raw('SELECT pg_advisory_xact_lock(?, ?)', [AUDIT_LOCK_CLASS, studyId])
  return trx
}

const readJob = async (id: string) => (await analyst.get(`/api/impact-jobs/${id}`).expect(200)).body as ImpactJob
const queueState = async (id: string) => (await h.db.raw<{ rows: { state: string }[] }>('SELECT state FROM pgboss.job WHERE id = ?', [id])).rows[0]?.state
/** Statements of other sessions waiting for a lock whose text starts like this. */
const lockWaiters = async (start: string) => Number((await h.db.raw(
  `SELECT count(*)::int AS n FROM pg_stat_activity WHERE wait_event_type = 'Lock' AND datname = current_database() AND query ILIKE ?`, [`${start}%`],
)).rows[0].n)

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  held = await fixture('jobs: held study')
  other = await fixture('jobs: other study')
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  const reviewerId = directory.find((u) => u.email === 'reviewer@kestrel.example')!.id
  for (const f of [held, other]) await analyst.post(`/api/studies/${f.studyId}/members`, { userId: reviewerId, studyRole: 'reviewer' }).expect(201)
}, 30_000)

afterAll(async () => {
  await h?.close()
})

describe('progress of a job', () => {
  it('counts every step, never goes back across polls, and reaches the total only once the analysis is stored', async () => {
    // 2 candidates (reconciled, comparison) + the fractional Bayes factors + 2 sensitivities, 60 widths + 2 curves,
    // the tipping point, and storing the result.
    const total = 5 + 62 + 1 + 1
    const seen: { state: string; done: number; total: number }[] = []
    const store = await holdStore(held.studyId)
    let jobId = ''
    try {
      const posted = await analyst.post(`/api/quantities/${held.quantityId}/impact`, request(held, 2.5, WIDTHS)).expect(202)
      jobId = posted.body.id
      expect(posted.body.progress).toEqual({ done: 0, total })
      // Polled as fast as the API answers until the worker waits to store: every computed step is then shown, the last not.
      await waitFor('the job computed and waiting to store', async () => {
        for (let i = 0; i < 10; i++) {
          const job = await readJob(jobId)
          seen.push({ state: job.state, ...job.progress })
          if (job.state === 'running' && job.progress.done === total - 1) return true
        }
        return false
      })
      // A page opened now finds the job among the quantity's active jobs (analysts and reviewers).
      const active = (await reviewer.get(`/api/quantities/${held.quantityId}/impact-jobs/active`).expect(200)).body as ImpactJob[]
      expect(active.map((j) => [j.id, j.state, j.progress])).toEqual([[jobId, 'running', { done: total - 1, total }]])
    } finally {
      await store.commit()
    }
    const finished = await waitFor('the job done', async () => {
      const job = await readJob(jobId)
      seen.push({ state: job.state, ...job.progress })
      return job.state === 'done' ? job : null
    })
    expect(finished.progress).toEqual({ done: total, total })
    expect((finished.result as { sweep: { points: unknown[] } }).sweep.points).toHaveLength(60)
    expect(seen.every((p) => p.total === total)).toBe(true)
    const dones = seen.map((p) => p.done)
    console.log(`[impact-jobs] progress across ${seen.length} polls: ${[...new Set(dones)].join(' → ')} of ${total}`)
    expect(dones).toEqual([...dones].sort((a, b) => a - b))
    expect(seen.filter((p) => p.done === total).every((p) => p.state === 'done')).toBe(true)
    expect((await analyst.get(`/api/quantities/${held.quantityId}/impact-jobs/active`).expect(200)).body).toEqual([])
  }, 60_000)
})

describe('cancelling a job', () => {
  it('cancels a queued job: it ends cancelled, the worker stores nothing, one audit event; a finished job answers 409', async () => {
    // The worker is busy storing the held study's analysis, so the other study's job waits in the queue.
    const store = await holdStore(held.studyId)
    let busyId = ''
    let queuedId = ''
    try {
      busyId = (await analyst.post(`/api/quantities/${held.quantityId}/impact`, request(held, 2.6)).expect(202)).body.id
      await waitFor('the worker busy storing', async () => (await readJob(busyId)).state === 'running' && (await lockWaiters('SELECT pg_advisory_xact_lock')) > 0)
      queuedId = (await analyst.post(`/api/quantities/${other.quantityId}/impact`, request(other, 2.6)).expect(202)).body.id
      expect((await readJob(queuedId)).state).toBe('queued')

      // Reviewers read jobs but do not cancel them.
      expect((await reviewer.post(`/api/impact-jobs/${queuedId}/cancel`)).status).toBe(403)
      const cancelled = await analyst.post(`/api/impact-jobs/${queuedId}/cancel`).expect(200)
      expect(cancelled.body).toMatchObject({ id: queuedId, state: 'cancelled', result: null, error: null })
      expect(cancelled.body.finishedAt).not.toBeNull()
      // Asked again: answered as it is, with no second audit event.
      expect((await analyst.post(`/api/impact-jobs/${queuedId}/cancel`).expect(200)).body.state).toBe('cancelled')
      expect((await analyst.get(`/api/quantities/${other.quantityId}/impact-jobs/active`).expect(200)).body).toEqual([])
    } finally {
      await store.commit()
    }
    // The worker finishes the held job, then takes the cancelled one from the queue and leaves it.
    await waitFor('the cancelled job taken from the queue', async () => (await queueState(queuedId)) === 'completed')
    expect((await readJob(busyId)).state).toBe('done')
    expect(await h.db('impact_jobs').where({ id: queuedId }).first('state', 'attempts', 'analysis_id')).toEqual({ state: 'cancelled', attempts: 0, analysis_id: null })
    expect(await h.db('impact_analyses').where({ job_id: queuedId })).toEqual([])
    const events = await h.db('audit_events').where({ action: 'impact.cancel', study_id: other.studyId }).whereRaw(`details->>'jobId' = ?`, [queuedId]).select('actor_id', 'subject', 'details')
    expect(events).toHaveLength(1)
    expect(events[0]).toMatchObject({ subject: `quantity:${other.quantityId}`, details: { jobId: queuedId, was: 'queued' } })

    // A finished job cannot be cancelled, and stays as it was.
    const late = await analyst.post(`/api/impact-jobs/${busyId}/cancel`).expect(409)
    expect(late.body).toEqual({ error: { message: 'This analysis has already finished; only a queued or running analysis can be cancelled.' } })
    expect((await readJob(busyId)).state).toBe('done')
    expect((await analyst.post('/api/impact-jobs/00000000-0000-4000-8000-000000000000/cancel')).status).toBe(404)
  }, 60_000)

  it('cancels a running job: the worker stops and stores nothing', async () => {
    // The worker is held storing another job while this one waits in the queue; this job's row is then locked here, so
    // the worker's claim waits for it, and the cancel waits behind the claim: the job is running when it is cancelled.
    const store = await holdStore(held.studyId)
    const rowLock = await h.db.transaction()
    let runningId = ''
    let cancelling: Promise<{ status: number; body: ImpactJob }> | null = null
    try {
      const busyId = (await analyst.post(`/api/quantities/${held.quantityId}/impact`, request(held, 2.7)).expect(202)).body.id
      await waitFor('the worker busy storing', async () => (await readJob(busyId)).state === 'running' && (await lockWaiters('SELECT pg_advisory_xact_lock')) > 0)
      runningId = (await analyst.post(`/api/quantities/${other.quantityId}/impact`, request(other, 2.7, WIDTHS)).expect(202)).body.id
      await rowLock('impact_jobs').where({ id: runningId }).forUpdate().first('id')
      await store.commit()
      await waitFor('the worker claiming the job', async () => (await lockWaiters('update "impact_jobs"')) === 1)
      cancelling = Promise.resolve(analyst.post(`/api/impact-jobs/${runningId}/cancel`)).then((r) => ({ status: r.status, body: r.body }))
      await waitFor('the cancel waiting behind the claim', async () => (await lockWaiters('select * from "impact_jobs"')) === 1)
    } finally {
      await store.commit().catch(() => {})
      await rowLock.commit()
    }
    const answer = await cancelling!
    expect(answer.status).toBe(200)
    expect(answer.body.state).toBe('cancelled')
    await waitFor('the worker done with the cancelled job', async () => (await queueState(runningId)) === 'completed')
    const row = await h.db('impact_jobs').where({ id: runningId }).first('state', 'attempts', 'analysis_id', 'progress_done', 'progress_total')
    expect(row).toMatchObject({ state: 'cancelled', attempts: 1, analysis_id: null })
    expect(row.progress_done).toBeLessThan(row.progress_total)
    expect(await h.db('impact_analyses').where({ job_id: runningId })).toEqual([])
    const events = await h.db('audit_events').where({ action: 'impact.cancel' }).whereRaw(`details->>'jobId' = ?`, [runningId]).select('details')
    expect(events.map((e) => e.details.was)).toEqual(['running'])
    expect((await readJob(runningId))).toMatchObject({ state: 'cancelled', result: null })
  }, 60_000)
})
