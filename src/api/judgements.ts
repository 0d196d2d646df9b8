import type { AnswerInput } from '@shared/elicitation/answers'
import type { Distribution, Family, FitResult, Point } from '@shared/stats'
import type { ElicitationMethod } from '@shared/schemas/rounds'
import { api } from './client'

/** One expert's answer for one quantity of a round (GET /api/rounds/:id/judgements). */
export interface Judgement {
  id: number
  roundId: number
  quantityId: number
  expertId: number
  method: ElicitationMethod
  answer: AnswerInput
  rationale: string
  fits: FitResult[]
  chosenFamily: Family | null
  status: 'draft' | 'submitted'
  version: number
  submittedAt: string | null
  updatedAt: string
}

/** Body of PUT /api/rounds/:id/judgements/:quantityId (`version` 0 for a first save). */
export interface JudgementSave {
  method: ElicitationMethod
  lower?: number | null
  upper?: number | null
  points?: Point[]
  edges?: number[]
  probs?: (number | null)[]
  chips?: number[]
  rationale: string
  chosenFamily: Family | null
  version: number
}

export interface JudgementSaved {
  judgement: Judgement
  fits: FitResult[]
  complete: boolean
  fitMessage: string | null
}

export interface CalibrationAnswer {
  questionId: number
  q05: number
  q50: number
  q95: number
  version: number
  updatedAt?: string
}

export interface CalibrationAnswerSave {
  q05: number
  q50: number
  q95: number
  version: number
}

/** Per quantity of a feedback round: the expert's own earlier answer and the others', anonymised. */
export interface RoundFeedback {
  quantityId: number
  previousRound: { id: number; number: number } | null
  mine: { answer: AnswerInput; distribution: Distribution | null; rationale: string } | null
  others: { label: string; distribution: Distribution | null; rationale: string }[]
}

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
