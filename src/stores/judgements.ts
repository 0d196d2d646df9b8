import { ref, watch } from 'vue'
import { defineStore } from 'pinia'
import { calibrationApi, type CalibrationQuestion } from '@/api/calibration'
import { compositionsApi, type Composition } from '@/api/compositions'
import { ApiError } from '@/api/client'
import {
  judgementsApi,
  type CalibrationAnswer,
  type CalibrationAnswerSave,
  type Judgement,
  type JudgementSave,
  type JudgementSaved,
  type RoundFeedback,
} from '@/api/judgements'
import { useAuthStore } from './auth'

export interface AnsweringLoad {
  roundId: number
  studyId: number
  askCalibration: boolean
  feedbackEnabled: boolean
}

/** The signed-in expert's answers in one round: judgements, calibration answers and the feedback of earlier rounds. */
export const useJudgementsStore = defineStore('judgements', () => {
  const roundId = ref<number | null>(null)
  /** Judgements by quantity id. */
  const judgements = ref<Record<number, Judgement>>({})
  const questions = ref<CalibrationQuestion[]>([])
  /** Calibration answers by question id. */
  const calibration = ref<Record<number, CalibrationAnswer>>({})
  const feedback = ref<RoundFeedback[] | null>(null)
  /** The study's compositions (shares of a whole): the answer screen adds up the shares asked in this round. */
  const compositions = ref<Composition[]>([])

  function putJudgements(list: Judgement[]): void {
    judgements.value = Object.fromEntries(list.map((j) => [j.quantityId, j]))
  }

  async function load(opts: AnsweringLoad): Promise<void> {
    if (roundId.value !== opts.roundId) clear()
    const [list, qs, answers, fb, wholes] = await Promise.all([
      judgementsApi.list(opts.roundId),
      opts.askCalibration ? calibrationApi.list(opts.studyId) : Promise.resolve([] as CalibrationQuestion[]),
      opts.askCalibration ? judgementsApi.calibrationAnswers(opts.roundId) : Promise.resolve([] as CalibrationAnswer[]),
      opts.feedbackEnabled
        ? judgementsApi.feedback(opts.roundId).catch((error: unknown) => {
            // No earlier round to show: the round simply has no feedback panel.
            if (error instanceof ApiError && error.status === 404) return null
            throw error
          })
        : Promise.resolve(null),
      compositionsApi.list(opts.studyId),
    ])
    roundId.value = opts.roundId
    compositions.value = wholes
    putJudgements(list)
    questions.value = [...qs].sort((a, b) => a.position - b.position || a.id - b.id)
    calibration.value = Object.fromEntries(answers.map((a) => [a.questionId, a]))
    feedback.value = fb
  }

  /** Fetches the expert's judgements again (after a conflict or a submit). */
  async function reloadJudgements(id: number): Promise<Judgement[]> {
    const list = await judgementsApi.list(id)
    if (roundId.value === id) putJudgements(list)
    return list
  }

  async function reloadCalibration(id: number): Promise<CalibrationAnswer[]> {
    const answers = await judgementsApi.calibrationAnswers(id)
    if (roundId.value === id) calibration.value = Object.fromEntries(answers.map((a) => [a.questionId, a]))
    return answers
  }

  async function save(id: number, quantityId: number, body: JudgementSave): Promise<JudgementSaved> {
    const saved = await judgementsApi.save(id, quantityId, body)
    if (roundId.value === id) judgements.value[quantityId] = saved.judgement
    return saved
  }

  async function saveCalibration(id: number, questionId: number, body: CalibrationAnswerSave): Promise<CalibrationAnswer> {
    const saved = await judgementsApi.saveCalibration(id, questionId, body)
    if (roundId.value === id) calibration.value[questionId] = saved
    return saved
  }

  async function submit(id: number): Promise<Judgement[]> {
    const list = await judgementsApi.submit(id)
    if (roundId.value === id) putJudgements(list)
    return list
  }

  function clear(): void {
    roundId.value = null
    judgements.value = {}
    questions.value = []
    calibration.value = {}
    feedback.value = null
    compositions.value = []
  }

  // One account's answers must not show for the next one signed in on this browser.
  const auth = useAuthStore()
  watch(
    () => auth.user?.id ?? null,
    (id, previous) => {
      if (id !== previous) clear()
    },
  )

  return { roundId, judgements, questions, calibration, feedback, compositions, load, reloadJudgements, reloadCalibration, save, saveCalibration, submit, clear }
})
