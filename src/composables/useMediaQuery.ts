import { onBeforeUnmount, ref, type Ref } from 'vue'

/** Whether a CSS media query matches now, kept up to date as the window changes size. */
export function useMediaQuery(query: string): Ref<boolean> {
  const list = typeof window !== 'undefined' && window.matchMedia ? window.matchMedia(query) : null
  const matches = ref(list?.matches ?? false)
  const onChange = (event: MediaQueryListEvent) => (matches.value = event.matches)
  list?.addEventListener('change', onChange)
  onBeforeUnmount(() => list?.removeEventListener('change', onChange))
  return matches
}

/** Below this width the answer screen stacks the form above its feedback (as in the screen's CSS). */
export const STACKED_ANSWER = '(max-width: 1100px)'
