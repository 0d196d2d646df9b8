import { hostname } from 'node:os'
import PgBoss from 'pg-boss'
import { EngineInputError } from '../../shared/stats/index'
import type { Db } from '../db/knex'
import { createQueueOnce, PGBOSS_SCHEMA } from '../queue/boss'
import { claimImpactJob, completeImpactJob, failImpactJob, syncImpactProgress } from '../services/impact-jobs'
import { IMPACT_QUEUE, queueSettings, type ImpactQueueJob } from './analysis-queue'
import { ComputeCancelled, ComputeThread, ComputeTimeout } from './threads'

export interface AnalysisWorkerOptions {
  databaseUrl: string
  db: Db
  /** Analyses computed at the same time, each on a thread of its own (ANALYSIS_THREADS). Default 1. */
  threads?: number
  /** How often an idle worker asks the queue for a job (ANALYSIS_POLL_SECONDS; pg-boss minimum 0.5). Default 1. */
  pollingIntervalSeconds?: number
  /** An analysis computing longer is stopped and reported failed (ANALYSIS_TIME_LIMIT_SECONDS). Default 600. */
  timeLimitSeconds?: number
  /** How long stop() lets analyses in hand finish before handing them back to the queue. Default 10 s. */
  stopGraceMs?: number
  /** Written on the jobs it runs. Default host:pid. */
  name?: string
  log?: (message: string) => void
}

export interface AnalysisWorker {
  readonly name: string
  start(): Promise<void>
  stop(): Promise<void>
  /** A job was just queued: ask the queue now instead of at the next poll. */
  notify(): void
}

/**
 * Progress is written (and the job's state read back, to notice a cancel) at most this often per job, and at least this
 * often while a step takes longer: the client polls about twice a second.
 */
const PROGRESS_EVERY_MS = 250

/**
 * Works the impact-analysis queue: takes a job, computes it on a compute thread with its progress written to the job
 * row, and stores the analysis with its audit event. Any number of these may run, in web processes and in worker
 * processes on other machines (`npm run worker`), against one database; each analysis is stored once
 * (completeImpactJob), whichever worker finishes it first. A job cancelled meanwhile stops at its next step and stores
 * nothing.
 */
export function createAnalysisWorker(opts: AnalysisWorkerOptions): AnalysisWorker {
  const { db } = opts
  const name = opts.name ?? `${hostname()}:${process.pid}`
  const timeLimitMs = (opts.timeLimitSeconds ?? 600) * 1000
  const log = opts.log ?? ((m: string) => console.warn(`[analysis worker] ${m}`))
  const threads = Array.from({ length: Math.max(1, opts.threads ?? 1) }, () => new ComputeThread())
  let boss: PgBoss | null = null
  let workerIds: string[] = []
  let stopping = false

  async function handle(jobId: string, thread: ComputeThread): Promise<void> {
    const job = await claimImpactJob(db, jobId, name)
    if (!job?.task) return // done, failed or cancelled already (a job handed out again after its first worker finished it)
    const cancelled = new AbortController()
    let reported = 0
    let synced = 0
    let syncing: Promise<void> | null = null
    // Writes the steps reported so far and reads back whether the job still runs; a cancel aborts the computation.
    const sync = () => {
      if (syncing || cancelled.signal.aborted) return
      synced = Date.now()
      syncing = syncImpactProgress(db, job.id, reported)
        .then((running) => {
          if (!running) cancelled.abort()
        })
        .catch((err) => log(`progress of ${job.id}: ${(err as Error).message}`))
        .finally(() => { syncing = null })
    }
    const onProgress = (done: number) => {
      reported = done
      if (Date.now() - synced >= PROGRESS_EVERY_MS) sync()
    }
    // Also between reports: a cancel is noticed while a long step computes, and stops the analysis after that step.
    const watch = setInterval(() => {
      if (Date.now() - synced >= PROGRESS_EVERY_MS) sync()
    }, PROGRESS_EVERY_MS)
    let computed
    try {
      computed = await thread.run(job.task.compute, onProgress, timeLimitMs, cancelled.signal)
    } catch (err) {
      // Cancelled: the job row says so already; nothing to store.
      if (err instanceof ComputeCancelled) return
      // Stopping: the queue hands the job to another worker (pg-boss fails work in hand when it stops).
      if (stopping) throw err
      if (err instanceof EngineInputError) {
        await failImpactJob(db, job.id, { status: 400, message: 'The analysis cannot be run with these inputs', fields: { [err.field]: err.message } })
      } else if (err instanceof ComputeTimeout) {
        await failImpactJob(db, job.id, { status: 500, message: `${err.message}. Try fewer candidates or sweep widths.`, fields: {} })
      } else {
        log(`job ${job.id} failed: ${(err as Error).stack ?? err}`)
        await failImpactJob(db, job.id, { status: 500, message: 'The analysis failed on the server. Try again; if it fails again, tell the study’s administrator.', fields: {} })
      }
      return
    } finally {
      clearInterval(watch)
      await syncing
    }
    // Every computed step shows while the result is stored; the stored job shows the last step (storing) done too.
    // A job cancelled meanwhile is not stored. A failure to store (the database away) fails the queue job, which pg-boss
    // hands out again.
    if (!(await syncImpactProgress(db, job.id, reported))) return
    await completeImpactJob(db, job, computed)
  }

  return {
    name,
    async start() {
      if (boss) return
      stopping = false
      const b = new PgBoss({ connectionString: opts.databaseUrl, schema: PGBOSS_SCHEMA, max: 2 + threads.length, application_name: 'priorsmith-analysis-worker' })
      b.on('error', (err) => log(`queue error: ${err.message}`))
      await b.start()
      await createQueueOnce(db, b, queueSettings(opts.timeLimitSeconds ?? 600))
      // The engine loads on each thread before the first job, not while an analyst waits for it.
      await Promise.all(threads.map((t) => t.start()))
      const pollingIntervalSeconds = Math.max(0.5, opts.pollingIntervalSeconds ?? 1)
      workerIds = await Promise.all(threads.map((thread) =>
        b.work<ImpactQueueJob>(IMPACT_QUEUE, { pollingIntervalSeconds, batchSize: 1 }, async ([job]) => handle(job.data.jobId, thread))))
      boss = b
    },

    async stop() {
      stopping = true
      const b = boss
      boss = null
      workerIds = []
      if (b) await b.stop({ graceful: true, wait: true, timeout: opts.stopGraceMs ?? 10_000 })
      await Promise.all(threads.map((t) => t.stop()))
    },

    notify() {
      for (const id of workerIds) boss?.notifyWorker(id)
    },
  }
}
