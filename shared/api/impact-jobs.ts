/** Response shape of an impact analysis job (POST /api/quantities/:id/impact, GET /api/impact-jobs/:id). */

/** queued: waiting for a worker; running: a worker computes it; done: `result` holds the analysis; failed: `error` says why. */
export type ImpactJobState = 'queued' | 'running' | 'done' | 'failed'

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
  /** Steps finished of all steps (each candidate prior, each width of the sweep, the tipping point). */
  progress: { done: number; total: number }
  createdAt: string
  startedAt: string | null
  finishedAt: string | null
  result: Result | null
  error: ImpactJobError | null
}
