import { EngineInputError, pointsFromChips, pointsFromIntervals, supportBounds, type Point, type Support } from '../stats/index'
import { fitWithRange, type JudgedFit, type PlausibleRange } from './fits'

export type Method = 'quantile' | 'fixed-interval' | 'chip-grid'

/** The round's settings for one quantity. */
export interface AnswerItem {
  method: Method
  edges?: number[]
  chips?: number
  askTails?: boolean
}

/** What an expert has entered so far; missing values are absent (quantile) or null (intervals). */
export interface AnswerInput {
  lower?: number | null
  upper?: number | null
  points?: Point[]
  edges?: number[]
  probs?: (number | null)[]
  chips?: number[]
}

export interface AnswerCheck {
  /** Every value the method asks for is present and coherent. */
  complete: boolean
  /** Plain messages per field for anything incoherent (never for values merely not yet given). */
  problems: Record<string, string>
  /** Cumulative points to fit, once complete. */
  points: Point[] | null
}

/** Probabilities asked by the quantile method, in the order the expert gives them after the bounds. */
export function quantileProbs(askTails: boolean): number[] {
  return askTails ? [0.05, 0.25, 0.5, 0.75, 0.95] : [0.25, 0.5, 0.75]
}

const pct = (p: number) => `${Math.round(p * 100)} %`

function supportRange(support: Support): { lo: number; hi: number; label: string } {
  const { lower: lo, upper: hi } = supportBounds(support)
  const label = { real: 'any real number', positive: 'above 0', proportion: 'between 0 and 1', bounded: `between ${lo} and ${hi}` }[support.kind]
  return { lo, hi, label }
}

function checkQuantile(item: AnswerItem, input: AnswerInput, support: Support): AnswerCheck {
  const problems: Record<string, string> = {}
  const { lo, hi, label } = supportRange(support)
  const lower = input.lower ?? null
  const upper = input.upper ?? null
  const inside = (v: number) => v > lo && v < hi
  if (lower !== null && !(lower >= lo && lower < hi)) problems.lower = `The lower bound must be ${label}`
  if (upper !== null && !(upper > lo && upper <= hi)) problems.upper = `The upper bound must be ${label}`
  if (lower !== null && upper !== null && !(upper > lower)) problems.upper = 'The upper bound must be above the lower bound'
  const asked = quantileProbs(!!item.askTails)
  const points = [...(input.points ?? [])].sort((a, b) => a.prob - b.prob)
  points.forEach((p) => {
    const key = `points.${pct(p.prob)}`
    if (!asked.some((q) => Math.abs(q - p.prob) < 1e-9)) problems.points = `This round asks for the ${asked.map(pct).join(', ')} values only`
    else if (!inside(p.value)) problems[key] = `The ${pct(p.prob)} value must be ${label}`
    else if (lower !== null && !(p.value > lower)) problems[key] = `The ${pct(p.prob)} value must be above your lower bound (${lower})`
    else if (upper !== null && !(p.value < upper)) problems[key] = `The ${pct(p.prob)} value must be below your upper bound (${upper})`
  })
  for (let i = 1; i < points.length; i++) {
    if (Math.abs(points[i].prob - points[i - 1].prob) < 1e-12) problems.points = `The ${pct(points[i].prob)} value is given twice`
    else if (!(points[i].value > points[i - 1].value)) {
      problems[`points.${pct(points[i].prob)}`] = `The ${pct(points[i].prob)} value must be above the ${pct(points[i - 1].prob)} value (${points[i - 1].value})`
    }
  }
  const complete = Object.keys(problems).length === 0 && lower !== null && upper !== null && asked.every((q) => points.some((p) => Math.abs(p.prob - q) < 1e-9))
  return { complete, problems, points: complete ? points : null }
}

function sameEdges(a: number[] | undefined, b: number[] | undefined): boolean {
  return !!a && !!b && a.length === b.length && a.every((x, i) => x === b[i])
}

