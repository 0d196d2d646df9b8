import { EngineInputError } from './errors'
import type { Point, Support } from './types'

/** Throws EngineInputError unless values and probabilities are finite and strictly increasing with 0 < p < 1. */
export function validatePoints(points: Point[], field = 'points'): void {
  if (!Array.isArray(points) || points.length === 0) throw new EngineInputError(field, 'At least one elicited point is required.')
  points.forEach((pt, i) => {
    if (!pt || typeof pt.value !== 'number' || !Number.isFinite(pt.value))
      throw new EngineInputError(field, `Point ${i + 1}: the value must be a finite number.`)
    if (typeof pt.prob !== 'number' || !(pt.prob > 0 && pt.prob < 1))
      throw new EngineInputError(field, `Point ${i + 1}: the probability must lie strictly between 0 and 1.`)
    if (i > 0) {
      if (!(pt.value > points[i - 1].value))
        throw new EngineInputError(field, `Point ${i + 1}: values must increase from one point to the next.`)
      if (!(pt.prob > points[i - 1].prob))
        throw new EngineInputError(field, `Point ${i + 1}: probabilities must increase from one point to the next.`)
    }
  })
}

/** Lower and upper end of a quantity's support. */
export function supportBounds(support: Support): { lower: number; upper: number } {
  switch (support.kind) {
    case 'real':
      return { lower: -Infinity, upper: Infinity }
    case 'positive':
      return { lower: 0, upper: Infinity }
    case 'proportion':
      return { lower: 0, upper: 1 }
    case 'bounded':
      return { lower: support.lower, upper: support.upper }
  }
}

/** Throws EngineInputError unless the support is well formed. */
export function validateSupport(support: Support, field = 'support'): void {
  if (!support || !['real', 'positive', 'proportion', 'bounded'].includes(support.kind))
    throw new EngineInputError(field, 'The support must be real, positive, proportion or bounded.')
  if (support.kind === 'bounded') {
    if (!Number.isFinite(support.lower) || !Number.isFinite(support.upper) || !(support.lower < support.upper))
      throw new EngineInputError(field, 'A bounded support needs finite lower < upper.')
  }
}

/** Throws EngineInputError unless every value lies strictly inside the support. */
export function requireInside(points: Point[], lower: number, upper: number, field = 'points', what = 'the support'): void {
  points.forEach((pt, i) => {
    if (!(pt.value > lower && pt.value < upper))
      throw new EngineInputError(field, `Point ${i + 1}: the value ${pt.value} lies outside ${what} (${lower}, ${upper}).`)
  })
}

function validateEdges(edges: number[], field = 'edges'): void {
  if (!Array.isArray(edges) || edges.length < 2) throw new EngineInputError(field, 'At least two bin edges are required.')
  edges.forEach((e, i) => {
    if (typeof e !== 'number' || !Number.isFinite(e)) throw new EngineInputError(field, `Edge ${i + 1} must be a finite number.`)
    if (i > 0 && !(e > edges[i - 1])) throw new EngineInputError(field, 'Bin edges must increase.')
  })
}

function cumulativePoints(edges: number[], cum: number[]): Point[] {
  const out: Point[] = []
  for (let i = 0; i < edges.length; i++) {
    const p = cum[i]
    if (!(p > 1e-12 && p < 1 - 1e-12)) continue
    if (out.length && Math.abs(p - out[out.length - 1].prob) <= 1e-12) continue
    out.push({ value: edges[i], prob: p })
  }
  return out
}

/**
 * Fixed-interval method (Garthwaite, Kadane & O'Hagan 2005, §2.2): interval probabilities → cumulative points at the
 * edges. With m + 1 edges, probs has m entries for the bins between them; with m edges, m + 1 entries, the first and
 * last for the open bins below the first and above the last edge. Probabilities must sum to 1. Edges where the cumulative
 * probability is 0 or 1 carry no fitting information and are dropped, as is any edge repeating the previous cumulative
 * probability (an empty bin), so the result has strictly increasing probabilities.
 */
export function pointsFromIntervals(edges: number[], probs: number[]): Point[] {
  validateEdges(edges)
  if (!Array.isArray(probs) || (probs.length !== edges.length - 1 && probs.length !== edges.length + 1))
    throw new EngineInputError('probs', 'Give one probability per bin: edges − 1 (closed grid) or edges + 1 (with open end bins).')
  probs.forEach((p, i) => {
    if (typeof p !== 'number' || !(p >= 0 && p <= 1)) throw new EngineInputError('probs', `Bin ${i + 1}: the probability must lie in [0, 1].`)
  })
  const total = probs.reduce((s, p) => s + p, 0)
  if (Math.abs(total - 1) > 1e-6) throw new EngineInputError('probs', `The bin probabilities sum to ${total}, not 1.`)
  const cum: number[] = []
  let run = 0
  if (probs.length === edges.length - 1) {
    cum.push(0)
    for (const p of probs) cum.push((run += p) / total)
  } else {
    for (let i = 0; i < edges.length; i++) cum.push((run += probs[i]) / total)
  }
  const points = cumulativePoints(edges, cum)
  if (points.length === 0) throw new EngineInputError('probs', 'All probability sits in one bin: there is nothing to fit.')
  return points
}

/** Chip grid (histogram or "roulette" method; Gore 1987, from memory; reviewed in Johnson et al. 2010, J Clin Epidemiol 63:355–369): chips per bin → cumulative points at the bin edges. */
export function pointsFromChips(edges: number[], chips: number[]): Point[] {
  validateEdges(edges)
  if (!Array.isArray(chips) || chips.length !== edges.length - 1)
    throw new EngineInputError('chips', 'Give one chip count per bin (edges − 1 counts).')
  chips.forEach((c, i) => {
    if (typeof c !== 'number' || !Number.isFinite(c) || c < 0) throw new EngineInputError('chips', `Bin ${i + 1}: the chip count must be 0 or more.`)
  })
  const total = chips.reduce((s, c) => s + c, 0)
  if (!(total > 0)) throw new EngineInputError('chips', 'Place at least one chip.')
  const cum = [0]
  let run = 0
  for (const c of chips) cum.push((run += c) / total)
  const points = cumulativePoints(edges, cum)
  if (points.length === 0) throw new EngineInputError('chips', 'All chips sit in one bin: there is nothing to fit.')
  return points
}
