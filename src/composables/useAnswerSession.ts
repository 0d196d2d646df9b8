import { computed, effectScope, reactive, ref, shallowRef, type ComputedRef, type EffectScope, type Ref } from 'vue'
import type { AnswerItem } from '@shared/elicitation/answers'
import { chosenFit } from '@shared/elicitation/fits'
import type { Distribution, FitResult } from '@shared/stats'
import type { RoundLink } from '@/api/links'
import type { Composition } from '@/api/compositions'
import type { CalibrationQuestion } from '@/api/calibration'
import { ApiError } from '@/api/client'
import type { Judgement } from '@/api/judgements'
import type { Round, RoundItem } from '@/api/rounds'
import { useJudgementsStore } from '@/stores/judgements'
import { fieldText, readNumber } from '@/utils/typedNumber'
import { intervalLabels } from '@/rounds/edges'
import { draftFromAnswer, draftLines, readDraft, saveBody, type Draft, type DraftReading } from '@/answer/draft'
import { FIELD_TITLES } from '@/answer/quantile'
import {
  calibrationProblems,
  calibrationStatus,
  linkStatus,
  quantityStatus,
  submitProblems as sortSubmitProblems,
  type ItemStatus,
  type SubmitProblems,
} from '@/answer/status'
import { useAutosave, type Autosave, type SaveStatus } from './useAutosave'


export interface Conflict {
  message: string
  reloading: boolean
  reloaded: boolean
  /** What the expert had typed when the conflict happened, to read or copy. */
  typed: string[]
}

/** The changing part of a quantity's state (reactive). */
export interface QuantityData {
  draft: Draft
  version: number
  savedAt: Date | null
  /** The fits the server returned for the input saved last, and that input (as JSON). */
  serverFits: FitResult[] | null
  serverKey: string | null
  conflict: Conflict | null
}

/** One quantity of the round; a plain object holding reactive data, computed readings and its autosave. */
export interface QuantityState {
  kind: 'quantity'
  key: string
  item: RoundItem
  answerItem: AnswerItem
  data: QuantityData
  autosave: Autosave
  reading: ComputedRef<DraftReading>
  status: ComputedRef<ItemStatus>
}

export interface CalibrationTexts {
  q05: string
  q50: string
  q95: string
}

export interface CalibrationData {
  texts: CalibrationTexts
  version: number
  conflict: Conflict | null
}

export interface CalibrationState {
  question: CalibrationQuestion
  number: number
  data: CalibrationData
  autosave: Autosave
  values: ComputedRef<{ q05: number | null; q50: number | null; q95: number | null }>
  problems: ComputedRef<Partial<Record<keyof CalibrationTexts, string>>>
  saved: ComputedRef<boolean>
  started: ComputedRef<boolean>
}

/** The changing part of a link's answer (reactive): the chance as a fraction, null until given. */
export interface LinkData {
  probability: number | null
  rationale: string
  version: number
  conflict: Conflict | null
}

/** One link of the round: its answer, autosave, and the expert's own fitted distributions of its two quantities. */
export interface LinkState {
  kind: 'link'
  key: string
  link: RoundLink
  data: LinkData
  autosave: Autosave
  /** The two quantities' answer states, first then second. */
  quantities: [QuantityState, QuantityState]
  /** The expert's fitted distributions of the two quantities (null until both are answered). */
  marginals: ComputedRef<[Distribution, Distribution] | null>
  status: ComputedRef<ItemStatus>
}

export interface RailItem {
  key: string
  kind: 'quantity' | 'calibration' | 'link'
  title: string
  status: ItemStatus
  /** A problem the submit found with this item. */
  problem: string | null
}

/** Why a calibration answer waits: the server keeps only whole answers (not a problem to flag). */
export const CALIBRATION_INCOMPLETE = 'give all three values to save this answer'

/** The input as saved, to tell whether the server's fits belong to what is on screen. */
export const inputKey = (reading: DraftReading) => JSON.stringify(reading.input)

