import { ref } from 'vue'
import { defineStore } from 'pinia'
import { quantitiesApi, type EvidenceFile, type Quantity, type QuantityInput } from '@/api/quantities'
import { useAuthStore } from './auth'
import { useStudiesStore } from './studies'

/** The quantities of the study that is open (with their evidence files). */
export const useQuantitiesStore = defineStore('quantities', () => {
  /** Study the items belong to; null before the first fetch. */
  const studyId = ref<number | null>(null)
  const items = ref<Quantity[]>([])

  async function fetchFor(id: number): Promise<Quantity[]> {
    if (studyId.value !== id) items.value = []
    const list = await quantitiesApi.list(id)
    studyId.value = id
    items.value = list
    return list
  }

  function byId(id: number): Quantity | undefined {
    return items.value.find((q) => q.id === id)
  }

  function put(quantity: Quantity): void {
    if (studyId.value !== quantity.studyId) return
    const index = items.value.findIndex((q) => q.id === quantity.id)
    if (index === -1) items.value.push(quantity)
    else items.value.splice(index, 1, quantity)
  }

  async function create(forStudy: number, body: QuantityInput): Promise<Quantity> {
    const quantity = await quantitiesApi.create(forStudy, body)
    put({ ...quantity, files: quantity.files ?? [] })
    const studies = useStudiesStore()
    const summary = studies.byId(forStudy)
    if (summary) studies.put({ ...summary, quantityCount: summary.quantityCount + 1 })
    return quantity
  }

  async function update(id: number, body: QuantityInput & { version: number }): Promise<Quantity> {
    const quantity = await quantitiesApi.update(id, body)
    put(quantity)
    return quantity
  }

  /** GET /api/quantities/:id — the latest saved version (after a 409). */
  async function reload(id: number): Promise<Quantity> {
    const quantity = await quantitiesApi.get(id)
    put(quantity)
    return quantity
  }

  async function uploadFile(quantityId: number, file: File): Promise<EvidenceFile> {
    const auth = useAuthStore()
    const info = await quantitiesApi.uploadFile(quantityId, file, { get: auth.ensureCsrf, refresh: auth.refreshCsrf })
    const quantity = byId(quantityId)
    if (quantity) quantity.files = [...quantity.files, info]
    return info
  }

  async function deleteFile(quantityId: number, fileId: number): Promise<void> {
    await quantitiesApi.deleteFile(fileId)
    const quantity = byId(quantityId)
    if (quantity) quantity.files = quantity.files.filter((f) => f.id !== fileId)
  }

  function clear(): void {
    studyId.value = null
    items.value = []
  }

  return { studyId, items, fetchFor, byId, put, create, update, reload, uploadFile, deleteFile, clear }
})
