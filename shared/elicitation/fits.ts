import { cdf, fitAll, quantile, sf, supportOf, type Distribution, type Family, type FitResult, type Point, type Support } from '../stats/index'
import { supportBounds } from '../stats/points'
import { PLAUSIBLE_BOUND_PROB } from './bounds'
import { formatValue } from '../format/numbers'

/**
 * Weight of each plausible bound in the fitting criterion, against 1 for each elicited quantile (the tool's own
 * convention, docs/methods/fitting.md): bounds are "very surprised if outside" judgements rather than stated
 * probabilities, and the 1 % reading is itself a convention, so they pull half as hard as a quantile.
 */
export const BOUND_WEIGHT = 0.5

/** A fit that puts more than this share of probability outside the expert's plausible range is never the default. */
export const MAX_OUTSIDE_SHARE = 0.1

/**
 * Near-tie tolerance on the criterion: a hard-edged family (the uniform) is the default only when its criterion is
 * lower than every acceptable smooth family's by more than this (≈ one probability off by 3 percentage points).
 */
export const NEAR_TIE = 1e-3

/** The fit the expert chose, else the best one (fits are kept best first); null when nothing was fitted. Priorsmith's own rule. */
export function chosenFit<F extends { distribution: { family: string } }>(fits: readonly F[], chosenFamily: string | null | undefined): F | null {
  return fits.find((f) => f.distribution.family === chosenFamily) ?? fits[0] ?? null
}

/** A tail beyond a point inside the plausible range is "almost no chance" below this: 100 times less than a bound's reading. */
export const THIN_TAIL_PROB = PLAUSIBLE_BOUND_PROB / 100

/** Families whose density drops to zero at an edge of their own choosing (not the quantity's support). */
const HARD_EDGED: readonly Family[] = ['uniform']

/**
 * Where the expert's answer says the value plausibly lies: the bounds given with the quantile method, or, for
 * interval and chip answers, the span of the intervals or bins that hold probability. null = no limit on that side.
 */
export interface PlausibleRange {
  lower: number | null
  upper: number | null
  source: 'bounds' | 'bins'
}

/** A fit with what the default-fit rule found about it. */
export interface JudgedFit extends FitResult {
  /** Probability the fit puts outside the plausible range (null without a range). */
  outside: number | null
  /** Zero density over part of the plausible range, or more than MAX_OUTSIDE_SHARE outside it: never the default. */
  contradicts: boolean
  /** Plain-words warnings for experts and analysts. */
  warnings: string[]
}

/**
 * The points and weights of the criterion: the elicited points (weight 1) and each plausible bound read as its
 * PLAUSIBLE_BOUND_PROB / 1 − PLAUSIBLE_BOUND_PROB point (weight BOUND_WEIGHT). A bound on the edge of the quantity's
 * support says nothing the support does not, and is left out. Weights are undefined when no bound enters.
 */
export function criterionPoints(points: Point[], range: PlausibleRange | null, support: Support): { points: Point[]; weights?: number[] } {
  if (!range || range.source !== 'bounds') return { points }
  const edge = supportBounds(support)
  const below = range.lower !== null && range.lower > edge.lower && range.lower < points[0].value && PLAUSIBLE_BOUND_PROB < points[0].prob
  const last = points[points.length - 1]
  const above = range.upper !== null && range.upper < edge.upper && range.upper > last.value && 1 - PLAUSIBLE_BOUND_PROB > last.prob
  if (!below && !above) return { points }
  const all = [
    ...(below ? [{ value: range.lower as number, prob: PLAUSIBLE_BOUND_PROB }] : []),
    ...points,
    ...(above ? [{ value: range.upper as number, prob: 1 - PLAUSIBLE_BOUND_PROB }] : []),
  ]
  const weights = [...(below ? [BOUND_WEIGHT] : []), ...points.map(() => 1), ...(above ? [BOUND_WEIGHT] : [])]
  return { points: all, weights }
}

const say = formatValue
const percent = (p: number) => `${p < 0.995 ? Math.round(p * 100) : '99'} %`

/** What the expert said about a limit, in their terms. */
function plausibleWords(range: PlausibleRange, side: 'lower' | 'upper'): string {
  const v = say(range[side] as number)
  if (range.source === 'bounds') return `you said ${v} is plausible`
  return side === 'upper' ? `your answer gives some chance to values up to ${v}` : `your answer gives some chance to values down to ${v}`
}

