import type { AnswerInput } from '../elicitation/answers'
import type { ElicitationMethod } from '../schemas/rounds'
import type { Distribution, Family, FitResult } from '../stats/types'

/** Request and response shapes of the answering routes (judgements, calibration answers, feedback, history). */

export type JudgementStatus = 'draft' | 'submitted'

/** One expert's answer for one quantity of a round (GET /api/rounds/:id/judgements). */
export interface Judgement {
  id: number
  roundId: number
  quantityId: number
  expertId: number
  /** The expert's name, for the study team only. */
  expertName?: string
  method: ElicitationMethod
  answer: AnswerInput
  rationale: string
  fits: FitResult[]
  chosenFamily: Family | null
  status: JudgementStatus
  version: number
  submittedAt: string | null
  updatedAt: string
}

/** Body of PUT /api/rounds/:id/judgements/:quantityId: the answer's values (`version` 0 for a first save). */
export interface JudgementSave extends AnswerInput {
  method: ElicitationMethod
  rationale: string
  chosenFamily: Family | null
  version: number
}

/** Answer of PUT /api/rounds/:id/judgements/:quantityId: the stored draft and the server's fits of it. */
export interface JudgementSaved {
  judgement: Judgement
  fits: FitResult[]
  complete: boolean
  fitMessage: string | null
}

/** One saved version of a judgement (GET /api/judgements/:id/history, oldest first). */
export interface JudgementVersion {
  version: number
  answer: AnswerInput
  rationale: string
  fits: FitResult[]
  chosenFamily: Family | null
  status: JudgementStatus
  savedAt: string
  savedBy: string
}

/** An expert's 5 %, 50 % and 95 % values for one calibration question; the study team also sees whose. */
export interface CalibrationAnswer {
  questionId: number
  expertId?: number
  expertName?: string
  q05: number
  q50: number
  q95: number
  version: number
  updatedAt?: string
}

/** Body of PUT /api/rounds/:id/calibration-answers/:questionId. */
export interface CalibrationAnswerSave {
  q05: number
  q50: number
  q95: number
  version: number
}

/** Per quantity of a feedback round: the expert's own earlier answer and the others', under the study's expert labels. */
export interface RoundFeedback {
  quantityId: number
  previousRound: { id: number; number: number } | null
  mine: { answer: AnswerInput; distribution: Distribution | null; rationale: string } | null
  others: { label: string; distribution: Distribution | null; rationale: string }[]
}
