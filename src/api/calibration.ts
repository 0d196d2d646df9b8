import type { CalibrationQuestionBody } from '@shared/schemas/quantities'
import { api } from './client'

/** `trueValue` is absent for experts (the API leaves it out), null when not known yet. */
export interface CalibrationQuestion {
  id: number
  studyId: number
  question: string
  unit: string
  position: number
  version: number
  trueValue?: number | null
}

export const calibrationApi = {
  list: (studyId: number) => api.get<CalibrationQuestion[]>(`/api/studies/${studyId}/calibration-questions`),
  create: (studyId: number, body: CalibrationQuestionBody) =>
    api.post<CalibrationQuestion>(`/api/studies/${studyId}/calibration-questions`, body),
  update: (id: number, body: CalibrationQuestionBody & { version: number }) =>
    api.patch<CalibrationQuestion>(`/api/calibration-questions/${id}`, body),
}
