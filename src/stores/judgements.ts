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
import { linksApi, type LinkAnswer, type LinkAnswerSave } from '@/api/links'
import { useAuthStore } from './auth'

export interface AnsweringLoad {
  roundId: number
  studyId: number
  askCalibration: boolean
  feedbackEnabled: boolean
  /** Whether the round links quantities (then the expert's answers to the links are loaded too). */
  hasLinks?: boolean
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
  /** The expert's answers to the round's links, by link id. */
  const linkAnswers = ref<Record<number, LinkAnswer>>({})

  function putJudgements(list: Judgement[]): void {
    judgements.value = Object.fromEntries(list.map((j) => [j.quantityId, j]))
  }

  async function load(opts: AnsweringLoad): Promise<void> {
    if (roundId.value !== opts.roundId) clear()
    const [list, qs, answers, fb, wholes, links] = await Promise.all([
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
      opts.hasLinks ? linksApi.answers(opts.roundId) : Promise.resolve([] as LinkAnswer[]),
    ])
    roundId.value = opts.roundId
    compositions.value = wholes
    putJudgements(list)
    questions.value = [...qs].sort((a, b) => a.position - b.position || a.id - b.id)
    calibration.value = Object.fromEntries(answers.map((a) => [a.questionId, a]))
    feedback.value = fb
    putLinkAnswers(links)
  }

  function putLinkAnswers(list: LinkAnswer[]): void {
    linkAnswers.value = Object.fromEntries(list.map((a) => [a.linkId, a]))
  }

  /** Fetches the expert's link answers again (after a conflict or a submit). */
  async function reloadLinkAnswers(id: number): Promise<LinkAnswer[]> {
    const list = await linksApi.answers(id)
    if (roundId.value === id) putLinkAnswers(list)
    return list
  }

  async function saveLinkAnswer(id: number, linkId: number, body: LinkAnswerSave): Promise<LinkAnswer> {
    const saved = await linksApi.saveAnswer(id, linkId, body)
    if (roundId.value === id) linkAnswers.value[linkId] = saved
    return saved
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
    if (Object.keys(linkAnswers.value).length) await reloadLinkAnswers(id)
    return list
  }

  function clear(): void {
    roundId.value = null
    judgements.value = {}
    questions.value = []
    calibration.value = {}
    feedback.value = null
    compositions.value = []
    linkAnswers.value = {}
  }

  // One account's answers must not show for the next one signed in on this browser.
  const auth = useAuthStore()
  watch(
    () => auth.user?.id ?? null,
    (id, previous) => {
      if (id !== previous) clear()
    },
  )

  return {
    roundId, judgements, questions, calibration, feedback, compositions, linkAnswers,
    load, reloadJudgements, reloadCalibration, reloadLinkAnswers, save, saveCalibration, saveLinkAnswer, submit, clear,
  }
})
