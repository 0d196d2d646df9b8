import { getCurrentScope, onScopeDispose, ref, watch, type Ref } from 'vue'

/**
 * Inline messages that keep pace with typing without nagging: a fixed problem disappears at once, a new one shows
 * after a short pause in typing (or at once when the field is left, or when `showAll` is called).
 */
export function useDelayedProblems(problems: Ref<Record<string, string>>, delay = 500) {
  const shown = ref<Record<string, string>>({})
  let timer: ReturnType<typeof setTimeout> | null = null

  const showAll = () => {
    if (timer !== null) clearTimeout(timer)
    timer = null
    shown.value = { ...problems.value }
  }

  watch(
    problems,
    (now) => {
      // Drop what is fixed, keep unchanged messages, update changed ones right away.
      const next: Record<string, string> = {}
      let pending = false
      for (const [key, message] of Object.entries(now)) {
        if (key in shown.value) next[key] = message
        else pending = true
      }
      shown.value = next
      if (timer !== null) clearTimeout(timer)
      timer = pending ? setTimeout(showAll, delay) : null
    },
    { immediate: true, deep: true },
  )

  /** Show the problem of one field now (it was left). */
  function showField(key: string): void {
    const message = problems.value[key]
    if (message && shown.value[key] !== message) shown.value = { ...shown.value, [key]: message }
  }

  if (getCurrentScope()) onScopeDispose(() => timer !== null && clearTimeout(timer))

  return { shown, showAll, showField }
}