function checkIntervals(item: AnswerItem, input: AnswerInput): AnswerCheck {
  const problems: Record<string, string> = {}
  const edges = item.edges ?? []
  if (input.edges && !sameEdges(input.edges, edges)) problems.edges = 'The intervals differ from the ones this round asks about; reload the page'
  const probs = input.probs ?? []
  if (probs.length !== edges.length - 1) problems.probs = `Give one probability for each of the ${edges.length - 1} intervals`
  const given = probs.filter((p): p is number => typeof p === 'number')
  const total = given.reduce((s, p) => s + p, 0)
  if (total > 1 + 1e-9) problems.probs = `Your probabilities add up to ${(total * 100).toFixed(1)} %, more than 100 %`
  const complete = Object.keys(problems).length === 0 && given.length === probs.length && Math.abs(total - 1) <= 1e-6
  return { complete, problems, points: null }
}

function checkChips(item: AnswerItem, input: AnswerInput): AnswerCheck {
  const problems: Record<string, string> = {}
  const edges = item.edges ?? []
  const allowed = item.chips ?? 0
  if (input.edges && !sameEdges(input.edges, edges)) problems.edges = 'The bins differ from the ones this round asks about; reload the page'
  const chips = input.chips ?? []
  if (chips.length !== edges.length - 1) problems.chips = `Give a chip count for each of the ${edges.length - 1} bins`
  if (chips.some((c) => !Number.isInteger(c) || c < 0)) problems.chips = 'Chip counts are whole numbers, 0 or more'
  const placed = chips.reduce((s, c) => s + c, 0)
  if (placed > allowed) problems.chips = `You placed ${placed} chips; this round has ${allowed}`
  const complete = Object.keys(problems).length === 0 && placed === allowed
  return { complete, problems, points: null }
}

/** Checks an answer for coherence and completeness, and gives the cumulative points to fit once complete. */
export function checkAnswer(item: AnswerItem, input: AnswerInput, support: Support): AnswerCheck {
  if (item.method === 'quantile') return checkQuantile(item, input, support)
  const check = item.method === 'fixed-interval' ? checkIntervals(item, input) : checkChips(item, input)
  if (!check.complete) return check
  try {
    const points = item.method === 'fixed-interval'
      ? pointsFromIntervals(item.edges!, input.probs as number[])
      : pointsFromChips(item.edges!, input.chips!)
    return { ...check, points }
  } catch (err) {
    if (err instanceof EngineInputError) return { complete: false, problems: { [err.field]: err.message }, points: null }
    throw err
  }
}

export interface AnswerFits {
  check: AnswerCheck
  /** Every family valid for the support, the default first (docs/methods/fitting.md), each with its warnings. */
  fits: JudgedFit[]
  /** Why no fit is shown although the answer is complete (e.g. all probability in one bin). */
  fitMessage: string | null
}

/** Index of the first and last bin holding probability. */
function filledSpan(masses: number[]): { first: number; last: number } {
  const filled = masses.map((m, i) => (m > 0 ? i : -1)).filter((i) => i >= 0)
  return { first: filled[0], last: filled[filled.length - 1] }
}

/**
 * Where the answer says the value plausibly lies: the quantile method's bounds; for intervals and chips, the span of
 * the bins holding probability (an open end bin holding probability leaves that side unlimited).
 */
export function plausibleRange(item: AnswerItem, input: AnswerInput): PlausibleRange | null {
  if (item.method === 'quantile') return { lower: input.lower ?? null, upper: input.upper ?? null, source: 'bounds' }
  const edges = item.edges ?? []
  const masses = item.method === 'fixed-interval' ? (input.probs ?? []).map((p) => p ?? 0) : input.chips ?? []
  if (!masses.some((m) => m > 0)) return null
  const { first, last } = filledSpan(masses)
  if (masses.length === edges.length + 1) {
    return { lower: first === 0 ? null : edges[first - 1], upper: last === edges.length ? null : edges[last], source: 'bins' }
  }
  return { lower: edges[first], upper: edges[last + 1], source: 'bins' }
}

/** The fits the expert sees and the server stores: every family valid for the support, the default first. */
export function fitAnswer(item: AnswerItem, input: AnswerInput, support: Support): AnswerFits {
  const check = checkAnswer(item, input, support)
  if (!check.complete || !check.points) return { check, fits: [], fitMessage: null }
  if (check.points.length < 2) return { check, fits: [], fitMessage: 'Spread your answer over at least two intervals so a distribution can be fitted' }
  try {
    return { check, fits: fitWithRange(check.points, support, plausibleRange(item, input)), fitMessage: null }
  } catch (err) {
    if (err instanceof EngineInputError) return { check, fits: [], fitMessage: err.message }
    throw err
  }
}
