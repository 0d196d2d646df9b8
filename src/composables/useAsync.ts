import { ref, shallowRef, type Ref, type ShallowRef } from 'vue'
import { errorMessage } from '@/api/client'

export interface AsyncState<T, A extends unknown[]> {
  /** Result of the last successful run. */
  data: ShallowRef<T | undefined>
  /** Error of the last run, null after success. */
  error: ShallowRef<Error | null>
  loading: Ref<boolean>
  /** Runs the task; resolves to its result, or undefined when it failed (see `error`). */
  run: (...args: A) => Promise<T | undefined>
}

/**
 * Loading and error state around an async task. Only the latest run updates the state,
 * so a slow earlier request cannot overwrite a newer answer.
 */
export function useAsync<T, A extends unknown[] = []>(
  task: (...args: A) => Promise<T>,
  options: { immediate?: boolean } = {},
): AsyncState<T, A> {
  const data = shallowRef<T>()
  const error = shallowRef<Error | null>(null)
  const loading = ref(false)
  let latest = 0

  async function run(...args: A): Promise<T | undefined> {
    const id = ++latest
    loading.value = true
    error.value = null
    try {
      const result = await task(...args)
      if (id === latest) data.value = result
      return result
    } catch (caught) {
      if (id === latest) error.value = caught instanceof Error ? caught : new Error(errorMessage(caught))
      return undefined
    } finally {
      if (id === latest) loading.value = false
    }
  }

  if (options.immediate) void run(...([] as unknown as A))

  return { data, error, loading, run }
}
