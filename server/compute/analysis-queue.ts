import PgBoss from 'pg-boss'
import type { Knex } from 'knex'
import type { Db } from '../db/knex'
import { createQueueOnce, inTransaction, PGBOSS_SCHEMA } from '../queue/boss'

/** The pg-boss queue of impact analyses; a job's data is `{ jobId }`, the id of its impact_jobs row (and of the pg-boss job). */
export const IMPACT_QUEUE = 'impact-analysis'

export interface ImpactQueueJob {
  jobId: string
}

/**
 * How long an analysis may compute before its worker stops it (ANALYSIS_TIME_LIMIT_SECONDS, default 600). The queue
 * hands a job out again a minute after that (a worker that stopped mid-run), at most twice.
 */
export function queueSettings(timeLimitSeconds: number): PgBoss.Queue {
  return { name: IMPACT_QUEUE, policy: 'standard', retryLimit: 2, retryDelay: 0, expireInSeconds: timeLimitSeconds + 60 }
}

/** The web process's side of the queue: it only adds jobs. */
export interface AnalysisQueue {
  /** Adds the job inside the transaction that stores its row, so both commit or neither. */
  enqueue(trx: Knex.Transaction, jobId: string): Promise<void>
  /** Called after a job committed: wakes a worker in this process, if one runs here, instead of waiting for its next poll. */
  queued(): void
  close(): Promise<void>
}

export interface AnalysisQueueOptions {
  databaseUrl: string
  db: Db
  timeLimitSeconds: number
  onQueued?: () => void
}

export function createAnalysisQueue(opts: AnalysisQueueOptions): AnalysisQueue {
  const settings = queueSettings(opts.timeLimitSeconds)
  let boss: PgBoss | null = null
  let ready: Promise<PgBoss> | null = null

  // Started on the first job, so that an app that never runs an analysis opens no connections for it.
  function started(): Promise<PgBoss> {
    ready ??= (async () => {
      const b = new PgBoss({ connectionString: opts.databaseUrl, schema: PGBOSS_SCHEMA, max: 2, supervise: false, schedule: false, application_name: 'priorsmith-analysis-queue' })
      b.on('error', (err) => console.warn(`[analysis queue] ${err.message}`))
      try {
        await b.start()
        await createQueueOnce(opts.db, b, settings)
      } catch (err) {
        ready = null
        await b.stop({ graceful: false }).catch(() => {})
        throw err
      }
      boss = b
      return b
    })()
    return ready
  }

  return {
    async enqueue(trx, jobId) {
      const b = await started()
      const { name, ...options } = settings
      await b.send(name, { jobId } satisfies ImpactQueueJob, { ...options, id: jobId, db: inTransaction(trx) })
    },
    queued() {
      opts.onQueued?.()
    },
    async close() {
      const b = boss
      boss = null
      ready = null
      if (b) await b.stop({ graceful: false, wait: true })
    },
  }
}
