import { ref } from 'vue'
import { defineStore } from 'pinia'
import { reconciliationApi, type ReconciliationSaveBody, type ReconciliationView } from '@/api/reconciliation'

/** The reconciliation workspace of one quantity at a time, as the server last computed it. */
export const useReconciliationStore = defineStore('reconciliation', () => {
  /** Quantity the view belongs to; null before the first fetch. */
  const quantityId = ref<number | null>(null)
  const view = ref<ReconciliationView | null>(null)

  /** GET …/reconciliation for a round (default: the saved one, else the latest with answers). */
  async function fetch(id: number, roundId?: number): Promise<ReconciliationView> {
    if (quantityId.value !== id) view.value = null
    const result = await reconciliationApi.get(id, roundId === undefined ? {} : { roundId })
    quantityId.value = id
    view.value = result
    return result
  }

  /** PUT …/reconciliation; the answer (the server's numbers) replaces the view. */
  async function save(id: number, body: ReconciliationSaveBody): Promise<ReconciliationView> {
    const result = await reconciliationApi.save(id, body)
    quantityId.value = id
    view.value = result
    return result
  }

  function clear(): void {
    quantityId.value = null
    view.value = null
  }

  return { quantityId, view, fetch, save, clear }
})
