import { computed, type ComputedRef, type Ref, type ShallowRef } from 'vue'
import { pdf, quantile, type Distribution } from '@shared/stats'
import type { ReconcileExpert, ReconciliationView } from '@/api/reconciliation'
import type { DensityCurve } from '@/composables/useDensityChart'
import { CHART, expertTone } from '@/reconcile/colors'
import { FAMILY_LABELS, fmt, paramsText } from '@/reconcile/format'
import type { Preview, WeightsMode } from '@/reconcile/preview'
import type { PoolMethod } from '@/api/reconciliation'

interface CurveSources {
  view: Ref<ReconciliationView | null>
  included: ComputedRef<ReconcileExpert[]>
  excluded: Ref<number[]>
  method: ComputedRef<PoolMethod>
  weightsMode: Ref<WeightsMode>
  preview: ShallowRef<Preview | null>
  prior: ComputedRef<Distribution | null>
  handAdjusted: ComputedRef<boolean>
  compareView: ShallowRef<ReconciliationView | null>
  roundName: (id: number | null | undefined) => string
}

/** What the workspace's chart draws: the experts (and the compared round's), the combination and the prior, with a caption in words. */
export function useReconcileCurves(src: CurveSources) {
  const tones = computed<Record<number, string>>(() => Object.fromEntries((src.view.value?.experts ?? []).map((e, i) => [e.expertId, expertTone(i)])))

  const combinationLabel = computed(() => {
    if (src.method.value === 'consensus') return 'Consensus (best fit)'
    const weights = { equal: 'equal weights', performance: 'performance weights', custom: 'weights set by hand' }[src.weightsMode.value]
    return `${src.method.value === 'linear' ? 'Linear' : 'Logarithmic'} pool, ${weights}`
  })

  const curves = computed<DensityCurve[]>(() => {
    const list: DensityCurve[] = []
    for (const e of src.included.value) {
      const d = e.distribution
      list.push({ id: `expert-${e.expertId}`, label: `${e.label}`, pdf: (x) => pdf(d, x), quantile: (p) => quantile(d, p), color: tones.value[e.expertId], width: 1.4 })
    }
    const other = src.compareView.value
    if (other) {
      const label = src.roundName(other.roundId)
      for (const e of other.experts) {
        if (src.excluded.value.includes(e.expertId) || !tones.value[e.expertId]) continue
        const d = e.distribution
        list.push({ id: `compare-${e.expertId}`, label: `${e.label}, ${label}`, pdf: (x) => pdf(d, x), quantile: (p) => quantile(d, p), color: tones.value[e.expertId], width: 1.2, dash: [2, 3] })
      }
    }
    const u = src.preview.value?.combination
    if (u) list.push({ id: 'combination', label: combinationLabel.value, pdf: (x) => u.pdf(x), quantile: (p) => u.quantile(p), color: CHART.pooled, width: 2.2, dash: [7, 4], order: 2 })
    const d = src.prior.value
    if (d) {
      const label = src.handAdjusted.value ? `${FAMILY_LABELS[d.family]}, adjusted by hand` : `${FAMILY_LABELS[d.family]} fit (chosen)`
      list.push({ id: 'prior', label, pdf: (x) => pdf(d, x), quantile: (p) => quantile(d, p), color: CHART.prior, width: 2.6, order: 3 })
    }
    return list
  })

  const chartBounds = computed(() => {
    const s = src.view.value?.support
    if (!s) return { min: undefined, max: undefined }
    if (s.kind === 'positive') return { min: 0, max: undefined }
    if (s.kind === 'proportion') return { min: 0, max: 1 }
    if (s.kind === 'bounded') return { min: s.lower, max: s.upper }
    return { min: undefined, max: undefined }
  })

  const xLabel = computed(() => {
    const q = src.view.value?.quantity
    return q ? `${q.symbol}${q.unit ? ` (${q.unit})` : ''}` : ''
  })
  const chartCaption = computed(() => {
    const n = src.included.value.length
    const summary = src.preview.value?.summary
    const parts = [`Thin lines: the fitted densities of ${n} included ${n === 1 ? 'expert' : 'experts'}.`]
    if (src.compareView.value) parts.push(`Dotted: the same experts in ${src.roundName(src.compareView.value.roundId)}.`)
    if (summary) parts.push(`Dashed ink: ${combinationLabel.value.toLowerCase()}, median ${fmt(summary.q50)}, 90 % interval ${fmt(summary.q05)} to ${fmt(summary.q95)}.`)
    if (src.prior.value) parts.push(`Amber: the ${FAMILY_LABELS[src.prior.value.family].toLowerCase()} prior (${paramsText(src.prior.value)}).`)
    return parts.join(' ')
  })

  return { tones, combinationLabel, curves, chartBounds, xLabel, chartCaption }
}
