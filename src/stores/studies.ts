import { ref } from 'vue'
import { defineStore } from 'pinia'
import type { StudySummary } from '@shared/types'
import type { StudyBody } from '@shared/schemas/studies'
import { studiesApi } from '@/api/studies'

/** Studies the signed-in user is a member of (admins: all). */
export const useStudiesStore = defineStore('studies', () => {
  const items = ref<StudySummary[]>([])
  /** True once the list has been fetched for this session. */
  const loaded = ref(false)

  async function fetchAll(): Promise<StudySummary[]> {
    const list = await studiesApi.list()
    items.value = list
    loaded.value = true
    return list
  }

  /** Fetches the list unless it is already here. */
  async function ensureLoaded(): Promise<StudySummary[]> {
    return loaded.value ? items.value : fetchAll()
  }

  function byId(id: number): StudySummary | undefined {
    return items.value.find((study) => study.id === id)
  }

  /** Adds or replaces one study (after create, edit or a detail fetch), newest change first. */
  function put(study: StudySummary): void {
    const index = items.value.findIndex((s) => s.id === study.id)
    if (index === -1) items.value.unshift(study)
    else items.value.splice(index, 1, study)
  }

  /** POST /api/studies (analyst/admin accounts); the new study joins the list. */
  async function create(body: StudyBody): Promise<StudySummary> {
    const study = await studiesApi.create(body)
    put(study)
    return study
  }

  function clear(): void {
    items.value = []
    loaded.value = false
  }

  return { items, loaded, fetchAll, ensureLoaded, byId, put, create, clear }
})
