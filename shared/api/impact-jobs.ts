/** Response shape of an impact analysis job (POST /api/quantities/:id/impact, GET /api/impact-jobs/:id). */

/**
 * queued: waiting for a worker; running: a worker computes it; done: `result` holds the analysis; failed: `error` says
 * why; cancelled: an analyst stopped it before it finished, and it stored nothing.
 */
export type ImpactJobState = 'queued' | 'running' | 'done' | 'failed' | 'cancelled'

/** States in which a job may still finish (and may be cancelled). */
export const ACTIVE_JOB_STATES = ['queued', 'running'] as const satisfies readonly ImpactJobState[]

/** Why a job failed: status 400 with messages per field when the engine refuses the inputs, 500 when the server failed. */
export interface ImpactJobError {
  status: 400 | 500
  message: string
  fields: Record<string, string>
}

/** One requested analysis as it goes through the queue. `Result` is the analysis the client reads (src/api/impact.ts). */
export interface ImpactJob<Result = unknown> {
  id: string
  quantityId: number
  state: ImpactJobState
  /**
   * Steps finished of all steps: each candidate prior, the fractional Bayes factors, each candidate's sensitivity, each
   * width of the sweep, its two curves, the tipping point, and storing the result (done reaches total only once stored).
   */
  progress: { done: number; total: number }
  createdAt: string
  startedAt: string | null
  finishedAt: string | null
  result: Result | null
  error: ImpactJobError | null
}
