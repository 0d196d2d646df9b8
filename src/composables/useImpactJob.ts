import { computed, onScopeDispose, shallowRef } from 'vue'
import { ApiError } from '@/api/client'
import { impactApi, type ImpactJob, type ImpactResult } from '@/api/impact'

/** The page that followed the job went away; the job itself goes on on the server. */
export class JobNoLongerFollowed extends Error {
  constructor() {
    super('No longer following this analysis')
  }
}

/** The job was cancelled (on this page or by another analyst) before it finished; it stored nothing. */
export class JobCancelled extends Error {
  constructor() {
    super('The analysis was cancelled before it finished; nothing was stored.')
  }
}

/** Consecutive failed reads (the network or the server away for a moment) before following gives up. */
const READ_ATTEMPTS = 5

const isActive = (j: ImpactJob | null) => j?.state === 'queued' || j?.state === 'running'

/**
 * Follows an impact analysis job on the server's queue: reads it every `intervalMs` until a worker has done it, it
 * failed or it was cancelled, keeping `job` and `progress` (0–1) current for a progress bar; `cancel` stops the job
 * followed. Following stops with the component that uses it.
 */
export function useImpactJob(intervalMs = 500) {
  const job = shallowRef<ImpactJob | null>(null)
  /** The job as the cancel request answered it, taken by `follow` at once instead of at its next read. */
  let answered: ImpactJob | null = null
  const answeredFor = (id: string) => (answered?.id === id ? answered : null)
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

  /**
   * Resolves with the analysis; rejects with an ApiError carrying the job's status, message and field messages when it
   * failed, and with JobCancelled when it was cancelled.
   */
  async function follow(submitted: ImpactJob): Promise<ImpactResult> {
    let current = submitted
    job.value = current
    answered = null
    let failedReads = 0
    while (isActive(current)) {
      await pause(intervalMs * (1 + failedReads))
      if (disposed) throw new JobNoLongerFollowed()
      const cancelled = answeredFor(current.id)
      if (cancelled) {
        current = cancelled
        continue
      }
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
    if (current.state === 'cancelled') throw new JobCancelled()
    if (current.state === 'failed') {
      const e = current.error ?? { status: 500, message: 'The analysis failed on the server.', fields: {} }
      throw new ApiError(e.status, e.message, e.fields)
    }
    return current.result!
  }

  /** Cancels the job followed, if it is still queued or running; `follow` then rejects with JobCancelled. */
  async function cancel(): Promise<void> {
    const current = job.value
    if (!isActive(current)) return
    const after = await impactApi.cancel(current!.id)
    if (job.value?.id !== after.id) return
    answered = after
    job.value = after
    wake?.()
  }

  /** Drops the job followed last (before another is asked for): the progress shows nothing stale meanwhile. */
  function forget(): void {
    job.value = null
    answered = null
  }

  return { job, progress, follow, cancel, forget }
}
