import { computed, type ComputedRef, type Ref, type ShallowRef } from 'vue'
import { supportBounds, type Distribution } from '@shared/stats'
import { FAMILY_LABELS, formatNumber, paramsText } from '@shared/format'
import type { PoolMethod, ReconcileExpert, ReconciliationView } from '@/api/reconciliation'
import { expertTone } from '@/reconcile/colors'
import { rangeOf, type PanelRow, type PanelViewProps } from '@/reconcile/panel'
import type { Preview, WeightsMode } from '@/reconcile/preview'

interface PanelSources {
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

/** What the panel view draws: every expert's range (and the compared round's), the combination and the prior, with a caption in words. */
export function usePanelView(src: PanelSources) {
  const tones = computed<Record<number, string>>(() => Object.fromEntries((src.view.value?.experts ?? []).map((e, i) => [e.expertId, expertTone(i)])))

  const combinationLabel = computed(() => {
    if (src.method.value === 'consensus') return 'Consensus (closest family)'
    const weights = { equal: 'equal weights', performance: 'performance weights', custom: 'weights set by hand' }[src.weightsMode.value]
    return `${src.method.value === 'linear' ? 'Linear' : 'Logarithmic'} pool, ${weights}`
  })
  const compareLabel = computed(() => (src.compareView.value ? src.roundName(src.compareView.value.roundId) : null))

  const rows = computed<PanelRow[]>(() => {
    const other = new Map((src.compareView.value?.experts ?? []).map((e) => [e.expertId, e.distribution]))
    return (src.view.value?.experts ?? []).map((e) => {
      const then = other.get(e.expertId)
      return {
        id: e.expertId, label: e.label, range: rangeOf(e.distribution), excluded: src.excluded.value.includes(e.expertId), tone: tones.value[e.expertId],
        compare: then ? rangeOf(then) : null,
      }
    })
  })

  const priorLabel = computed(() => {
    const d = src.prior.value
    if (!d) return ''
    return src.handAdjusted.value ? `${FAMILY_LABELS[d.family]} prior, adjusted by hand` : `${FAMILY_LABELS[d.family]} prior (chosen fit)`
  })
  const bounds = computed(() => (src.view.value ? supportBounds(src.view.value.support) : { lower: -Infinity, upper: Infinity }))
  const xLabel = computed(() => {
    const q = src.view.value?.quantity
    return q ? `${q.symbol}${q.unit ? ` (${q.unit})` : ''}` : ''
  })
  const caption = computed(() => {
    const n = src.included.value.length
    const left = (src.view.value?.experts.length ?? 0) - n
    const summary = src.preview.value?.summary
    const parts = [`One row per expert: the 5–95 % range as a thin bar, the middle half as a thick bar, the median as a notch; ${n} ${n === 1 ? 'expert is' : 'experts are'} included${left > 0 ? `, ${left} left out (faded)` : ''}.`]
    if (compareLabel.value) parts.push(`Dashed outlines: the same experts in ${compareLabel.value}.`)
    if (summary) parts.push(`Filled green: ${combinationLabel.value.toLowerCase()}, median ${formatNumber(summary.q50)}, 90 % interval ${formatNumber(summary.q05)} to ${formatNumber(summary.q95)}.`)
    if (src.prior.value) parts.push(`Amber line: the ${FAMILY_LABELS[src.prior.value.family].toLowerCase()} prior (${paramsText(src.prior.value)}).`)
    return parts.join(' ')
  })

  const panel = computed<PanelViewProps>(() => ({
    rows: rows.value, compareLabel: compareLabel.value, combined: src.preview.value?.combination ?? null, combinedLabel: combinationLabel.value,
    prior: src.prior.value, priorLabel: priorLabel.value, bounds: bounds.value, xLabel: xLabel.value, caption: caption.value,
  }))

  return { tones, combinationLabel, panel }
}
