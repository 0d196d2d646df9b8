import { supportBounds, type Point, type Support } from '@shared/stats'
import { PLAUSIBLE_BOUND_WORDS } from '@shared/elicitation/bounds'
import { formatValue } from '@shared/format'
import { valueText } from './format'

/** The quantile method's fields, in the order they are asked (DESIGN "Elicitation methods"). */
export const QUANTILE_FIELDS = ['lower', 'upper', 'median', 'q1', 'q3', 'p05', 'p95'] as const
export type QuantileField = (typeof QUANTILE_FIELDS)[number]
export type PointField = Exclude<QuantileField, 'lower' | 'upper'>

/** Cumulative probability each answered value stands for. */
export const FIELD_PROB: Record<PointField, number> = { p05: 0.05, q1: 0.25, median: 0.5, q3: 0.75, p95: 0.95 }

/** Position of each field on the probability scale, bounds outside (used to order the checks). */
const FIELD_RANK: Record<QuantileField, number> = { lower: 0, p05: 0.05, q1: 0.25, median: 0.5, q3: 0.75, p95: 0.95, upper: 1 }

export const FIELD_LABELS: Record<QuantileField, string> = {
  lower: 'lower bound',
  upper: 'upper bound',
  median: 'median',
  q1: 'lower quartile',
  q3: 'upper quartile',
  p05: '5 % value',
  p95: '95 % value',
}

export const FIELD_TITLES: Record<QuantileField, string> = {
  lower: 'Plausible lower bound',
  upper: 'Plausible upper bound',
  median: 'Median (50 %)',
  q1: 'Lower quartile (25 %)',
  q3: 'Upper quartile (75 %)',
  p05: '5 % value',
  p95: '95 % value',
}

/** The check's problem keys (shared/elicitation/answers.ts) for each field. */
export const PROBLEM_KEYS: Record<QuantileField, string> = {
  lower: 'lower',
  upper: 'upper',
  median: 'points.50 %',
  q1: 'points.25 %',
  q3: 'points.75 %',
  p05: 'points.5 %',
  p95: 'points.95 %',
}

export interface QuantileStep {
  key: 'bounds' | 'median' | 'quartiles' | 'tails'
  title: string
  prompt: string
  fields: QuantileField[]
}

const STEPS: QuantileStep[] = [
  {
    key: 'bounds',
    title: 'Plausible range',
    prompt: `Start with the range. Give a lower and an upper value such that you would be very surprised to see the true value fall below the lower one or above the upper one (${PLAUSIBLE_BOUND_WORDS} each side).`,
    fields: ['lower', 'upper'],
  },
  {
    key: 'median',
    title: 'Median',
    prompt: 'Now the median: the value for which you think the true value is equally likely to be below it or above it.',
    fields: ['median'],
  },
  {
    key: 'quartiles',
    title: 'Quartiles',
    prompt:
      'Suppose you learn the true value is below your median. Which value would it then be equally likely to fall above or below? Then the same above your median.',
    fields: ['q1', 'q3'],
  },
  {
    key: 'tails',
    title: '5 % and 95 % values',
    prompt:
      'Last, the tails: a 5 % value, with only a 1 in 20 chance that the true value is below it, and a 95 % value, with only a 1 in 20 chance that it is above.',
    fields: ['p05', 'p95'],
  },
]

/**
 * A step's question with the expert's own earlier answers filled in, once they are given: "Suppose you learn the true
 * value is below 11 bursts per 100 km per year. Which value would it then be equally likely to fall above or below?"
 */
export function stepPrompt(step: QuantileStep, values: QuantileValues, unit: string, support: Support): string {
  const v = (x: number) => valueText(x, unit, support)
  if (step.key === 'median' && values.lower !== undefined && values.upper !== undefined) {
    return `Now the median: between ${v(values.lower)} and ${v(values.upper)}, which value is the true value equally likely to be below or above?`
  }
  if (step.key === 'quartiles' && values.median !== undefined) {
    const m = v(values.median)
    return `Suppose you learn the true value is below ${m}. Which value would it then be equally likely to fall above or below? Then the same if you learn it is above ${m}.`
  }
  return step.prompt
}

/** Steps in the asking order: bounds → median → quartiles, then the tails when the analyst asked for them. */
export function quantileSteps(askTails: boolean): QuantileStep[] {
  return askTails ? STEPS : STEPS.slice(0, 3)
}

