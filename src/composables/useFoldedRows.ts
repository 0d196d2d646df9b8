import { computed, onBeforeUnmount, onMounted, ref, type Ref } from 'vue'

/**
 * A long list shown folded to its first `limit` rows until the reader asks for all of them: the record's long tables
 * (change history, panel) stay a screen long instead of pushing the sections below out of reach. A printed page has
 * no button to press, so every row is shown while the page prints.
 */
export function useFoldedRows<T>(rows: Ref<T[]>, limit: number) {
  const expanded = ref(false)
  const printing = ref(false)
  const foldable = computed(() => rows.value.length > limit)
  const shown = computed(() => (expanded.value || printing.value || !foldable.value ? rows.value : rows.value.slice(0, limit)))
  const hiddenCount = computed(() => rows.value.length - shown.value.length)
  const toggle = () => (expanded.value = !expanded.value)
  const beforePrint = () => (printing.value = true)
  const afterPrint = () => (printing.value = false)
  onMounted(() => {
    window.addEventListener('beforeprint', beforePrint)
    window.addEventListener('afterprint', afterPrint)
  })
  onBeforeUnmount(() => {
    window.removeEventListener('beforeprint', beforePrint)
    window.removeEventListener('afterprint', afterPrint)
  })
  return { shown, expanded, foldable, hiddenCount, toggle }
}
