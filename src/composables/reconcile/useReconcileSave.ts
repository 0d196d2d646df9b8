import { ref, watch, type Ref } from 'vue'
import { RECONCILED_NEEDS, RECONCILED_RATIONALE_MIN } from '@shared/schemas/reconciliation'
import { ApiError, errorMessage } from '@/api/client'
import type { ReconciliationSaveBody, ReconciliationView } from '@/api/reconciliation'
import { useReconciliationStore } from '@/stores/reconciliation'
import { applyServerErrors } from '@/composables/serverErrors'
import { notify } from '@/composables/notify'
import type { ReconcileForm } from './useReconcileForm'
import type { PriorAdjustment } from './usePriorAdjustment'

const KNOWN_FIELDS = [
  'roundId', 'method', 'weights', 'weightsReason', 'cutoff', 'excludedExperts', 'consensus', 'consensus.points', 'consensus.participants',
  'consensus.notes', 'family', 'distribution', 'adjustReason', 'rationale',
] as const
const INVALID = 'Some choices need attention; see the messages in the sections above.'

/**
 * Saving the reconciliation (draft, reconciled, reopened): the checks a reconciled decision needs, the server's
 * field errors on the fields, and a 409 that keeps the analyst's choices while their colleague's version is reloaded.
 */
export function useReconcileSave(view: Ref<ReconciliationView | null>, quantityId: () => number, form: ReconcileForm, adjustment: PriorAdjustment) {
  const store = useReconciliationStore()
  const formError = ref<string | null>(null)
  const conflict = ref(false)
  const conflictReloaded = ref(false)
  const reloadingTheirs = ref(false)

  async function save(valid: Record<string, unknown>, reconciled: boolean, what: 'draft' | 'reconciled' | 'reopen'): Promise<void> {
    const v = view.value
    if (!v) return
    formError.value = null
    if (reconciled) {
      let blocked = false
      if (!form.family.value) {
        form.setFieldError('family', RECONCILED_NEEDS.family)
        blocked = true
      }
      if ((form.rationale.value ?? '').trim().length < RECONCILED_RATIONALE_MIN) {
        form.setFieldError('rationale', RECONCILED_NEEDS.rationale)
        blocked = true
      }
      if (blocked) {
        formError.value = INVALID
        return
      }
    }
    if (adjustment.adjusting.value && adjustment.adjusted.value.problem) {
      form.setFieldError('distribution', adjustment.adjusted.value.problem)
      formError.value = INVALID
      return
    }
    const body = { ...valid, roundId: v.roundId, reconciled, version: v.saved?.version ?? 0 } as unknown as ReconciliationSaveBody
    try {
      const saved = await store.save(quantityId(), body)
      conflict.value = false
      conflictReloaded.value = false
      form.setFieldValue('version', saved.saved?.version ?? 0, false)
      form.takeSnapshot()
      notify.success({
        draft: 'Draft saved. The numbers shown are the server’s.',
        reconciled: 'The quantity is marked reconciled.',
        reopen: 'Reopened: the reconciliation is a draft again; its history is kept.',
      }[what])
    } catch (err) {
      if (err instanceof ApiError && err.status === 409) {
        conflict.value = true
        conflictReloaded.value = false
        formError.value = null
        return
      }
      if (err instanceof ApiError && err.status === 403) {
        formError.value = `Your role cannot save this reconciliation. ${err.message}`
        return
      }
      formError.value = applyServerErrors(err, KNOWN_FIELDS, (field, message) => form.setFieldError(field as never, message)) ?? (err instanceof ApiError && err.status === 400 ? INVALID : null)
    }
  }

  function onInvalid(): void {
    formError.value = INVALID
  }
  const saveDraft = form.handleSubmit((valid) => save(valid as Record<string, unknown>, false, 'draft'), onInvalid)
  const markReconciled = form.handleSubmit((valid) => save(valid as Record<string, unknown>, true, 'reconciled'), onInvalid)
  const reopen = form.handleSubmit((valid) => save(valid as Record<string, unknown>, false, 'reopen'), onInvalid)

  /** After a 409: fetch the other analyst's version; the draft keeps what this analyst chose and typed. */
  async function reloadTheirs(): Promise<void> {
    reloadingTheirs.value = true
    try {
      const v = await store.fetch(quantityId(), view.value?.roundId)
      form.setFieldValue('version', v.saved?.version ?? 0, false)
      conflictReloaded.value = true
    } catch (err) {
      notify.error(`Could not reload: ${errorMessage(err)}`)
    } finally {
      reloadingTheirs.value = false
    }
  }

  watch(() => Object.keys(form.errors.value).length, (count) => {
    if (count === 0 && formError.value === INVALID) formError.value = null
  })

  /** Forgets the outcome of earlier saves (another quantity is opened). */
  function clear(): void {
    conflict.value = false
    conflictReloaded.value = false
    formError.value = null
  }

  return { formError, conflict, conflictReloaded, reloadingTheirs, saveDraft, markReconciled, reopen, reloadTheirs, clear }
}
