import { fitAnswer, type AnswerFits, type AnswerInput, type AnswerItem } from '@shared/elicitation/answers'
import type { Family, Support } from '@shared/stats'
import type { JudgementSave } from '@/api/judgements'
import { fieldText, readNumber } from '@/utils/typedNumber'
import {
  PROBLEM_KEYS,
  QUANTILE_FIELDS,
  quantileInput,
  quantileProblems,
  quantileSteps,
  quantileValuesOf,
  revealedFor,
  type QuantileField,
  type QuantileValues,
} from './quantile'

/**
 * What the expert has typed for one quantity, kept as text so nothing they type is lost or reformatted while they
 * type. Fixed-interval probabilities are percentages ("25" for 25 %).
 */
export interface Draft {
  texts: Record<QuantileField, string>
  percents: string[]
  chips: number[]
  rationale: string
  /** The family the expert picked from those fitted; null: the best-fitting one. */
  chosenFamily: Family | null
  /** Quantile steps on show (1 = the bounds only). */
  revealed: number
}

export interface DraftReading {
  input: AnswerInput
  /** The shared engine's check and fits (the same call the server makes). */
  result: AnswerFits
  /** Plain messages by field: a quantile field, `prob.<i>`, `probs`, `chips`, `points` or `edges`. */
  problems: Record<string, string>
  /** Anything entered at all (values, chips or rationale). */
  started: boolean
  /** Which quantile fields hold a number. */
  given: Partial<Record<QuantileField, boolean>>
}

const emptyTexts = (): Record<QuantileField, string> => Object.fromEntries(QUANTILE_FIELDS.map((f) => [f, ''])) as Record<QuantileField, string>

export function bins(item: AnswerItem): number {
  return Math.max(0, (item.edges?.length ?? 1) - 1)
}

export function emptyDraft(item: AnswerItem): Draft {
  return { texts: emptyTexts(), percents: Array(bins(item)).fill(''), chips: Array(bins(item)).fill(0), rationale: '', chosenFamily: null, revealed: 1 }
}

/** A probability as a percentage for the form: 0.3 → "30", 0.333 → "33.3" (no float noise). */
export function percentText(prob: number | null | undefined): string {
  if (typeof prob !== 'number' || !Number.isFinite(prob)) return ''
  return fieldText(Number((prob * 100).toFixed(6)))
}

/** A typed percentage as a probability, rounded so that "33.3" gives 0.333 exactly as typed. */
export function probOf(percent: number): number {
  return Number((percent / 100).toPrecision(12))
}

/** The form state for a saved answer. */
export function draftFromAnswer(item: AnswerItem, answer: AnswerInput | null | undefined, rationale = '', chosenFamily: Family | null = null): Draft {
  const draft = emptyDraft(item)
  draft.rationale = rationale
  draft.chosenFamily = chosenFamily
  if (!answer) return draft
  if (item.method === 'quantile') {
    const values = quantileValuesOf(answer)
    for (const f of QUANTILE_FIELDS) draft.texts[f] = fieldText(values[f])
    draft.revealed = revealedFor(values, quantileSteps(!!item.askTails))
  } else if (item.method === 'fixed-interval') {
    draft.percents = draft.percents.map((_, i) => percentText(answer.probs?.[i]))
  } else {
    draft.chips = draft.chips.map((_, i) => Math.max(0, Math.floor(answer.chips?.[i] ?? 0)))
  }
  return draft
}

function mapShared(item: AnswerItem, shared: Record<string, string>, problems: Record<string, string>): void {
  for (const [key, message] of Object.entries(shared)) {
    if (item.method === 'quantile') {
      const field = QUANTILE_FIELDS.find((f) => PROBLEM_KEYS[f] === key)
      const target = field ?? 'points'
      problems[target] ??= message
    } else {
      problems[key] ??= message
    }
  }
}

/**
 * Reads the typed draft: numbers parsed, inline problems by field, and the shared engine's check and fits
 * (fitAnswer, exactly what the server stores on save).
 */
export function readDraft(item: AnswerItem, draft: Draft, support: Support): DraftReading {
  const problems: Record<string, string> = {}
  const given: Partial<Record<QuantileField, boolean>> = {}
  let input: AnswerInput
  let started = draft.rationale.trim().length > 0
  if (item.method === 'quantile') {
    const values: QuantileValues = {}
    for (const f of QUANTILE_FIELDS) {
      const text = draft.texts[f]
      if (text.trim() === '') continue
      started = true
      const read = readNumber(text, support.kind === 'proportion' ? 'share' : 'none')
      if (!read.ok) problems[f] = read.message
      else {
        values[f] = read.value
        given[f] = true
      }
    }
    Object.assign(problems, { ...quantileProblems(values, support, !!item.askTails), ...problems })
    input = quantileInput(values)
  } else if (item.method === 'fixed-interval') {
    const probs = draft.percents.map((text, i) => {
      if (text.trim() === '') return null
      started = true
      const read = readNumber(text, 'points')
      if (!read.ok) {
        problems[`prob.${i}`] = read.message
        return null
      }
      const value = read.value
      if (value < 0 || value > 100) {
        problems[`prob.${i}`] = 'Enter a percentage from 0 to 100'
        return null
      }
      return probOf(value)
    })
    input = { edges: item.edges, probs }
  } else {
    if (draft.chips.some((c) => c > 0)) started = true
    input = { edges: item.edges, chips: [...draft.chips] }
  }
  const result = fitAnswer(item, input, support)
  mapShared(item, result.check.problems, problems)
  return { input, result, problems, started, given }
}

/** The body of the save request for this draft. */
export function saveBody(item: AnswerItem, reading: DraftReading, draft: Draft, version: number): JudgementSave {
  const chosen = draft.chosenFamily && reading.result.fits.some((f) => f.distribution.family === draft.chosenFamily) ? draft.chosenFamily : null
  const base = { method: item.method, rationale: draft.rationale, chosenFamily: chosen, version }
  if (item.method === 'quantile') {
    return { ...base, lower: reading.input.lower ?? null, upper: reading.input.upper ?? null, points: reading.input.points ?? [] }
  }
  if (item.method === 'fixed-interval') return { ...base, edges: item.edges, probs: reading.input.probs ?? [] }
  return { ...base, edges: item.edges, chips: reading.input.chips ?? [] }
}

/** A copy of what was typed, as lines to read or copy after a conflicting save from elsewhere. */
export function draftLines(item: AnswerItem, draft: Draft, labels: { field: (f: QuantileField) => string; interval: (i: number) => string }): string[] {
  const lines: string[] = []
  if (item.method === 'quantile') {
    for (const f of QUANTILE_FIELDS) if (draft.texts[f].trim()) lines.push(`${labels.field(f)}: ${draft.texts[f].trim()}`)
  } else if (item.method === 'fixed-interval') {
    draft.percents.forEach((p, i) => {
      if (p.trim()) lines.push(`${labels.interval(i)}: ${p.trim()} %`)
    })
  } else {
    draft.chips.forEach((c, i) => lines.push(`${labels.interval(i)}: ${c} chip${c === 1 ? '' : 's'}`))
  }
  if (draft.rationale.trim()) lines.push(`Rationale: ${draft.rationale.trim()}`)
  return lines
}
