import { ref } from 'vue'
import { defineStore } from 'pinia'
import type { CompositionBody } from '@shared/schemas/compositions'
import { compositionsApi, type Composition } from '@/api/compositions'

/** Compositions (shares of a whole) of the study that is open. */
export const useCompositionsStore = defineStore('compositions', () => {
  const studyId = ref<number | null>(null)
  const items = ref<Composition[]>([])

  async function fetchFor(id: number): Promise<Composition[]> {
    if (studyId.value !== id) items.value = []
    const list = await compositionsApi.list(id)
    studyId.value = id
    items.value = list
    return list
  }

  function put(composition: Composition): void {
    if (studyId.value !== composition.studyId) return
    const index = items.value.findIndex((c) => c.id === composition.id)
    if (index === -1) items.value.push(composition)
    else items.value.splice(index, 1, composition)
  }

  async function create(forStudy: number, body: CompositionBody): Promise<Composition> {
    const composition = await compositionsApi.create(forStudy, body)
    put(composition)
    return composition
  }

  async function update(id: number, body: CompositionBody & { version: number }): Promise<Composition> {
    const composition = await compositionsApi.update(id, body)
    put(composition)
    return composition
  }

  async function remove(id: number): Promise<void> {
    await compositionsApi.remove(id)
    items.value = items.value.filter((c) => c.id !== id)
  }

  return { studyId, items, fetchFor, put, create, update, remove }
})
