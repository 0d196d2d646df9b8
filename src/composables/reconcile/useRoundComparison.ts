import { computed, ref, shallowRef, watch, type Ref } from 'vue'
import { errorMessage } from '@/api/client'
import { reconciliationApi, type ReconciliationView } from '@/api/reconciliation'

/** "Round 1: Burst rate", without repeating "Round 1" when the title starts with it. */
export const roundLabel = (r: { number: number; title: string }) => (r.title.toLowerCase().startsWith(`round ${r.number}`) ? r.title : `Round ${r.number}: ${r.title}`)

/** The rounds of the reconciliation on screen, and another round's answers fetched to show alongside. */
export function useRoundComparison(view: Ref<ReconciliationView | null>, quantityId: () => number) {
  const compareRoundId = ref<number | null>(null)
  const compareView = shallowRef<ReconciliationView | null>(null)
  const compareError = ref<string | null>(null)
  watch([compareRoundId, quantityId], async ([roundId, id]) => {
    compareView.value = null
    compareError.value = null
    if (roundId === null) return
    try {
      const other = await reconciliationApi.get(id, { roundId })
      if (compareRoundId.value === roundId) compareView.value = other
    } catch (err) {
      compareError.value = errorMessage(err)
    }
  })

  /** Rounds with submitted answers, and the one on screen (rounds still waiting for answers have nothing to show). */
  const answeredRounds = computed(() => (view.value ? view.value.rounds.filter((r) => r.submitted > 0 || r.id === view.value!.roundId) : []))
  const otherRounds = computed(() => (view.value ? view.value.rounds.filter((r) => r.id !== view.value!.roundId && r.submitted > 0) : []))
  const roundName = (id: number | null | undefined) => {
    const r = view.value?.rounds.find((x) => x.id === id)
    return r ? `Round ${r.number}` : 'the other round'
  }
  /** The compared round's 5 / 50 / 95 % values by expert. */
  const compare = computed(() => {
    const other = compareView.value
    if (!other) return null
    return { label: roundName(other.roundId), byExpert: Object.fromEntries(other.experts.map((e) => [e.expertId, { q05: e.q05, q50: e.q50, q95: e.q95 }])) }
  })

  return { compareRoundId, compareView, compareError, answeredRounds, otherRounds, roundName, compare }
}
