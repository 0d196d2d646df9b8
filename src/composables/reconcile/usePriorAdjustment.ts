import { computed, ref, watch, type Ref } from 'vue'
import { sumSquaredError, validateDistribution, type Distribution, type Family } from '@shared/stats'
import { FAMILY_PARAMS, paramOf } from '@shared/format'
import { errorMessage } from '@/api/client'
import type { ReconciliationView } from '@/api/reconciliation'
import { implied, type Preview } from '@/reconcile/preview'
import type { ReconcileForm } from './useReconcileForm'

function paramsOf(d: Distribution, digits?: number): Record<string, number | null> {
  const round = (v: number) => (digits ? Number(v.toPrecision(digits)) : v)
  return Object.fromEntries(FAMILY_PARAMS[d.family].map((p) => [p.key, round(paramOf(d, p.key))]))
}

/**
 * The prior's family and its parameters: the chosen family's fit to the combination, or parameters the analyst
 * adjusted by hand (checked by the engine as they are typed), kept in step with the form's `distribution`.
 */
export function usePriorAdjustment(form: ReconcileForm, preview: Ref<Preview | null>) {
  const adjusting = ref(false)
  const adjustParams = ref<Record<string, number | null>>({})
  const family = form.family

  const chosenFit = computed(() => (family.value ? preview.value?.fits.find((f) => f.distribution.family === family.value) ?? null : null))
  const adjusted = computed<{ distribution: Distribution | null; problem: string | null }>(() => {
    if (!adjusting.value || !family.value) return { distribution: null, problem: null }
    const candidate = { family: family.value, ...adjustParams.value } as unknown as Distribution
    const missing = FAMILY_PARAMS[family.value].find((p) => typeof adjustParams.value[p.key] !== 'number')
    if (missing) return { distribution: null, problem: `Enter the ${missing.label}` }
    try {
      validateDistribution(candidate)
      return { distribution: candidate, problem: null }
    } catch (err) {
      return { distribution: null, problem: errorMessage(err) }
    }
  })
  watch(() => (adjusting.value && family.value ? { family: family.value, ...adjustParams.value } : null), (d) => form.setFieldValue('distribution', d, false), { immediate: true, deep: true })

  /** The prior as it stands: the hand-adjusted parameters when valid, else the chosen family's fit. */
  const prior = computed<Distribution | null>(() => adjusted.value.distribution ?? chosenFit.value?.distribution ?? null)
  const priorImplied = computed(() => (prior.value ? implied(prior.value) : null))
  const adjustedSse = computed(() => (adjusted.value.distribution && preview.value?.fitPoints.length ? sumSquaredError(adjusted.value.distribution, preview.value.fitPoints) : null))

  function startAdjust(): void {
    const base = chosenFit.value?.distribution
    if (!base) return
    // Six significant digits: readable in the inputs, and no visible change to the fit.
    adjustParams.value = paramsOf(base, 6)
    adjusting.value = true
  }

  function choose(f: Family): void {
    form.setFieldValue('family', f)
    if (adjusting.value) startAdjust()
  }

  function discardAdjust(): void {
    adjusting.value = false
    adjustParams.value = {}
  }

  function setParam(key: string, v: number | null | undefined): void {
    adjustParams.value = { ...adjustParams.value, [key]: typeof v === 'number' && Number.isFinite(v) ? v : null }
  }

  /** Shows the saved hand adjustment of the round on screen, if any. */
  function restore(v: ReconciliationView): void {
    const saved = v.saved && v.saved.roundId === v.roundId ? v.saved : null
    adjusting.value = !!saved?.adjusted && !!saved.distribution
    adjustParams.value = saved?.adjusted && saved.distribution ? paramsOf(saved.distribution) : {}
  }

  return { adjusting, adjustParams, chosenFit, adjusted, prior, priorImplied, adjustedSse, choose, startAdjust, discardAdjust, setParam, restore }
}

export type PriorAdjustment = ReturnType<typeof usePriorAdjustment>