interface Judgement {
  outside: number | null
  /** The fit's density is zero over part of the range (a hard edge inside it). */
  gap: boolean
  warnings: string[]
}

/** The default-fit rule's findings and plain warnings for one fitted distribution against the plausible range. */
export function judgeFit(d: Distribution, range: PlausibleRange | null, support?: Support): Judgement {
  if (!range || (range.lower === null && range.upper === null)) return { outside: null, gap: false, warnings: [] }
  const { lower: L, upper: U } = range
  const own = supportOf(d)
  const eps = 1e-9 * Math.max(1, L !== null && U !== null ? U - L : Math.abs(L ?? U ?? 1))
  const warnings: string[] = []
  const gapBelow = L !== null && own.lower > L + eps
  const gapAbove = U !== null && own.upper < U - eps
  if (gapAbove) warnings.push(`This shape says values above ${say(own.upper)} are impossible, but ${plausibleWords(range, 'upper')}.`)
  if (gapBelow) warnings.push(`This shape says values below ${say(own.lower)} are impossible, but ${plausibleWords(range, 'lower')}.`)
  const below = L !== null ? cdf(d, L) : 0
  const above = U !== null ? sf(d, U) : 0
  const outside = below + above
  if (outside > MAX_OUTSIDE_SHARE) {
    const where = L !== null && U !== null ? `outside ${say(L)} to ${say(U)}` : L !== null ? `below ${say(L)}` : `above ${say(U as number)}`
    const said = range.source === 'bounds' ? 'although you would be very surprised by such a value' : 'although your answer puts all of the chance inside that range'
    warnings.push(`This shape gives a ${percent(outside)} chance of a value ${where}, ${said}.`)
  }
  // A thin tail is worth a warning only when the nearly impossible stretch is at least 1 % of the range's width, and
  // not at a limit on the support's own edge (a bound of 0 for a positive quantity means "not below 0", not "0 is plausible").
  const edge = support ? supportBounds(support) : { lower: -Infinity, upper: Infinity }
  const width = (U ?? quantile(d, 1 - PLAUSIBLE_BOUND_PROB)) - (L ?? quantile(d, PLAUSIBLE_BOUND_PROB))
  if (!gapAbove && U !== null && U < edge.upper && own.upper >= U) {
    const t = quantile(d, 1 - THIN_TAIL_PROB)
    if (U - t > 0.01 * width) warnings.push(`This shape gives values above ${say(t)} almost no chance (under 1 in ${say(1 / THIN_TAIL_PROB)}), but ${plausibleWords(range, 'upper')}.`)
  }
  if (!gapBelow && L !== null && L > edge.lower && own.lower <= L) {
    const t = quantile(d, THIN_TAIL_PROB)
    if (t - L > 0.01 * width) warnings.push(`This shape gives values below ${say(t)} almost no chance (under 1 in ${say(1 / THIN_TAIL_PROB)}), but ${plausibleWords(range, 'lower')}.`)
  }
  return { outside, gap: gapBelow || gapAbove, warnings }
}

/**
 * The default-fit rule: fits that respect the plausible range come first, lowest criterion first, a hard-edged family
 * counting NEAR_TIE more (so near-ties go to smooth families); then fits that put too much probability outside the
 * range; last, fits with zero density inside it. The first fit is the default; every fit stays selectable.
 */
export function orderFits(fits: FitResult[], range: PlausibleRange | null, support?: Support): JudgedFit[] {
  const judged = fits.map((f, i) => {
    const j = judgeFit(f.distribution, range, support)
    const contradicts = j.gap || (j.outside ?? 0) > MAX_OUTSIDE_SHARE
    const severity = j.gap ? 2 : contradicts ? 1 : 0
    const key = f.sse + (HARD_EDGED.includes(f.distribution.family) ? NEAR_TIE : 0)
    return { fit: { ...f, outside: j.outside, contradicts, warnings: j.warnings } as JudgedFit, severity, key, i }
  })
  judged.sort((a, b) => a.severity - b.severity || a.key - b.key || a.i - b.i)
  return judged.map((j) => j.fit)
}

/** Fits every family valid for the support to the answer and its plausible range, the default first (the one path for server, browser and record). */
export function fitWithRange(points: Point[], support: Support, range: PlausibleRange | null): JudgedFit[] {
  const criterion = criterionPoints(points, range, support)
  return orderFits(fitAll(criterion.points, support, criterion.weights), range, support)
}
