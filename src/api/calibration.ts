import type { CalibrationQuestionBody } from '@shared/schemas/quantities'
import type { CalibrationQuestion } from '@shared/api/calibration'
import { api } from './client'

export type { CalibrationQuestion } from '@shared/api/calibration'

export const calibrationApi = {
  list: (studyId: number) => api.get<CalibrationQuestion[]>(`/api/studies/${studyId}/calibration-questions`),
  create: (studyId: number, body: CalibrationQuestionBody) =>
    api.post<CalibrationQuestion>(`/api/studies/${studyId}/calibration-questions`, body),
  update: (id: number, body: CalibrationQuestionBody & { version: number }) =>
    api.patch<CalibrationQuestion>(`/api/calibration-questions/${id}`, body),
}
