import { RATIONALE_MIN } from '@shared/schemas/judgements'

export type ItemStatus = 'not-started' | 'in-progress' | 'complete'

export const STATUS_LABELS: Record<ItemStatus, string> = {
  'not-started': 'Not started',
  'in-progress': 'In progress',
  complete: 'Complete',
}

/** Whether a rationale is long enough to submit (the server asks for RATIONALE_MIN characters). */
export function rationaleOk(text: string): boolean {
  return text.trim().length >= RATIONALE_MIN
}

/**
 * A quantity is complete once its answer is whole and coherent, a distribution could be fitted, and the rationale
 * says what drove it; in progress once anything is entered.
 */
export function quantityStatus(s: { started: boolean; complete: boolean; fitted: boolean; rationale: string }): ItemStatus {
  if (s.complete && s.fitted && rationaleOk(s.rationale)) return 'complete'
  return s.started ? 'in-progress' : 'not-started'
}

/** A link's question: complete once a chance is given (the reason is optional); in progress once a reason is typed. */
export function linkStatus(s: { probability: number | null; rationale: string }): ItemStatus {
  if (s.probability !== null) return 'complete'
  return s.rationale.trim() ? 'in-progress' : 'not-started'
}

/** The calibration block: complete when every question has its three values saved. */
export function calibrationStatus(questions: { saved: boolean; started: boolean }[]): ItemStatus {
  if (questions.length > 0 && questions.every((q) => q.saved)) return 'complete'
  return questions.some((q) => q.started || q.saved) ? 'in-progress' : 'not-started'
}

export interface SubmitProblems {
  /** Messages by quantity id. */
  quantities: Record<number, string>
  /** Messages by calibration question id. */
  calibration: Record<number, string>
  /** Messages by link id. */
  links: Record<number, string>
  /** Messages not tied to an item. */
  other: string[]
}

/** Sorts the submit endpoint's field errors ('quantity.<id>', 'calibration.<questionId>', 'link.<id>') onto the rail's items. */
export function submitProblems(fields: Record<string, string>): SubmitProblems {
  const out: SubmitProblems = { quantities: {}, calibration: {}, links: {}, other: [] }
  for (const [key, message] of Object.entries(fields)) {
    const m = /^(quantity|calibration|link)\.(\d+)$/.exec(key)
    if (!m) out.other.push(message)
    else if (m[1] === 'quantity') out.quantities[Number(m[2])] = message
    else if (m[1] === 'link') out.links[Number(m[2])] = message
    else out.calibration[Number(m[2])] = message
  }
  return out
}

/** Calibration values: each present, and increasing (as the server checks them). */
export function calibrationProblems(v: { q05: number | null; q50: number | null; q95: number | null }): Partial<Record<'q05' | 'q50' | 'q95', string>> {
  const out: Partial<Record<'q05' | 'q50' | 'q95', string>> = {}
  if (v.q05 !== null && v.q50 !== null && !(v.q50 > v.q05)) out.q50 = `Your 50 % value must be above your 5 % value (${v.q05})`
  if (v.q50 !== null && v.q95 !== null && !(v.q95 > v.q50)) out.q95 = `Your 95 % value must be above your 50 % value (${v.q50})`
  else if (v.q50 === null && v.q05 !== null && v.q95 !== null && !(v.q95 > v.q05)) out.q95 = `Your 95 % value must be above your 5 % value (${v.q05})`
  return out
}
