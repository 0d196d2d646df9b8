import { computed, ref, watch, type Ref } from 'vue'
import { roundsApi, type PracticeFeedback, type RoundEntry } from '@/api/rounds'
import { errorMessage } from '@/api/client'
import { useRoundsStore } from '@/stores/rounds'
import { useAsync } from '@/composables/useAsync'

/** Where the expert is on a round's page: the two entry steps, the "ready" card, or the answer forms. */
export type EntryStage = 'declaration' | 'practice' | 'ready' | 'answering'

/**
 * The state of an expert's round page: the round and the expert's entry (declaration, practice), the stage shown,
 * and the actions of the entry steps. Loads again whenever the round id changes.
 */
export function useRoundEntry(roundId: Ref<number>) {
  const rounds = useRoundsStore()
  const entry = ref<RoundEntry | null>(null)
  /** The answer forms are on show (entry done, and the expert went on or came back). */
  const started = ref(false)
  /** The expert pressed "Start answering" (rather than coming back): the first item gets the focus. */
  const justStarted = ref(false)
  const editingDeclaration = ref(false)
  const retryingPractice = ref(false)
  /** Feedback from the practice answer just sent (shown right away). */
  const fresh = ref<PracticeFeedback | null>(null)

  const { loading, error, run: load } = useAsync(async (id: number) => {
    const [round, current, mine] = await Promise.all([rounds.fetchRound(id), roundsApi.entry(id), rounds.fetchMine().catch(() => null)])
    entry.value = current
    // Coming back with the entry steps done: straight to the answers.
    started.value = !!current.declaration && !!current.practice
    return { round, mine }
  })

  watch(
    roundId,
    (id) => {
      entry.value = null
      editingDeclaration.value = false
      retryingPractice.value = false
      fresh.value = null
      started.value = false
      justStarted.value = false
      void load(id)
    },
    { immediate: true },
  )

  const round = computed(() => rounds.rounds[roundId.value])
  const studyTitle = computed(() => rounds.mine?.find((r) => r.id === roundId.value)?.studyTitle ?? null)
  const isOpen = computed(() => round.value?.status === 'open')
  const notYet = computed(() => !!round.value && new Date(round.value.opensAt).getTime() > Date.now())

  const stage = computed<EntryStage>(() => {
    if (!entry.value?.declaration || editingDeclaration.value) return 'declaration'
    if (!entry.value.practice || retryingPractice.value) return 'practice'
    return started.value ? 'answering' : 'ready'
  })
  const answering = computed(() => stage.value === 'answering')

  function startAnswering(): void {
    started.value = true
    justStarted.value = true
    fresh.value = null
  }

  /** "Still true": the declaration (and practice) of an earlier round of the study, kept for this round. */
  const confirming = ref(false)
  const confirmError = ref<string | null>(null)
  async function confirmEarlier(): Promise<void> {
    confirming.value = true
    confirmError.value = null
    try {
      entry.value = await roundsApi.confirmDeclaration(roundId.value)
    } catch (error) {
      confirmError.value = errorMessage(error)
    } finally {
      confirming.value = false
    }
  }

  function declarationSaved(saved: RoundEntry): void {
    entry.value = saved
    editingDeclaration.value = false
  }

  function practiceDone(result: RoundEntry & { feedback: PracticeFeedback }): void {
    const { feedback, ...rest } = result
    entry.value = rest
    fresh.value = feedback
    retryingPractice.value = false
    // Show the practice feedback first; the expert goes on to the answers from there.
    started.value = false
  }

  const changeDeclaration = () => (editingDeclaration.value = true)
  const cancelDeclarationChange = () => (editingDeclaration.value = false)
  const cancelPracticeRetry = () => (retryingPractice.value = false)

  function retryPractice(): void {
    retryingPractice.value = true
    fresh.value = null
  }

  function submitted(at: string): void {
    if (entry.value) entry.value = { ...entry.value, submittedAt: at }
  }

  const savedFeedback = computed(() => entry.value?.practice?.fit ?? null)
  const unit = computed(() => round.value?.practice.unit ?? '')

  return {
    entry, round, studyTitle, isOpen, notYet, loading, error, load, stage, answering, justStarted,
    editingDeclaration, retryingPractice, fresh, savedFeedback, unit,
    changeDeclaration, cancelDeclarationChange, cancelPracticeRetry,
    startAnswering, confirming, confirmError, confirmEarlier, declarationSaved, practiceDone, retryPractice, submitted,
  }
}

export type RoundEntryState = ReturnType<typeof useRoundEntry>
