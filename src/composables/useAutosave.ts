import { getCurrentScope, onScopeDispose, shallowRef, type ShallowRef } from 'vue'
import { ApiError, errorMessage } from '@/api/client'

export type SaveStatus =
  /** Nothing changed since the answer was loaded. */
  | { state: 'idle' }
  /** Changed; saves once typing stops. */
  | { state: 'pending' }
  | { state: 'saving' }
  | { state: 'saved'; at: Date }
  /** Not saved because the answer has a problem the expert must fix first. */
  | { state: 'blocked'; message: string }
  /** The save failed (network, server); it is retried automatically with growing pauses, or at the next change. */
  | { state: 'failed'; message: string }
  /** 409: saved elsewhere since loaded, or frozen. No more saves until resume() after a reload. */
  | { state: 'conflict'; message: string }

export interface AutosaveOptions {
  /** Quiet time after the last change before saving (ms). */
  delay?: number
  /** Why the current answer must not be saved now (a problem to fix), or null. Incomplete is fine. */
  blockedBy: () => string | null
  /** Saves the current answer (reads it when called). Throws ApiError on failure. */
  save: () => Promise<void>
  /** Called once on a 409. */
  onConflict?: (error: ApiError) => void
  /** First pause before retrying a save that failed for a network or server reason (ms); it doubles up to 30 s. */
  retryBase?: number
}

export interface Autosave {
  status: ShallowRef<SaveStatus>
  /** Call on every change: restarts the quiet-time timer. */
  changed: () => void
  /** Saves now if anything is unsaved; resolves true when everything is saved. */
  flush: () => Promise<boolean>
  /** Try a failed save again. */
  retry: () => Promise<boolean>
  /** After reloading from the server: start clean (status idle, nothing unsaved). */
  resume: (saved?: Date) => void
  /** True while a change is not saved yet. */
  isDirty: () => boolean
  dispose: () => void
}

/**
 * Debounced autosave: saves `delay` ms after the last change, one request at a time (a change during a save is
 * saved right after it, with the version the first save returned), never while the answer has a problem, and
 * stops on 409 until the caller reloads.
 */
export function useAutosave(options: AutosaveOptions): Autosave {
  const delay = options.delay ?? 800
  const status = shallowRef<SaveStatus>({ state: 'idle' })
  let timer: ReturnType<typeof setTimeout> | null = null
  let dirty = false
  let running: Promise<void> | null = null
  let failures = 0
  const retryBase = options.retryBase ?? 2000

  const clearTimer = () => {
    if (timer !== null) clearTimeout(timer)
    timer = null
  }

  function changed(): void {
    if (status.value.state === 'conflict') return
    dirty = true
    clearTimer()
    const problem = options.blockedBy()
    if (problem) {
      status.value = { state: 'blocked', message: problem }
      return
    }
    if (status.value.state !== 'saving') status.value = { state: 'pending' }
    timer = setTimeout(() => {
      timer = null
      void run()
    }, delay)
  }

  async function run(): Promise<void> {
    if (running) return running.then(() => undefined)
    if (!dirty || status.value.state === 'conflict') return
    const problem = options.blockedBy()
    if (problem) {
      status.value = { state: 'blocked', message: problem }
      return
    }
    dirty = false
    status.value = { state: 'saving' }
    running = (async () => {
      try {
        await options.save()
        failures = 0
        status.value = { state: 'saved', at: new Date() }
      } catch (error) {
        if (error instanceof ApiError && error.status === 409) {
          status.value = { state: 'conflict', message: error.message }
          clearTimer()
          options.onConflict?.(error)
          return
        }
        dirty = true
        const fields = error instanceof ApiError ? Object.values(error.fields) : []
        if (error instanceof ApiError && error.status === 400 && fields.length) {
          status.value = { state: 'blocked', message: fields[0] }
        } else {
          // Network down or server unavailable: keep the typed values and try again with growing pauses.
          status.value = { state: 'failed', message: errorMessage(error) }
          failures += 1
          clearTimer()
          timer = setTimeout(() => {
            timer = null
            void run()
          }, Math.min(30_000, retryBase * 2 ** (failures - 1)))
        }
      } finally {
        running = null
      }
    })()
    await running
    // Typed on during the save: save that too, now that the new version is known.
    if (dirty && (status.value as SaveStatus).state === 'saved' && timer === null) {
      status.value = { state: 'pending' }
      timer = setTimeout(() => {
        timer = null
        void run()
      }, delay)
    }
  }

  async function flush(): Promise<boolean> {
    clearTimer()
    if (running) await running
    if (dirty && status.value.state !== 'conflict') await run()
    if (running) await running
    return !dirty && status.value.state !== 'conflict'
  }

  function resume(saved?: Date): void {
    clearTimer()
    dirty = false
    status.value = saved ? { state: 'saved', at: saved } : { state: 'idle' }
  }

  function dispose(): void {
    clearTimer()
  }

  if (getCurrentScope()) onScopeDispose(dispose)

  return { status, changed, flush, retry: flush, resume, isDirty: () => dirty, dispose }
}