/** Whether two fits agree: same family, and every parameter and the SSE equal within a relative tolerance. */
export function sameFit(a: FitResult | undefined, b: FitResult | undefined, rel = 0): boolean {
  if (!a || !b) return a === b
  if (a.distribution.family !== b.distribution.family) return false
  const close = (x: unknown, y: unknown) =>
    x === y || (typeof x === 'number' && typeof y === 'number' && Math.abs(x - y) <= rel * Math.max(Math.abs(x), Math.abs(y)))
  const pa = a.distribution as unknown as Record<string, unknown>
  const pb = b.distribution as unknown as Record<string, unknown>
  const keys = new Set([...Object.keys(pa), ...Object.keys(pb)])
  return [...keys].every((k) => close(pa[k], pb[k])) && (close(a.sse, b.sse) || Math.abs(a.sse - b.sse) < 1e-12 * (rel > 0 ? 1 : 0))
}

export interface ShownFits {
  fits: FitResult[]
  source: 'browser' | 'server'
  /** The server's best fit differs visibly from the browser's (not just in the last digits). */
  differs: boolean
}

/**
 * Which fits to show: the browser's (fitAnswer, live), unless the server stored different ones for exactly the input
 * on screen; then the server's, since that is what is kept.
 */
export function shownFits(local: FitResult[], server: FitResult[] | null, sameInput: boolean): ShownFits {
  if (!sameInput || !server || server.length === 0 || sameFit(local[0], server[0])) return { fits: local, source: 'browser', differs: false }
  return { fits: server, source: 'server', differs: !sameFit(local[0], server[0], 1e-4) }
}

/** The fit the expert sees for a quantity (the one the feedback shows and the line draws), or null before there is one. */
export function shownFitOf(state: QuantityState): FitResult | null {
  const reading = state.reading.value
  const shown = shownFits(reading.result.fits, state.data.serverFits, state.data.serverKey === inputKey(reading))
  return chosenFit(shown.fits, state.data.draft.chosenFamily)
}

/** A composition with two or more of its shares asked in this round, each with its answer state here. */
export interface RoundComposition {
  composition: Composition
  shares: { quantityId: number; name: string; state: QuantityState }[]
  /** What takes the rest of the whole: the "other" share, shares asked in other rounds, or both; null when all are here. */
  restLabel: string | null
}

/** The compositions whose shares this round asks (at least two of them), with the rest named. */
export function roundCompositions(compositions: Composition[], states: QuantityState[]): RoundComposition[] {
  const byQuantity = new Map(states.map((s) => [s.item.quantityId, s]))
  return compositions.flatMap((composition) => {
    const shares = composition.shares.flatMap((s) => {
      const state = byQuantity.get(s.quantityId)
      return state ? [{ quantityId: s.quantityId, name: s.name, state }] : []
    })
    if (shares.length < 2) return []
    const elsewhere = shares.length < composition.shares.length ? 'the shares not asked in this round' : null
    const rest = [composition.residual ? composition.residualLabel : null, elsewhere].filter((x): x is string => x !== null)
    return [{ composition, shares, restLabel: rest.length ? rest.join(' and ') : null }]
  })
}

function answerItemOf(item: RoundItem): AnswerItem {
  return { method: item.method, edges: item.edges, chips: item.chips, askTails: item.askTails }
}


/**
 * The expert's answering session for one round: a draft per quantity (typed values, never lost while moving
 * between items), live checks and fits from the shared engine, autosave with versions, the calibration block,
 * the rail's statuses and the submit.
 */
