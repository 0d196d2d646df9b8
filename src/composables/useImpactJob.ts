import { computed, onScopeDispose, shallowRef } from 'vue'
import { ApiError } from '@/api/client'
import { impactApi, type ImpactJob, type ImpactResult } from '@/api/impact'

/** The page that followed the job went away; the job itself goes on on the server. */
export class JobNoLongerFollowed extends Error {
  constructor() {
    super('No longer following this analysis')
  }
}

/** Consecutive failed reads (the network or the server away for a moment) before following gives up. */
const READ_ATTEMPTS = 5

/**
 * Follows an impact analysis job on the server's queue: reads it every `intervalMs` until a worker has done it or it
 * failed, keeping `job` and `progress` (0–1) current for a progress bar. Following stops with the component that uses it.
 */
export function useImpactJob(intervalMs = 500) {
  const job = shallowRef<ImpactJob | null>(null)
  const progress = computed(() => {
    const p = job.value?.progress
    return p && p.total > 0 ? Math.min(1, p.done / p.total) : 0
  })
  let disposed = false
  let wake: (() => void) | null = null
  onScopeDispose(() => {
    disposed = true
    wake?.()
  })

  const pause = (ms: number) => new Promise<void>((resolve) => {
    const timer = setTimeout(done, ms)
    function done() {
      clearTimeout(timer)
      wake = null
      resolve()
    }
    wake = done
  })

  /** Resolves with the analysis; rejects with an ApiError carrying the job's status, message and field messages when it failed. */
  async function follow(submitted: ImpactJob): Promise<ImpactResult> {
    let current = submitted
    job.value = current
    let failedReads = 0
    while (current.state === 'queued' || current.state === 'running') {
      await pause(intervalMs * (1 + failedReads))
      if (disposed) throw new JobNoLongerFollowed()
      try {
        current = await impactApi.job(current.id)
        failedReads = 0
      } catch (err) {
        const passing = err instanceof ApiError && (err.status === 0 || err.status >= 500)
        if (!passing || ++failedReads >= READ_ATTEMPTS) throw err
        continue
      }
      if (disposed) throw new JobNoLongerFollowed()
      job.value = current
    }
    if (current.state === 'failed') {
      const e = current.error ?? { status: 500, message: 'The analysis failed on the server.', fields: {} }
      throw new ApiError(e.status, e.message, e.fields)
    }
    return current.result!
  }

  return { job, progress, follow }
}
