import { ref } from 'vue'
import { defineStore } from 'pinia'
import { impactApi, type ImpactJob, type ImpactRequest, type ImpactResult } from '@/api/impact'

/** Impact analyses: the result shown for each quantity, and which quantity is being computed. */
export const useImpactStore = defineStore('impact', () => {
  /** Latest result per quantity id (null: none run yet). */
  const results = ref<Record<number, ImpactResult | null>>({})
  /** Where each shown result came from: this page's run, or the latest stored analysis. */
  const origin = ref<Record<number, 'run' | 'stored'>>({})
  /** Quantity whose analysis is running on the server, or null. */
  const running = ref<number | null>(null)

  /** GET the newest stored analysis of a quantity (analysts and reviewers). */
  async function fetchLatest(quantityId: number): Promise<ImpactResult | null> {
    const result = await impactApi.latest(quantityId)
    results.value = { ...results.value, [quantityId]: result }
    origin.value = { ...origin.value, [quantityId]: 'stored' }
    return result
  }

  /** Follows a job until it ends, with `running` set meanwhile; shows its analysis (with the request `input` when given). */
  async function track(quantityId: number, job: () => Promise<ImpactJob>, follow: (job: ImpactJob) => Promise<ImpactResult>, input?: ImpactRequest): Promise<ImpactResult> {
    running.value = quantityId
    try {
      const result = await follow(await job())
      results.value = { ...results.value, [quantityId]: input ? { ...result, input } : result }
      origin.value = { ...origin.value, [quantityId]: 'run' }
      return result
    } finally {
      if (running.value === quantityId) running.value = null
    }
  }

  /**
   * Queues a run and waits for it with `follow` (useImpactJob, owned by the page that shows the progress); the server
   * answers from its cache when the same inputs were run before (`cached`).
   */
  function run(quantityId: number, body: ImpactRequest, follow: (job: ImpactJob) => Promise<ImpactResult>): Promise<ImpactResult> {
    return track(quantityId, () => impactApi.run(quantityId, body), follow, body)
  }

  /**
   * Picks up the quantity's newest analysis still queued or running (the page was left or reloaded while it ran) and
   * follows it; null when there is none.
   */
  async function resume(quantityId: number, follow: (job: ImpactJob) => Promise<ImpactResult>): Promise<ImpactResult | null> {
    if (running.value === quantityId) return null
    const [newest] = await impactApi.active(quantityId)
    if (!newest || running.value === quantityId) return null
    return track(quantityId, async () => newest, follow)
  }

  function clear(): void {
    results.value = {}
    origin.value = {}
    running.value = null
  }

  return { results, origin, running, fetchLatest, run, resume, clear }
})