export function useAnswerSession(round: Ref<Round>, calibrationAnsweredEarlier: Ref<number[]> = ref([])) {
  const store = useJudgementsStore()
  const quantities = shallowRef<QuantityState[]>([])
  const calibrations = shallowRef<CalibrationState[]>([])
  const links = shallowRef<LinkState[]>([])
  const problems = ref<SubmitProblems | null>(null)
  const submitError = ref<string | null>(null)
  const submitting = ref(false)
  const now = ref(Date.now())
  let scope: EffectScope | null = null

  const askCalibration = computed(() => round.value.askCalibration !== false)
  const submitted = computed(() => Object.values(store.judgements).some((j) => j.status === 'submitted'))
  const closed = computed(() => round.value.status !== 'open' || new Date(round.value.closesAt).getTime() <= now.value)
  const readOnly = computed(() => submitted.value || closed.value)

  function quantityState(item: RoundItem, judgement: Judgement | undefined): QuantityState {
    const answerItem = answerItemOf(item)
    const data = reactive<QuantityData>({
      draft: draftFromAnswer(answerItem, judgement?.answer, judgement?.rationale ?? '', judgement?.chosenFamily ?? null),
      version: judgement?.version ?? 0,
      savedAt: judgement ? new Date(judgement.updatedAt) : null,
      serverFits: judgement?.fits ?? null,
      serverKey: null,
      conflict: null,
    })
    const reading = computed(() => readDraft(answerItem, data.draft, item.quantity.support))
    const status = computed(() => {
      const r = reading.value
      return quantityStatus({ started: r.started, complete: r.result.check.complete, fitted: r.result.fits.length > 0, rationale: data.draft.rationale })
    })
    if (judgement) data.serverKey = inputKey(reading.value)
    const autosave = useAutosave({
      blockedBy: () => Object.values(reading.value.problems)[0] ?? null,
      save: async () => {
        const current = reading.value
        const body = saveBody(answerItem, current, data.draft, data.version)
        const saved = await store.save(round.value.id, item.quantityId, body)
        data.version = saved.judgement.version
        data.savedAt = new Date(saved.judgement.updatedAt)
        data.serverFits = saved.fits
        data.serverKey = inputKey(current)
      },
      onConflict: (error) => {
        data.conflict = { message: error.message, reloading: false, reloaded: false, typed: [] }
      },
    })
    if (judgement) autosave.resume(data.savedAt ?? undefined)
    return { kind: 'quantity', key: `q-${item.quantityId}`, item, answerItem, data, autosave, reading, status }
  }

  function calibrationState(question: CalibrationQuestion, number: number): CalibrationState {
    const saved = store.calibration[question.id]
    const data = reactive<CalibrationData>({
      texts: { q05: fieldText(saved?.q05), q50: fieldText(saved?.q50), q95: fieldText(saved?.q95) },
      version: saved?.version ?? 0,
      conflict: null,
    })
    const reads = computed(() => ({ q05: readNumber(data.texts.q05), q50: readNumber(data.texts.q50), q95: readNumber(data.texts.q95) }))
    const values = computed(() => {
      const r = reads.value
      const v = (k: keyof CalibrationTexts) => (r[k].ok ? r[k].value : null)
      return { q05: v('q05'), q50: v('q50'), q95: v('q95') }
    })
    const problems = computed(() => {
      const out: Partial<Record<keyof CalibrationTexts, string>> = {}
      for (const k of ['q05', 'q50', 'q95'] as const) {
        const r = reads.value[k]
        if (!r.ok && !r.empty) out[k] = r.message
      }
      return { ...calibrationProblems(values.value), ...out }
    })
    const isSaved = computed(() => {
      const s = store.calibration[question.id]
      const v = values.value
      return !!s && s.q05 === v.q05 && s.q50 === v.q50 && s.q95 === v.q95
    })
    const started = computed(() => Object.values(data.texts).some((t) => t.trim() !== ''))
    const autosave = useAutosave({
      blockedBy: () => {
        const first = Object.values(problems.value)[0]
        if (first) return first
        const v = values.value
        // The server keeps only whole calibration answers; a partial one waits here.
        if (v.q05 === null || v.q50 === null || v.q95 === null) return CALIBRATION_INCOMPLETE
        return null
      },
      save: async () => {
        const v = values.value
        const savedAnswer = await store.saveCalibration(round.value.id, question.id, { q05: v.q05!, q50: v.q50!, q95: v.q95!, version: data.version })
        data.version = savedAnswer.version
      },
      onConflict: (error) => {
        data.conflict = { message: error.message, reloading: false, reloaded: false, typed: [] }
      },
    })
    if (saved) autosave.resume(saved.updatedAt ? new Date(saved.updatedAt) : undefined)
    return { question, number, data, autosave, values, problems, saved: isSaved, started }
  }

  function linkState(link: RoundLink, first: QuantityState, second: QuantityState): LinkState {
    const saved = store.linkAnswers[link.id]
    const data = reactive<LinkData>({ probability: saved?.probability ?? null, rationale: saved?.rationale ?? '', version: saved?.version ?? 0, conflict: null })
    const marginals = computed<[Distribution, Distribution] | null>(() => {
      const a = shownFitOf(first)?.distribution
      const b = shownFitOf(second)?.distribution
      return a && b ? [a, b] : null
    })
    const status = computed(() => linkStatus(data))
    const autosave = useAutosave({
      blockedBy: () => null,
      save: async () => {
        const answer = await store.saveLinkAnswer(round.value.id, link.id, { probability: data.probability, rationale: data.rationale, version: data.version })
        data.version = answer.version
      },
      onConflict: (error) => {
        data.conflict = { message: error.message, reloading: false, reloaded: false, typed: [] }
      },
    })
    if (saved) autosave.resume(new Date(saved.updatedAt))
    return { kind: 'link', key: `l-${link.id}`, link, data, autosave, quantities: [first, second], marginals, status }
  }

  /** Builds the states from the store (after loading). */
  function build(): void {
    scope?.stop()
    scope = effectScope(true)
    scope.run(() => {
      quantities.value = round.value.items.map((item) => quantityState(item, store.judgements[item.quantityId]))
      const byQuantity = new Map(quantities.value.map((q) => [q.item.quantityId, q]))
      links.value = round.value.links.flatMap((link) => {
        const first = byQuantity.get(link.first.quantityId)
        const second = byQuantity.get(link.second.quantityId)
        return first && second ? [linkState(link, first, second)] : []
      })
      // Calibration questions are asked once per study: those answered in an earlier round are not asked again.
      const done = new Set(calibrationAnsweredEarlier.value)
      calibrations.value = askCalibration.value ? store.questions.filter((q) => !done.has(q.id)).map((q, i) => calibrationState(q, i + 1)) : []
    })
  }

  async function load(): Promise<void> {
    await store.load({
      roundId: round.value.id, studyId: round.value.studyId, askCalibration: askCalibration.value, feedbackEnabled: round.value.feedbackEnabled,
      hasLinks: round.value.links.length > 0,
    })
    build()
  }

  /** Applies a change to a quantity's draft and lets autosave know. */
  function edit(state: QuantityState, change: (draft: Draft) => void): void {
    if (readOnly.value || (state.data.conflict && !state.data.conflict.reloaded)) return
    change(state.data.draft)
    problems.value = null
    state.autosave.changed()
  }

  function editCalibration(state: CalibrationState, key: keyof CalibrationTexts, text: string): void {
    if (readOnly.value || (state.data.conflict && !state.data.conflict.reloaded)) return
    state.data.texts[key] = text
    problems.value = null
    state.autosave.changed()
  }

  /** Applies a change to a link's answer and lets autosave know. */
  function editLink(state: LinkState, change: (data: LinkData) => void): void {
    if (readOnly.value || (state.data.conflict && !state.data.conflict.reloaded)) return
    change(state.data)
    problems.value = null
    state.autosave.changed()
  }

  /** After a 409 on a link answer: fetch the saved one; what was typed stays listed. */
  async function reloadLink(state: LinkState): Promise<void> {
    const data = state.data
    if (!data.conflict) return
    data.conflict.reloading = true
    try {
      const typed = [`Chance: ${data.probability === null ? '—' : `${Math.round(data.probability * 100)} %`}`, `Why: ${data.rationale}`]
      await store.reloadLinkAnswers(round.value.id)
      const a = store.linkAnswers[state.link.id]
      data.probability = a?.probability ?? null
      data.rationale = a?.rationale ?? ''
      data.version = a?.version ?? 0
      state.autosave.resume(a ? new Date(a.updatedAt) : undefined)
      data.conflict = { ...data.conflict, reloading: false, reloaded: true, typed }
    } catch (error) {
      data.conflict.reloading = false
      data.conflict.message = error instanceof Error ? error.message : String(error)
    }
  }

  const labels = (state: QuantityState) => {
    const intervals = intervalLabels(state.item.edges ?? [], state.item.quantity.support)
    return { field: (f: keyof typeof FIELD_TITLES) => FIELD_TITLES[f], interval: (i: number) => intervals[i] ?? `Interval ${i + 1}` }
  }

  /** After a 409: fetch the saved answer; the form shows it, and what was typed stays listed for copying. */
  async function reloadQuantity(state: QuantityState): Promise<void> {
    const data = state.data
    if (!data.conflict) return
    data.conflict.reloading = true
    try {
      const typed = draftLines(state.answerItem, data.draft, labels(state))
      await store.reloadJudgements(round.value.id)
      const j = store.judgements[state.item.quantityId]
      data.draft = draftFromAnswer(state.answerItem, j?.answer, j?.rationale ?? '', j?.chosenFamily ?? null)
      data.version = j?.version ?? 0
      data.savedAt = j ? new Date(j.updatedAt) : null
      data.serverFits = j?.fits ?? null
      data.serverKey = j ? inputKey(state.reading.value) : null
      state.autosave.resume(data.savedAt ?? undefined)
      data.conflict = { ...data.conflict, reloading: false, reloaded: true, typed }
    } catch (error) {
      data.conflict.reloading = false
      data.conflict.message = error instanceof Error ? error.message : String(error)
    }
  }

  async function reloadCalibration(state: CalibrationState): Promise<void> {
    const data = state.data
    if (!data.conflict) return
    data.conflict.reloading = true
    try {
      const typed = [`5 %: ${data.texts.q05}`, `50 %: ${data.texts.q50}`, `95 %: ${data.texts.q95}`]
      await store.reloadCalibration(round.value.id)
      const s = store.calibration[state.question.id]
      data.texts = { q05: s ? String(s.q05) : '', q50: s ? String(s.q50) : '', q95: s ? String(s.q95) : '' }
      data.version = s?.version ?? 0
      state.autosave.resume(s?.updatedAt ? new Date(s.updatedAt) : undefined)
      data.conflict = { ...data.conflict, reloading: false, reloaded: true, typed }
    } catch (error) {
      data.conflict.reloading = false
      data.conflict.message = error instanceof Error ? error.message : String(error)
    }
  }

  /** Closes the notice after a reload. */
  function dismissConflict(state: QuantityState | CalibrationState | LinkState): void {
    state.data.conflict = null
  }

  const calibrationItemStatus = computed<ItemStatus>(() =>
    calibrationStatus(calibrations.value.map((c) => ({ saved: c.saved.value, started: c.started.value }))),
  )

  const railItems = computed<RailItem[]>(() => {
    const qs: RailItem[] = quantities.value.map((s) => ({
      key: s.key,
      kind: 'quantity',
      title: s.item.quantity.name,
      status: s.status.value,
      problem: problems.value?.quantities[s.item.quantityId] ?? null,
    }))
    for (const l of links.value) {
      qs.push({ key: l.key, kind: 'link', title: `${l.link.first.name} and ${l.link.second.name}`, status: l.status.value, problem: problems.value?.links[l.link.id] ?? null })
    }
    if (!calibrations.value.length) return qs
    const calibrationMessages = problems.value ? Object.values(problems.value.calibration) : []
    const calibrationProblem = calibrationMessages.length
      ? calibrationMessages.length === 1
        ? calibrationMessages[0]
        : `${calibrationMessages[0]} (and ${calibrationMessages.length - 1} more question${calibrationMessages.length === 2 ? '' : 's'})`
      : null
    const calib: RailItem = { key: 'calibration', kind: 'calibration', title: 'Calibration questions', status: calibrationItemStatus.value, problem: calibrationProblem }
    return round.value.calibrationPosition === 'before' ? [calib, ...qs] : [...qs, calib]
  })

  const allComplete = computed(() => railItems.value.every((i) => i.status === 'complete'))

  const compositions = computed(() => roundCompositions(store.compositions, quantities.value))
  /** The compositions a quantity is a share of in this round. */
  const compositionsOf = (state: QuantityState) => compositions.value.filter((c) => c.shares.some((s) => s.state === state))

  /** Saves whatever is waiting; resolves false if something could not be saved. */
  async function flushAll(): Promise<boolean> {
    const results = await Promise.all([
      ...quantities.value.map((s) => s.autosave.flush()), ...calibrations.value.map((c) => c.autosave.flush()), ...links.value.map((l) => l.autosave.flush()),
    ])
    return results.every(Boolean)
  }

  /** Submits the round: saves pending drafts, then freezes; field errors go to the rail. */
  async function submit(): Promise<boolean> {
    submitError.value = null
    problems.value = null
    submitting.value = true
    try {
      if (!(await flushAll())) {
        submitError.value = 'Some answers could not be saved; see the items marked on the left, fix them and submit again.'
        return false
      }
      await store.submit(round.value.id)
      for (const s of quantities.value) {
        const j = store.judgements[s.item.quantityId]
        if (j) s.data.version = j.version
      }
      for (const l of links.value) {
        const a = store.linkAnswers[l.link.id]
        if (a) l.data.version = a.version
      }
      return true
    } catch (error) {
      if (error instanceof ApiError && error.status === 400 && Object.keys(error.fields).length) {
        problems.value = sortSubmitProblems(error.fields)
        submitError.value = error.message
      } else {
        submitError.value = error instanceof Error ? error.message : String(error)
      }
      return false
    } finally {
      submitting.value = false
    }
  }

  /** One status line for several autosaves (the calibration block): the most pressing state first. */
  function combinedStatus(list: SaveStatus[]): SaveStatus {
    const order: SaveStatus['state'][] = ['conflict', 'failed', 'saving', 'pending', 'blocked', 'saved', 'idle']
    for (const state of order) {
      const hits = list.filter((s) => s.state === state)
      if (!hits.length) continue
      if (state === 'saved') return hits.reduce((a, b) => ((a as { at: Date }).at > (b as { at: Date }).at ? a : b))
      return hits[0]
    }
    return { state: 'idle' }
  }

  const tick = setInterval(() => (now.value = Date.now()), 30_000)

  function dispose(): void {
    clearInterval(tick)
    scope?.stop()
    for (const s of quantities.value) s.autosave.dispose()
    for (const c of calibrations.value) c.autosave.dispose()
    for (const l of links.value) l.autosave.dispose()
  }

  return {
    store,
    quantities,
    calibrations,
    links,
    railItems,
    allComplete,
    compositionsOf,
    problems,
    submitError,
    submitting,
    submitted,
    closed,
    readOnly,
    now,
    load,
    edit,
    editCalibration,
    editLink,
    reloadLink,
    reloadQuantity,
    reloadCalibration,
    dismissConflict,
    flushAll,
    submit,
    combinedStatus,
    dispose,
  }
}

export type AnswerSession = ReturnType<typeof useAnswerSession>
