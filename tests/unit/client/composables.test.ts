// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { ApiError } from '@/api/client'
import { applyServerErrors } from '@/composables/serverErrors'
import { useAsync } from '@/composables/useAsync'

function deferred<T>() {
  let resolve!: (value: T) => void
  let reject!: (error: unknown) => void
  const promise = new Promise<T>((res, rej) => {
    resolve = res
    reject = rej
  })
  return { promise, resolve, reject }
}

describe('useAsync', () => {
  it('tracks loading, data and error', async () => {
    const first = deferred<string>()
    const state = useAsync(() => first.promise)
    expect(state.loading.value).toBe(false)
    const running = state.run()
    expect(state.loading.value).toBe(true)
    first.resolve('ok')
    await running
    expect(state.loading.value).toBe(false)
    expect(state.data.value).toBe('ok')
    expect(state.error.value).toBeNull()
  })

  it('keeps the error of a failed run and clears it on the next run', async () => {
    let fail = true
    const state = useAsync(async () => {
      if (fail) throw new ApiError(500, 'Database is down')
      return 1
    })
    await expect(state.run()).resolves.toBeUndefined()
    expect(state.error.value?.message).toBe('Database is down')
    fail = false
    await state.run()
    expect(state.error.value).toBeNull()
    expect(state.data.value).toBe(1)
  })

  it('lets only the latest run set the state', async () => {
    const slow = deferred<string>()
    const fast = deferred<string>()
    const queue = [slow, fast]
    const state = useAsync(() => queue.shift()!.promise)
    const a = state.run()
    const b = state.run()
    fast.resolve('new')
    await b
    slow.resolve('old')
    await a
    expect(state.data.value).toBe('new')
    expect(state.loading.value).toBe(false)
  })
})

describe('applyServerErrors', () => {
  it('puts known field errors on the fields and returns null when all were placed', () => {
    const set: Record<string, string> = {}
    const message = applyServerErrors(
      new ApiError(400, 'Some values are not valid', { email: 'This e-mail address is already in use' }),
      ['email', 'password'] as const,
      (f, m) => (set[f] = m),
    )
    expect(set).toEqual({ email: 'This e-mail address is already in use' })
    expect(message).toBeNull()
  })

  it('returns the message (and messages of unknown fields) for the form', () => {
    const set: Record<string, string> = {}
    expect(applyServerErrors(new ApiError(429, 'Too many sign-in attempts.'), ['email'] as const, (f, m) => (set[f] = m))).toBe(
      'Too many sign-in attempts.',
    )
    expect(
      applyServerErrors(new ApiError(400, 'Invalid', { email: 'Bad', extra: 'Unknown field: extra' }), ['email'] as const, (f, m) => (set[f] = m)),
    ).toBe('Invalid Unknown field: extra')
    expect(set).toEqual({ email: 'Bad' })
    expect(applyServerErrors(new Error('boom'), ['email'] as const, () => undefined)).toBe('boom')
  })
})
