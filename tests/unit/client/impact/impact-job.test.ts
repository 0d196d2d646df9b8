import { effectScope } from 'vue'
import { describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/client'
import type { ImpactJob } from '@/api/impact'

/** Answers to successive GETs of the job, in order; an Error is thrown instead of answered. */
const answers: (ImpactJob | Error)[] = []
vi.mock('@/api/impact', () => ({
  impactApi: {
    job: vi.fn(async () => {
      const next = answers.shift()
      if (!next) throw new Error('no more answers')
      if (next instanceof Error) throw next
      return next
    }),
  },
}))
const { JobNoLongerFollowed, useImpactJob } = await import('@/composables/useImpactJob')

const job = (state: ImpactJob['state'], done: number, extra: Partial<ImpactJob> = {}): ImpactJob => ({
  id: '0b7c5a4e-2f7e-4c55-9d36-1f0c8e2a9b10', quantityId: 3, state, progress: { done, total: 8 },
  createdAt: '2026-12-03T10:00:00.000Z', startedAt: null, finishedAt: null, result: null, error: null, ...extra,
})

describe('useImpactJob: following an analysis on the queue', () => {
  it('reads the job until it is done, with its progress on the way, and resolves with the analysis', async () => {
    const result = { id: 41 } as unknown as NonNullable<ImpactJob['result']>
    answers.splice(0, answers.length, job('running', 2), job('running', 6), job('done', 8, { result }))
    const scope = effectScope()
    const follower = scope.run(() => useImpactJob(1))!
    const seen: number[] = []
    const watcher = setInterval(() => seen.push(follower.progress.value), 0)
    await expect(follower.follow(job('queued', 0))).resolves.toBe(result)
    clearInterval(watcher)
    expect(follower.job.value?.state).toBe('done')
    expect(follower.progress.value).toBe(1)
    expect(seen.every((p, i) => i === 0 || p >= seen[i - 1])).toBe(true)
    scope.stop()
  })

  it('turns a failed job into an ApiError with its status, message and field messages, as a refused request', async () => {
    answers.splice(0, answers.length, job('failed', 3, { error: { status: 400, message: 'The analysis cannot be run with these inputs', fields: { factors: 'Width factors must be positive numbers.' } } }))
    const scope = effectScope()
    const follower = scope.run(() => useImpactJob(1))!
    const failure = await follower.follow(job('running', 1)).catch((e) => e)
    expect(failure).toBeInstanceOf(ApiError)
    expect([failure.status, failure.message, failure.fields]).toEqual([400, 'The analysis cannot be run with these inputs', { factors: 'Width factors must be positive numbers.' }])
    scope.stop()
  })

  it('rides out a few failed reads (server restarting), but not a refusal', async () => {
    const result = { id: 42 } as unknown as NonNullable<ImpactJob['result']>
    answers.splice(0, answers.length, new ApiError(503, 'The database is not reachable'), new ApiError(0, 'offline'), job('done', 8, { result }))
    const scope = effectScope()
    const follower = scope.run(() => useImpactJob(1))!
    await expect(follower.follow(job('queued', 0))).resolves.toBe(result)
    answers.splice(0, answers.length, new ApiError(403, 'You are not a member of this study'))
    await expect(follower.follow(job('queued', 0))).rejects.toMatchObject({ status: 403 })
    scope.stop()
  })

  it('stops following when the page that follows goes away', async () => {
    answers.splice(0, answers.length, job('running', 1), job('running', 2))
    const scope = effectScope()
    const follower = scope.run(() => useImpactJob(50))!
    const followed = follower.follow(job('queued', 0)).catch((e) => e)
    scope.stop()
    expect(await followed).toBeInstanceOf(JobNoLongerFollowed)
  })
})
