import type { ImpactComputation, ImpactFindings, ImpactRequest, ImpactResult } from '../../shared/api/impact'
import { ACTIVE_JOB_STATES, type ImpactJob, type ImpactJobError, type ImpactJobState } from '../../shared/api/impact-jobs'
import type { User } from '../../shared/types/index'
import type { ImpactTask } from '../compute/tasks'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { PGBOSS_SCHEMA } from '../queue/boss'
import { recordAudit } from './audit'

/** What the web process prepared for a worker: the computation, and the facts the stored result repeats beside it. */
export interface ImpactJobTask {
  compute: ImpactTask
  studyId: number
  priorHash: string | null
  resultBase: Omit<ImpactFindings, keyof ImpactComputation>
}

/** A row of impact_jobs. */
export interface StoredImpactJob {
  id: string
  quantity_id: number
  dataset_id: number
  input_hash: string
  input: Record<string, unknown>
  task: ImpactJobTask | null
  state: ImpactJobState
  progress_done: number
  progress_total: number
  analysis_id: number | null
  error: ImpactJobError | null
  attempts: number
  worker: string | null
  created_by: number
  created_at: Date
  started_at: Date | null
  finished_at: Date | null
}

/** The analysis as the client reads it: the stored result with its id, creation time and the request behind it. */
export function analysisOf(row: { id: number; created_at: Date; input: ImpactRequest; result: ImpactFindings }, cached: boolean): ImpactResult {
  return { id: row.id, cached, createdAt: row.created_at.toISOString(), input: row.input, ...row.result }
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i
export const isJobId = (id: string) => UUID.test(id)

export async function findImpactJob(db: Db, id: string): Promise<StoredImpactJob | undefined> {
  if (!isJobId(id)) return undefined
  return db('impact_jobs').where({ id }).first()
}

/** A job the queue no longer hands out although it never finished: its worker stopped on every attempt, or it expired. */
const ABANDONED: ImpactJobError = { status: 500, message: 'The analysis stopped before it finished (its worker stopped or ran out of time). Run it again.', fields: {} }

/** Whether the queue has given up on a job (its entry failed, was cancelled or completed, or vanished): nothing will finish it. */
async function queueGaveUp(db: Db, id: string): Promise<boolean> {
  const { rows } = await db.raw<{ rows: { state: string }[] }>(`SELECT state FROM ??.job WHERE id = ?`, [PGBOSS_SCHEMA, id])
  const queueState = rows[0]?.state
  return queueState === undefined || queueState === 'failed' || queueState === 'cancelled' || queueState === 'completed'
}

const isActive = (state: ImpactJobState) => (ACTIVE_JOB_STATES as readonly ImpactJobState[]).includes(state)

/**
 * The job as the client reads it. A job still queued or running whose queue entry has failed, expired or vanished is
 * reported failed: nothing will finish it.
 */
export async function toImpactJob(db: Db, stored: StoredImpactJob): Promise<ImpactJob<ImpactResult>> {
  let job = stored
  let { state, error } = job
  if (isActive(state) && (await queueGaveUp(db, job.id))) {
    // A worker finishes the job row before the queue entry: read the row again, after the queue's state.
    job = (await findImpactJob(db, job.id)) ?? job
    ;({ state, error } = job)
    if (isActive(state)) {
      state = 'failed'
      error = ABANDONED
    }
  }
  let result: ImpactResult | null = null
  if (state === 'done' && job.analysis_id !== null) {
    const analysis = await db('impact_analyses').where({ id: job.analysis_id }).first('id', 'created_at', 'input', 'result', 'job_id')
    if (analysis) result = analysisOf(analysis, analysis.job_id !== job.id)
  }
  return {
    id: job.id,
    quantityId: job.quantity_id,
    state,
    progress: { done: job.progress_done, total: job.progress_total },
    createdAt: job.created_at.toISOString(),
    startedAt: job.started_at?.toISOString() ?? null,
    finishedAt: job.finished_at?.toISOString() ?? null,
    result,
    error,
  }
}

/** A quantity's jobs that may still finish (queued or running, and not given up by the queue), newest first. */
export async function activeImpactJobs(db: Db, quantityId: number): Promise<ImpactJob<ImpactResult>[]> {
  const rows: StoredImpactJob[] = await db('impact_jobs').where({ quantity_id: quantityId }).whereIn('state', ACTIVE_JOB_STATES).orderBy('created_at', 'desc')
  const jobs = await Promise.all(rows.map((row) => toImpactJob(db, row)))
  return jobs.filter((job) => isActive(job.state))
}

/**
 * Cancels a queued or running job: it ends "cancelled", with its audit event in the same transaction, and stores nothing
 * (completeImpactJob stores only a running job; a worker holding it stops at its next step). A job already cancelled is
 * answered as it is; one that finished (done or failed, or given up by the queue) cannot be cancelled: 409.
 */
export async function cancelImpactJob(db: Db, user: User, job: StoredImpactJob, studyId: number): Promise<StoredImpactJob> {
  return db.transaction(async (trx) => {
    const current: StoredImpactJob = await trx('impact_jobs').where({ id: job.id }).forUpdate().first()
    if (current.state === 'cancelled') return current
    if (!isActive(current.state) || (await queueGaveUp(trx, current.id))) {
      throw new HttpError(409, 'This analysis has already finished; only a queued or running analysis can be cancelled.')
    }
    const [cancelled] = await trx('impact_jobs').where({ id: job.id })
      .update({ state: 'cancelled', finished_at: trx.fn.now(), error: null }).returning('*')
    await recordAudit(trx, {
      actorId: user.id, studyId, action: 'impact.cancel', subject: `quantity:${current.quantity_id}`,
      details: { jobId: current.id, was: current.state, progress: { done: current.progress_done, total: current.progress_total } },
    })
    return cancelled as StoredImpactJob
  })
}

/**
 * Takes a job for computation: queued, or running on a worker that stopped (the queue hands it out again). A job
 * already done, failed or cancelled is not taken again. The progress of an earlier attempt stays: progress never goes
 * back (the new attempt's writes take over once they pass it).
 */
export async function claimImpactJob(db: Db, id: string, worker: string): Promise<StoredImpactJob | undefined> {
  const [job] = await db('impact_jobs').where({ id }).whereIn('state', ACTIVE_JOB_STATES)
    .update({ state: 'running', started_at: db.fn.now(), attempts: db.raw('attempts + 1'), worker })
    .returning('*')
  return job
}

/**
 * Writes a running job's progress (never lower than it was) and tells whether it is still running: false when it was
 * cancelled (or finished by another worker), so the worker stops computing it.
 */
export async function syncImpactProgress(db: Db, id: string, done: number): Promise<boolean> {
  const rows = await db('impact_jobs').where({ id, state: 'running' })
    .update({ progress_done: db.raw('GREATEST(progress_done, ?)', [done]) }).returning('id')
  return rows.length > 0
}

/**
 * Stores the analysis of a job with its audit event, in one transaction, once: the job row is locked, and a job
 * another worker already finished is left as it is (returns false).
 */
export async function completeImpactJob(db: Db, job: StoredImpactJob, computed: ImpactComputation): Promise<boolean> {
  const task = job.task!
  return db.transaction(async (trx) => {
    const current = await trx('impact_jobs').where({ id: job.id }).forUpdate().first('state')
    if (current?.state !== 'running') return false
    const result: ImpactFindings = { ...task.resultBase, ...computed }
    const [analysis] = await trx('impact_analyses').insert({
      quantity_id: job.quantity_id, dataset_id: job.dataset_id, input_hash: job.input_hash, prior_hash: task.priorHash,
      input: JSON.stringify(job.input), result: JSON.stringify(result), created_by: job.created_by, job_id: job.id,
    }).returning('id')
    await recordAudit(trx, {
      actorId: job.created_by, studyId: task.studyId, action: 'impact.run', subject: `quantity:${job.quantity_id}`,
      details: { analysisId: analysis.id, datasetId: job.dataset_id, candidates: task.compute.candidates.length },
    })
    await trx('impact_jobs').where({ id: job.id })
      .update({ state: 'done', analysis_id: analysis.id, progress_done: job.progress_total, finished_at: trx.fn.now(), error: null })
    return true
  })
}

/** Records why a job failed, unless another worker finished it meanwhile. */
export async function failImpactJob(db: Db, id: string, error: ImpactJobError): Promise<void> {
  await db('impact_jobs').where({ id, state: 'running' }).update({ state: 'failed', error: JSON.stringify(error), finished_at: db.fn.now() })
}
