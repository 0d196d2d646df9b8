import type { Point } from '@shared/stats'

/** The quantile method asks in this order to limit anchoring: the plausible bounds first, the median last (common practice in elicitation protocols; see docs/methods/fitting.md). */
export const PRACTICE_STEPS = [
  {
    key: 'lower',
    prob: 0.05,
    title: 'Plausible lower bound',
    prompt: 'What is the lowest value you find plausible? You would be surprised if the true answer were below it.',
    testid: 'practice-lower',
  },
  {
    key: 'upper',
    prob: 0.95,
    title: 'Plausible upper bound',
    prompt: 'What is the highest value you find plausible? You would be surprised if the true answer were above it.',
    testid: 'practice-upper',
  },
  {
    key: 'median',
    prob: 0.5,
    title: 'Median',
    prompt: 'Which value splits your range so that the true answer is equally likely to be below it or above it?',
    testid: 'practice-median',
  },
  {
    key: 'q1',
    prob: 0.25,
    title: 'Lower quartile',
    prompt: 'Suppose the true answer is below your median. Which value splits that lower part into two equally likely halves?',
    testid: 'practice-q1',
  },
  {
    key: 'q3',
    prob: 0.75,
    title: 'Upper quartile',
    prompt: 'Suppose the true answer is above your median. Which value splits that upper part into two equally likely halves?',
    testid: 'practice-q3',
  },
] as const

export type PracticeKey = (typeof PRACTICE_STEPS)[number]['key']
export type PracticeValues = Partial<Record<PracticeKey, number>>

/** Reads a typed number ("1 840", "1840.5"); null when empty or not a number. */
export function parseNumber(text: string | number | null | undefined): number | null {
  if (typeof text === 'number') return Number.isFinite(text) ? text : null
  if (typeof text !== 'string') return null
  const cleaned = text.trim().replace(/[\s\u00a0\u202f]/g, '')
  if (cleaned === '' || !/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(cleaned)) return null
  const value = Number(cleaned)
  return Number.isFinite(value) ? value : null
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
 * The five answers as CDF points: bounds → 5 % and 95 %, quartiles → 25 % and 75 %, median → 50 %,
 * ordered by value. Null until all five are given.
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
