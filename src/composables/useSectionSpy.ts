import { onBeforeUnmount, onMounted, ref, watch, type Ref } from 'vue'

/**
 * The id of the section heading the reader is at: the last of `ids` whose heading has passed a line a little below the
 * top of the window (under the sticky page header). Recomputed on scroll, at most once a frame.
 */
export function useSectionSpy(ids: Ref<string[]>, offset = 120) {
  const current = ref<string | null>(null)
  let frame = 0
  function measure() {
    frame = 0
    let at: string | null = ids.value[0] ?? null
    for (const id of ids.value) {
      const el = document.getElementById(id)
      if (el && el.getBoundingClientRect().top <= offset) at = id
    }
    current.value = at
  }
  const schedule = () => {
    if (!frame) frame = requestAnimationFrame(measure)
  }
  onMounted(() => {
    window.addEventListener('scroll', schedule, { passive: true })
    window.addEventListener('resize', schedule)
    schedule()
  })
  onBeforeUnmount(() => {
    window.removeEventListener('scroll', schedule)
    window.removeEventListener('resize', schedule)
    if (frame) cancelAnimationFrame(frame)
  })
  watch(ids, schedule)
  return current
}