export type QuantileValues = Partial<Record<QuantileField, number>>

const capital = (s: string) => s[0].toUpperCase() + s.slice(1)

/** Why a value lies outside the quantity's possible values, or null. Bounds may touch a finite end; answers may not. */
function supportProblem(field: QuantileField, value: number, support: Support): string | null {
  const { lower: lo, upper: hi } = supportBounds(support)
  const label = capital(`the ${FIELD_LABELS[field]}`)
  const atEndOk = field === 'lower' ? value >= lo && value < hi : field === 'upper' ? value > lo && value <= hi : value > lo && value < hi
  if (atEndOk) return null
  if (support.kind === 'positive') return field === 'lower' ? `${label} cannot be negative` : `${label} must be above 0`
  if (support.kind === 'proportion') return `${label} must be between 0 and 1`
  if (support.kind === 'bounded') return `${label} must be between ${support.lower} and ${support.upper}`
  return null
}

/**
 * Checks the values in the asking order: each against the quantity's possible values, then against every value
 * asked before it (which it must lie above or below, by its probability). The message goes on the later value,
 * the one the expert is typing, and names the earlier one it conflicts with. Together these are exactly the
 * conditions of the shared check (strictly increasing, inside the bounds, inside the support).
 */
export function quantileProblems(values: QuantileValues, support: Support, askTails: boolean): Partial<Record<QuantileField, string>> {
  const order = quantileSteps(askTails).flatMap((s) => s.fields)
  const problems: Partial<Record<QuantileField, string>> = {}
  const before: QuantileField[] = []
  for (const field of order) {
    const value = values[field]
    if (value === undefined) continue
    const outside = supportProblem(field, value, support)
    if (outside) {
      problems[field] = outside
      continue
    }
    // Nearest earlier values first, so the message names the closest conflict.
    const earlier = [...before].sort((a, b) => Math.abs(FIELD_RANK[a] - FIELD_RANK[field]) - Math.abs(FIELD_RANK[b] - FIELD_RANK[field]))
    for (const other of earlier) {
      const o = values[other]!
      const above = FIELD_RANK[field] > FIELD_RANK[other]
      if (above ? !(value > o) : !(value < o)) {
        problems[field] = `${capital(`the ${FIELD_LABELS[field]}`)} must be ${above ? 'above' : 'below'} your ${FIELD_LABELS[other]} (${formatValue(o)})`
        break
      }
    }
    if (!problems[field]) before.push(field)
  }
  return problems
}

/** The answered values as the shared check's input: bounds apart, the rest as cumulative points. */
export function quantileInput(values: QuantileValues): { lower: number | null; upper: number | null; points: Point[] } {
  const points: Point[] = []
  for (const field of ['p05', 'q1', 'median', 'q3', 'p95'] as const) {
    const value = values[field]
    if (value !== undefined) points.push({ value, prob: FIELD_PROB[field] })
  }
  return { lower: values.lower ?? null, upper: values.upper ?? null, points }
}

/** Splits a stored quantile answer back into fields. */
export function quantileValuesOf(answer: { lower?: number | null; upper?: number | null; points?: Point[] } | null | undefined): QuantileValues {
  const values: QuantileValues = {}
  if (!answer) return values
  if (typeof answer.lower === 'number') values.lower = answer.lower
  if (typeof answer.upper === 'number') values.upper = answer.upper
  for (const p of answer.points ?? []) {
    const field = (Object.keys(FIELD_PROB) as PointField[]).find((f) => Math.abs(FIELD_PROB[f] - p.prob) < 1e-9)
    if (field) values[field] = p.value
  }
  return values
}

/**
 * Whether the step at `index` is done: each of its fields and of the steps before it has a value, and none has a
 * problem. Only then is the next step offered (bounds → median → quartiles → tails).
 */
export function stepDone(index: number, steps: QuantileStep[], given: Partial<Record<QuantileField, boolean>>, problems: Partial<Record<string, string>>): boolean {
  for (const step of steps.slice(0, index + 1)) {
    for (const field of step.fields) if (!given[field] || problems[field]) return false
  }
  return true
}

/** How many steps to show for a saved answer: every step holding a value (at least the first). */
export function revealedFor(values: QuantileValues, steps: QuantileStep[]): number {
  let shown = 1
  steps.forEach((step, i) => {
    if (step.fields.some((f) => values[f] !== undefined)) shown = Math.max(shown, i + 1)
  })
  return shown
}
