import { ref } from 'vue'
import { defineStore } from 'pinia'
import type { CalibrationQuestionBody } from '@shared/schemas/quantities'
import { calibrationApi, type CalibrationQuestion } from '@/api/calibration'

/** Calibration questions of the study that is open. */
export const useCalibrationStore = defineStore('calibration', () => {
  const studyId = ref<number | null>(null)
  const items = ref<CalibrationQuestion[]>([])

  async function fetchFor(id: number): Promise<CalibrationQuestion[]> {
    if (studyId.value !== id) items.value = []
    const list = await calibrationApi.list(id)
    studyId.value = id
    items.value = list
    return list
  }

  function put(question: CalibrationQuestion): void {
    if (studyId.value !== question.studyId) return
    const index = items.value.findIndex((q) => q.id === question.id)
    if (index === -1) items.value.push(question)
    else items.value.splice(index, 1, question)
  }

  async function create(forStudy: number, body: CalibrationQuestionBody): Promise<CalibrationQuestion> {
    const question = await calibrationApi.create(forStudy, body)
    put(question)
    return question
  }

  async function update(id: number, body: CalibrationQuestionBody & { version: number }): Promise<CalibrationQuestion> {
    const question = await calibrationApi.update(id, body)
    put(question)
    return question
  }

  function clear(): void {
    studyId.value = null
    items.value = []
  }

  return { studyId, items, fetchFor, put, create, update, clear }
})
