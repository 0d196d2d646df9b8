import { computed, nextTick, ref, watch, type Ref } from 'vue'
import { useForm } from 'vee-validate'
import { toTypedSchema } from '@vee-validate/yup'
import { reconciliationSchema } from '@shared/schemas/reconciliation'
import type { Family, Point } from '@shared/stats'
import type { PoolMethod, ReconciliationView, WeightsSetting } from '@/api/reconciliation'
import { revalidateOnceInvalid } from '@/composables/fieldConfig'
import { customWeightList, type ConsensusRow, type WeightsMode } from '@/reconcile/preview'

const DEFAULT_PROBS = [0.05, 0.25, 0.5, 0.75, 0.95]
const blankRows = (): ConsensusRow[] => DEFAULT_PROBS.map((prob) => ({ value: null, prob }))

/**
 * The analyst's choices in the reconciliation workspace: a vee-validate form over the shared schema, plus the
 * UI state behind it (weights mode, weights set by hand, left-out experts, consensus rows) kept in step with the
 * form's values, and whether anything changed since the last save.
 */
export function useReconcileForm(view: Ref<ReconciliationView | null>) {
  const weightsMode = ref<WeightsMode>('equal')
  const customWeights = ref<Record<number, number | null>>({})
  const excluded = ref<number[]>([])
  const consensusRows = ref<ConsensusRow[]>(blankRows())

  const { defineField, errors, values, handleSubmit, setFieldValue, setFieldError, resetForm, isSubmitting } = useForm({
    validationSchema: toTypedSchema(reconciliationSchema),
    initialValues: {
      roundId: 1, method: 'linear', weights: 'equal', weightsReason: '', cutoff: 0, excludedExperts: [] as number[],
      consensus: { points: [] as Point[], participants: '', notes: '' }, family: null, distribution: null,
      adjustReason: '', rationale: '', reconciled: false, version: 0,
    },
  })
  const [method] = defineField('method')
  const [cutoff] = defineField('cutoff')
  const [weightsReason, weightsReasonAttrs] = defineField('weightsReason', revalidateOnceInvalid)
  const [participants, participantsAttrs] = defineField('consensus.participants', revalidateOnceInvalid)
  const [notes, notesAttrs] = defineField('consensus.notes', revalidateOnceInvalid)
  const [adjustReason, adjustReasonAttrs] = defineField('adjustReason', revalidateOnceInvalid)
  const [rationale, rationaleAttrs] = defineField('rationale', revalidateOnceInvalid)

  const methodValue = computed(() => (method.value ?? 'linear') as PoolMethod)
  const cutoffValue = computed(() => (typeof cutoff.value === 'number' && Number.isFinite(cutoff.value) ? cutoff.value : 0))
  const family = computed(() => (values.family ?? null) as Family | null)
  const fieldErrors = computed(() => errors.value as Record<string, string | undefined>)

  const included = computed(() => (view.value ? view.value.experts.filter((e) => !excluded.value.includes(e.expertId)) : []))
  const weightsValue = computed<WeightsSetting>(() => (weightsMode.value === 'custom' ? customWeightList(included.value, customWeights.value) : weightsMode.value))
  const customTotal = computed(() => customWeightList(included.value, customWeights.value).reduce((s, w) => s + w, 0))
  watch(weightsValue, (w) => setFieldValue('weights', w, false), { immediate: true })
  watch(excluded, (ids) => setFieldValue('excludedExperts', [...ids], false), { immediate: true, deep: true })
  watch(consensusRows, (rows) => {
    // Rows without a value are unused templates and left out; a value without a probability goes to the schema, which says so.
    const typed = rows.filter((r) => r.value !== null)
    setFieldValue('consensus.points', typed as Point[], false)
  }, { immediate: true, deep: true })

  /** The first error of the consensus or of one of its points. */
  const consensusError = computed(() => {
    const e = fieldErrors.value
    const key = Object.keys(e).find((k) => k === 'consensus' || k.startsWith('consensus.points'))
    return key ? e[key] : undefined
  })

  const snapshot = ref('')
  function currentChoices(): string {
    const { version: _v, reconciled: _r, roundId: _id, ...rest } = values as Record<string, unknown>
    return JSON.stringify(rest)
  }
  function takeSnapshot(): void {
    snapshot.value = currentChoices()
  }
  const dirty = computed(() => !!view.value && snapshot.value !== '' && currentChoices() !== snapshot.value)

  /** Sets every choice from the server's view: its settings, and the saved decision when it belongs to the round shown. */
  function reset(v: ReconciliationView): void {
    const s = v.settings
    const saved = v.saved && v.saved.roundId === v.roundId ? v.saved : null
    weightsMode.value = Array.isArray(s.weights) ? 'custom' : s.weights
    const custom: Record<number, number | null> = Object.fromEntries(v.experts.map((e) => [e.expertId, 1]))
    if (Array.isArray(s.weights)) v.included.forEach((id, i) => { custom[id] = s.weights[i] as number })
    customWeights.value = custom
    excluded.value = [...s.excludedExperts]
    consensusRows.value = s.consensus?.points?.length ? s.consensus.points.map((p) => ({ ...p })) : blankRows()
    resetForm({
      values: {
        roundId: v.roundId,
        method: s.method,
        weights: s.weights,
        weightsReason: saved?.weightsReason ?? '',
        cutoff: s.cutoff,
        excludedExperts: [...s.excludedExperts],
        consensus: { points: s.consensus?.points ?? [], participants: s.consensus?.participants ?? '', notes: s.consensus?.notes ?? '' },
        family: saved?.family ?? null,
        distribution: saved?.adjusted ? (saved.distribution as unknown as Record<string, unknown>) : null,
        adjustReason: saved?.adjustReason ?? '',
        rationale: v.saved?.rationale ?? '',
        reconciled: false,
        version: v.saved?.version ?? 0,
      },
    })
    void nextTick(takeSnapshot)
  }

  /** Includes or leaves out one expert. */
  function toggleExpert(expertId: number, on: boolean): void {
    excluded.value = on ? excluded.value.filter((x) => x !== expertId) : [...excluded.value, expertId]
  }

  return {
    weightsMode, customWeights, excluded, consensusRows, included, customTotal,
    method, cutoff, weightsReason, weightsReasonAttrs, participants, participantsAttrs, notes, notesAttrs,
    adjustReason, adjustReasonAttrs, rationale, rationaleAttrs,
    methodValue, cutoffValue, family, fieldErrors, consensusError, errors, values,
    handleSubmit, setFieldValue, setFieldError, isSubmitting, dirty, takeSnapshot, reset, toggleExpert,
  }
}

export type ReconcileForm = ReturnType<typeof useReconcileForm>
