import { ref, shallowReactive } from 'vue'
import { defineStore } from 'pinia'
import { pilotApi, type Dataset, type PilotUploadFields } from '@/api/pilot'
import { useAuthStore } from './auth'

/** Pilot datasets of the open study: every version of every quantity's data, newest version first. */
export const usePilotStore = defineStore('pilot', () => {
  /** Study the items belong to; null before the first fetch. */
  const studyId = ref<number | null>(null)
  const items = ref<Dataset[]>([])
  /** Single datasets with the stored file's first rows, by id (GET /api/datasets/:id). */
  const details = shallowReactive(new Map<number, Dataset>())

  async function fetchFor(id: number): Promise<Dataset[]> {
    if (studyId.value !== id) items.value = []
    const list = await pilotApi.list(id)
    studyId.value = id
    items.value = list
    return list
  }

  /** Versions of one quantity's data, newest first. */
  function forQuantity(quantityId: number): Dataset[] {
    return items.value.filter((d) => d.quantityId === quantityId).sort((a, b) => b.version - a.version)
  }

  /** The dataset with its preview rows; fetched once. */
  async function fetchOne(id: number): Promise<Dataset> {
    const known = details.get(id)
    if (known) return known
    const dataset = await pilotApi.get(id)
    details.set(id, dataset)
    return dataset
  }

  /** POST the file and its mapping; the server checks every line and stores nothing when one is wrong. */
  async function upload(forStudy: number, fields: PilotUploadFields, file: File): Promise<Dataset> {
    const auth = useAuthStore()
    const dataset = await pilotApi.upload(forStudy, fields, file, { get: auth.ensureCsrf, refresh: auth.refreshCsrf })
    details.set(dataset.id, dataset)
    if (studyId.value === forStudy) {
      const { preview: _preview, ...row } = dataset
      items.value = [row, ...items.value.filter((d) => d.id !== dataset.id)]
    }
    return dataset
  }

  function clear(): void {
    studyId.value = null
    items.value = []
    details.clear()
  }

  return { studyId, items, details, fetchFor, forQuantity, fetchOne, upload, clear }
})
