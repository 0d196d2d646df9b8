import type { Point } from '@shared/stats'
import { PLAUSIBLE_BOUND_PROB, PLAUSIBLE_BOUND_WORDS } from '@shared/elicitation/bounds'
import { formatValue, withUnit } from '@shared/format'

/** The quantile method asks in this order to limit anchoring: the plausible bounds first, then the median, then the quartiles (common practice in elicitation protocols; see docs/methods/fitting.md). */
export const PRACTICE_STEPS = [
  { key: 'lower', prob: PLAUSIBLE_BOUND_PROB, title: 'Plausible lower bound', testid: 'practice-lower' },
  { key: 'upper', prob: 1 - PLAUSIBLE_BOUND_PROB, title: 'Plausible upper bound', testid: 'practice-upper' },
  { key: 'median', prob: 0.5, title: 'Median', testid: 'practice-median' },
  { key: 'q1', prob: 0.25, title: 'Lower quartile', testid: 'practice-q1' },
  { key: 'q3', prob: 0.75, title: 'Upper quartile', testid: 'practice-q3' },
] as const

export type PracticeKey = (typeof PRACTICE_STEPS)[number]['key']
export type PracticeValues = Partial<Record<PracticeKey, number>>

/**
 * The question for one step, with the expert's own earlier answers filled in ("Suppose you learn the true answer
 * is below 1,500 km. Which value would it then be equally likely to fall above or below?").
 */
export function practicePrompt(key: PracticeKey, values: PracticeValues, unit = ''): string {
  const v = (x: number | undefined, missing: string) => (x === undefined ? missing : withUnit(formatValue(x), unit))
  switch (key) {
    case 'lower':
      return `What is the lowest value you find plausible? You would be very surprised to learn that the true answer is below it (${PLAUSIBLE_BOUND_WORDS}).`
    case 'upper':
      return `What is the highest value you find plausible? You would be very surprised to learn that the true answer is above it (${PLAUSIBLE_BOUND_WORDS}).`
    case 'median':
      return `Between ${v(values.lower, 'your lowest')} and ${v(values.upper, 'your highest value')}: which value is the true answer equally likely to be below or above?`
    case 'q1':
      return `Suppose you learn the true answer is below ${v(values.median, 'your median')}. Which value would it then be equally likely to fall above or below?`
    case 'q3':
      return `Suppose you learn the true answer is above ${v(values.median, 'your median')}. Which value would it then be equally likely to fall above or below?`
  }
}

/**
 * Checks the value of one step against the values given before it; returns the message to show,
 * or null when the value fits (strictly increasing: lower < q1 < median < q3 < upper).
 */
export function checkStep(key: PracticeKey, value: number | null, values: PracticeValues): string | null {
  if (value === null) return 'Enter a number'
  const { lower, upper, median } = values
  switch (key) {
    case 'lower':
      return null
    case 'upper':
      if (lower !== undefined && !(value > lower)) return `The upper bound must be larger than your lower bound (${lower})`
      return null
    case 'median':
      if (lower !== undefined && !(value > lower)) return `The median must be larger than your lower bound (${lower})`
      if (upper !== undefined && !(value < upper)) return `The median must be smaller than your upper bound (${upper})`
      return null
    case 'q1':
      if (lower !== undefined && !(value > lower)) return `The lower quartile must be larger than your lower bound (${lower})`
      if (median !== undefined && !(value < median)) return `The lower quartile must be smaller than your median (${median})`
      return null
    case 'q3':
      if (median !== undefined && !(value > median)) return `The upper quartile must be larger than your median (${median})`
      if (upper !== undefined && !(value < upper)) return `The upper quartile must be smaller than your upper bound (${upper})`
      return null
  }
}

/**
 * Re-checks every given value in the asking order (an earlier answer may have been changed);
 * returns the first step that no longer fits, with its message.
 */
export function firstProblem(values: PracticeValues): { index: number; message: string } | null {
  const before: PracticeValues = {}
  for (let i = 0; i < PRACTICE_STEPS.length; i++) {
    const key = PRACTICE_STEPS[i].key
    const value = values[key]
    if (value === undefined) return null
    const message = checkStep(key, value, before)
    if (message) return { index: i, message }
    before[key] = value
  }
  return null
}

/**
 * The five answers as points of the expert's distribution, read as the real rounds read them: each bound with
 * PLAUSIBLE_BOUND_PROB beyond it, quartiles → 25 % and 75 %, median → 50 %; ordered by value. Null until all five
 * are given.
 */
export function practicePoints(values: PracticeValues): Point[] | null {
  const points: Point[] = []
  for (const step of PRACTICE_STEPS) {
    const value = values[step.key]
    if (value === undefined) return null
    points.push({ value, prob: step.prob })
  }
  return points.sort((a, b) => a.prob - b.prob)
}
