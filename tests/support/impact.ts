import type { ImpactJob } from '../../shared/api/impact-jobs'
import type { Client } from './api'
import { waitFor } from './wait'

export interface ImpactRun {
  /** 200 with the analysis when the job is done; the job's error status (400 inputs, 500 server) when it failed; or the refusal of the request. */
  status: number
  /** The analysis, or `{ error: { message, fields } }` as a refused request carries it. */
  body: any
  /** The answer to the POST: 202 with a queued job, 200 with a job already done (cached), or a refusal. */
  submitted: { status: number; body: any; location?: string }
  /** The job as last read. */
  job?: ImpactJob
}

/**
 * Runs an impact analysis as the client does: POST (answered at once with a job), then GET the job until a worker has
 * done it or it failed. The API suites' workers run in the global setup (tests/support/global-setup.ts).
 */
export async function runImpact(client: Client, quantityId: number, body: object, deadlineMs = 60_000): Promise<ImpactRun> {
  const res = await client.post(`/api/quantities/${quantityId}/impact`, body)
  const submitted = { status: res.status, body: res.body, location: res.headers.location as string | undefined }
  if (res.status !== 200 && res.status !== 202) return { status: res.status, body: res.body, submitted }
  const job = await waitFor(`impact job ${res.body.id} to finish`, async () => {
    const current = res.body.state === 'done' ? res.body as ImpactJob : (await client.get(`/api/impact-jobs/${res.body.id}`).expect(200)).body as ImpactJob
    return current.state === 'done' || current.state === 'failed' ? current : null
  }, deadlineMs)
  if (job.state === 'done') return { status: 200, body: job.result, submitted, job }
  return { status: job.error!.status, body: { error: { message: job.error!.message, fields: job.error!.fields } }, submitted, job }
}

/** runImpact that must end with the analysis done (status 200); anything else fails the test with what came back. */
export async function impactDone(client: Client, quantityId: number, body: object): Promise<ImpactRun> {
  const run = await runImpact(client, quantityId, body)
  if (run.status !== 200) throw new Error(`impact analysis of quantity ${quantityId}: expected 200, got ${run.status} ${JSON.stringify(run.body)}`)
  return run
}
