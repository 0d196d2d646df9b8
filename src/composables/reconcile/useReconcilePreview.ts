import { computed, onBeforeUnmount, shallowRef, watch, type Ref } from 'vue'
import type { ReconciliationView } from '@/api/reconciliation'
import { computePreview, liveCooke, liveOptimisedCutoff, type Preview, type PreviewInput } from '@/reconcile/preview'
import { performanceWeightCautions } from '@shared/elicitation/weights'
import type { ReconcileForm } from './useReconcileForm'

/** Delay before the heavier preview (fits, leave-one-out) follows typing and dragging. */
const PREVIEW_DELAY = 120

/**
 * The live preview of the analyst's choices, computed in the browser with the shared engine: new data shows at
 * once, choices being typed or dragged settle for a moment first. Cooke's scores follow the cutoff instantly.
 */
export function useReconcilePreview(view: Ref<ReconciliationView | null>, form: ReconcileForm) {
  const previewInput = computed<PreviewInput | null>(() => {
    const v = view.value
    if (!v) return null
    return {
      method: form.methodValue.value,
      experts: v.experts,
      excluded: [...form.excluded.value],
      weightsMode: form.weightsMode.value,
      customWeights: { ...form.customWeights.value },
      cutoff: form.cutoffValue.value,
      calibration: v.calibration,
      consensus: form.consensusRows.value.map((r) => ({ ...r })),
      support: v.support,
    }
  })
  const preview = shallowRef<Preview | null>(null)
  let previewTimer: ReturnType<typeof setTimeout> | undefined
  watch(previewInput, (input, old) => {
    clearTimeout(previewTimer)
    if (!input) {
      preview.value = null
      return
    }
    if (!old || old.experts !== input.experts || !preview.value) preview.value = computePreview(input)
    else previewTimer = setTimeout(() => { preview.value = computePreview(input) }, PREVIEW_DELAY)
  }, { immediate: true })
  onBeforeUnmount(() => clearTimeout(previewTimer))

  /** Cooke's scores at the chosen cutoff (cheap, so without delay). */
  const cookeNow = computed(() => (view.value ? liveCooke(view.value.calibration, form.included.value, form.cutoffValue.value) : null))
  /** The same scores with every included expert kept (cutoff 0). */
  const cookeAll = computed(() => (view.value ? liveCooke(view.value.calibration, form.included.value, 0) : null))
  /** Cooke's optimised cutoff for the included experts, offered beside the cutoff field. */
  const optimisedCutoff = computed(() => (view.value ? liveOptimisedCutoff(view.value.calibration, form.included.value) : null))

  /** Plain cautions when performance weights rest on too few calibration questions or experts (same rule as the record). */
  const weightCautions = computed(() => (view.value ? performanceWeightCautions(view.value.calibration.questionCount, form.included.value.length) : []))

  const weightsById = computed<Record<number, number> | null>(() => {
    const p = preview.value
    if (!p || form.methodValue.value === 'consensus' || p.weights.length !== p.included.length) return null
    return Object.fromEntries(p.included.map((e, i) => [e.expertId, p.weights[i]]))
  })
  const summary = computed(() => preview.value?.summary ?? null)

  return { preview, cookeNow, cookeAll, optimisedCutoff, weightCautions, weightsById, summary }
}
