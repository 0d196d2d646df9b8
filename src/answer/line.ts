import { supportBounds, type Support } from '@shared/stats'
import { niceAxis, niceStep } from '@shared/format/axis'
import type { QuantileField, QuantileValues } from './quantile'

/** Position of each field on the line, left to right (bounds outside the probabilities). */
export const LINE_ORDER: readonly QuantileField[] = ['lower', 'p05', 'q1', 'median', 'q3', 'p95', 'upper']
const rank = (f: QuantileField) => LINE_ORDER.indexOf(f)

/** Share of the answer's width added on each side of the line, so that a handle can be dragged outwards. */
const SIDE_ROOM = 0.1

/** `x` without float noise (0.1 + 0.2 → 0.3), so a dragged value reads as typed. */
const clean = (x: number) => Number(x.toPrecision(12))

/**
 * The stretch of values the line shows: the expert's values with a tenth of their spread added each side, widened to
 * round tick values and kept inside the quantity's possible values. With no value yet, a quantity with two finite
 * limits shows them; any other has no line until a value is given (null).
 */
export function lineDomain(values: QuantileValues, support: Support): [number, number] | null {
  const edge = supportBounds(support)
  const xs = Object.values(values).filter((x): x is number => typeof x === 'number' && Number.isFinite(x))
  if (!xs.length) return Number.isFinite(edge.lower) && Number.isFinite(edge.upper) ? [edge.lower, edge.upper] : null
  let lo = Math.min(...xs)
  let hi = Math.max(...xs)
  if (!(hi > lo)) {
    const half = Math.abs(lo) * 0.5 || 1
    lo -= half
    hi += half
  } else {
    const pad = (hi - lo) * SIDE_ROOM
    lo -= pad
    hi += pad
  }
  const axis = niceAxis(lo, hi, 5, edge.lower, edge.upper)
  return [axis.min, axis.max]
}

/** Round values for the ticks of [lo, hi] (about five). */
export function lineTicks(lo: number, hi: number, count = 5): number[] {
  const step = niceStep(hi - lo, count)
  const ticks: number[] = []
  for (let t = Math.ceil(lo / step) * step; t <= hi + step * 1e-9; t += step) ticks.push(clean(t))
  return ticks
}

/** How far one arrow-key press or one snap of a drag moves a handle: about a hundredth of the line, on a 1-2-5 step. */
export function handleStep(lo: number, hi: number): number {
  return niceStep(hi - lo, 10) / 10
}

/**
 * Where a handle may go: strictly between its placed neighbours on the line (one step away from each), and inside
 * the quantity's possible values (the plausible bounds may touch a finite limit, the other values may not).
 */
export function handleLimits(field: QuantileField, values: QuantileValues, support: Support, step: number): [number, number] {
  const edge = supportBounds(support)
  const isBound = field === 'lower' || field === 'upper'
  let lo = isBound ? edge.lower : clean(edge.lower + step)
  let hi = isBound ? edge.upper : clean(edge.upper - step)
  for (const other of LINE_ORDER) {
    const v = values[other]
    if (other === field || v === undefined || !Number.isFinite(v)) continue
    if (rank(other) < rank(field)) lo = Math.max(lo, clean(v + step))
    else hi = Math.min(hi, clean(v - step))
  }
  return [lo, hi]
}

/** A value dragged or stepped to: on the step grid, then inside the handle's limits. */
export function snapValue(x: number, step: number, limits: [number, number]): number {
  const snapped = clean(Math.round(x / step) * step)
  return clean(Math.min(limits[1], Math.max(limits[0], snapped)))
}

/**
 * Which of the fields still to give a tap at `x` places: one whose order on the line `x` respects; of two such (both
 * plausible bounds before either is given), the left one on the left half of the line, the right one on the right.
 */
export function fieldForTap(x: number, toPlace: QuantileField[], values: QuantileValues, domain: [number, number]): QuantileField | null {
  const fits = toPlace
    .filter((f) => values[f] === undefined)
    .filter((f) =>
      LINE_ORDER.every((other) => {
        const v = values[other]
        if (other === f || v === undefined) return true
        return rank(other) < rank(f) ? x > v : x < v
      }),
    )
    .sort((a, b) => rank(a) - rank(b))
  if (fits.length <= 1) return fits[0] ?? null
  return x < (domain[0] + domain[1]) / 2 ? fits[0] : fits[fits.length - 1]
}

/** The handle's name for a screen reader and its tooltip, in plain words. */
export const HANDLE_NAMES: Record<QuantileField, string> = {
  lower: 'Lowest plausible value',
  upper: 'Highest plausible value',
  median: 'Middle value: as likely below as above',
  q1: 'Lower quarter: 1 chance in 4 below',
  q3: 'Upper quarter: 1 chance in 4 above',
  p05: 'Low 1-in-20 value',
  p95: 'High 1-in-20 value',
}
