// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/client'
import { useAutosave } from '@/composables/useAutosave'

function deferred() {
  let resolve!: () => void
  let reject!: (e: unknown) => void
  const promise = new Promise<void>((res, rej) => {
    resolve = res
    reject = rej
  })
  return { promise, resolve, reject }
}

describe('useAutosave', () => {
  beforeEach(() => {
    vi.useFakeTimers()
  })
  afterEach(() => {
    vi.useRealTimers()
  })

  it('saves once, 800 ms after the last change', async () => {
    const save = vi.fn(async () => {})
    const a = useAutosave({ blockedBy: () => null, save })
    a.changed()
    await vi.advanceTimersByTimeAsync(500)
    a.changed()
    await vi.advanceTimersByTimeAsync(500)
    a.changed()
    expect(a.status.value.state).toBe('pending')
    await vi.advanceTimersByTimeAsync(799)
    expect(save).not.toHaveBeenCalled()
    await vi.advanceTimersByTimeAsync(1)
    expect(save).toHaveBeenCalledTimes(1)
    expect(a.status.value.state).toBe('saved')
    expect(a.isDirty()).toBe(false)
  })

  it('does not save an answer with a problem, and says why; saves once it is fixed', async () => {
    let problem: string | null = 'The upper bound must be above your lower bound (4)'
    const save = vi.fn(async () => {})
    const a = useAutosave({ blockedBy: () => problem, save })
    a.changed()
    expect(a.status.value).toEqual({ state: 'blocked', message: 'The upper bound must be above your lower bound (4)' })
    await vi.advanceTimersByTimeAsync(2000)
    expect(save).not.toHaveBeenCalled()
    expect(await a.flush()).toBe(false)
    problem = null
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(save).toHaveBeenCalledTimes(1)
  })

  it('sends one request at a time: a change during a save is saved right after it', async () => {
    const first = deferred()
    const versions: number[] = []
    let version = 1
    const save = vi.fn(async () => {
      versions.push(version)
      if (versions.length === 1) await first.promise
      version += 1
    })
    const a = useAutosave({ blockedBy: () => null, save })
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(a.status.value.state).toBe('saving')
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(save).toHaveBeenCalledTimes(1)
    first.resolve()
    await vi.advanceTimersByTimeAsync(800)
    expect(save).toHaveBeenCalledTimes(2)
    // The second save went out with the version the first one returned.
    expect(versions).toEqual([1, 2])
    expect(a.status.value.state).toBe('saved')
  })

  it('stops on 409 (saved from another window) until resumed after a reload', async () => {
    const onConflict = vi.fn()
    const save = vi.fn(async (): Promise<void> => {
      throw new ApiError(409, 'This answer was saved from another window or device since you loaded it; reload to continue from the newer version')
    })
    const a = useAutosave({ blockedBy: () => null, save, onConflict })
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(a.status.value.state).toBe('conflict')
    expect(onConflict).toHaveBeenCalledTimes(1)
    a.changed()
    await vi.advanceTimersByTimeAsync(5000)
    expect(save).toHaveBeenCalledTimes(1)
    expect(await a.flush()).toBe(false)
    save.mockImplementation(async () => {})
    a.resume(new Date('2026-03-03T09:05:00'))
    expect(a.status.value.state).toBe('saved')
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(save).toHaveBeenCalledTimes(2)
  })

  it('keeps a failed save to try again, and shows a 400 field message as the reason', async () => {
    const save = vi.fn(async (): Promise<void> => {
      throw new ApiError(0, 'The server could not be reached. Check your connection and try again.')
    })
    const a = useAutosave({ blockedBy: () => null, save })
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(a.status.value).toEqual({ state: 'failed', message: 'The server could not be reached. Check your connection and try again.' })
    expect(a.isDirty()).toBe(true)
    save.mockImplementationOnce(async () => {
      throw new ApiError(400, 'Some values need attention', { 'points.50 %': 'The 50 % value must be above the 25 % value (8)' })
    })
    await a.retry()
    expect(a.status.value).toEqual({ state: 'blocked', message: 'The 50 % value must be above the 25 % value (8)' })
    save.mockImplementation(async () => {})
    expect(await a.flush()).toBe(true)
    expect(a.status.value.state).toBe('saved')
  })

  it('retries a save that failed while the server was unavailable, with growing pauses, until it lands', async () => {
    let calls = 0
    const save = vi.fn(async (): Promise<void> => {
      calls += 1
      if (calls <= 2) throw new ApiError(503, 'The database is unavailable for a moment; nothing was saved. Try again shortly.')
    })
    const a = useAutosave({ blockedBy: () => null, save, retryBase: 1000 })
    a.changed()
    await vi.advanceTimersByTimeAsync(800)
    expect(save).toHaveBeenCalledTimes(1)
    expect(a.status.value.state).toBe('failed')
    await vi.advanceTimersByTimeAsync(999)
    expect(save).toHaveBeenCalledTimes(1)
    await vi.advanceTimersByTimeAsync(1)
    expect(save).toHaveBeenCalledTimes(2)
    await vi.advanceTimersByTimeAsync(1999)
    expect(save).toHaveBeenCalledTimes(2)
    await vi.advanceTimersByTimeAsync(1)
    expect(save).toHaveBeenCalledTimes(3)
    expect(a.status.value.state).toBe('saved')
    expect(a.isDirty()).toBe(false)
  })

  it('flush saves at once without waiting for the pause', async () => {
    const save = vi.fn(async () => {})
    const a = useAutosave({ blockedBy: () => null, save })
    a.changed()
    expect(await a.flush()).toBe(true)
    expect(save).toHaveBeenCalledTimes(1)
    await vi.advanceTimersByTimeAsync(2000)
    expect(save).toHaveBeenCalledTimes(1)
  })
})
