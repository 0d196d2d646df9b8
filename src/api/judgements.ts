import type { CalibrationAnswer, CalibrationAnswerSave, Judgement, JudgementSave, JudgementSaved, RoundFeedback } from '@shared/api/judgements'
import { api } from './client'

export type {
  CalibrationAnswer, CalibrationAnswerSave, Judgement, JudgementSave, JudgementSaved, JudgementStatus, RoundFeedback,
} from '@shared/api/judgements'

export const judgementsApi = {
  list: (roundId: number) => api.get<Judgement[]>(`/api/rounds/${roundId}/judgements`),
  save: (roundId: number, quantityId: number, body: JudgementSave) =>
    api.put<JudgementSaved>(`/api/rounds/${roundId}/judgements/${quantityId}`, body),
  submit: (roundId: number) => api.post<Judgement[]>(`/api/rounds/${roundId}/submit`),
  calibrationAnswers: (roundId: number) => api.get<CalibrationAnswer[]>(`/api/rounds/${roundId}/calibration-answers`),
  saveCalibration: (roundId: number, questionId: number, body: CalibrationAnswerSave) =>
    api.put<CalibrationAnswer>(`/api/rounds/${roundId}/calibration-answers/${questionId}`, body),
  feedback: (roundId: number) => api.get<RoundFeedback[]>(`/api/rounds/${roundId}/feedback`),
}
