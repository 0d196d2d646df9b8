import { quantile, type Distribution } from '@shared/stats'
import { niceStep } from '@/answer/chips'

/** An expert's (or a round's) 5, 25, 50, 75 and 95 % values. */
export interface RangeValues {
  q05: number
  q25: number
  q50: number
  q75: number
  q95: number
}

/** 5, 25, 50, 75 and 95 % values of a distribution. */
export function rangeOf(d: Distribution): RangeValues {
  return { q05: quantile(d, 0.05), q25: quantile(d, 0.25), q50: quantile(d, 0.5), q75: quantile(d, 0.75), q95: quantile(d, 0.95) }
}

/** One expert's row of the panel view: the study-wide label, the range in the round shown and, if asked for, in another round. */
export interface PanelRow {
  id: number | string
  label: string
  range: RangeValues
  excluded: boolean
  tone: string
  compare: RangeValues | null
  /** The row of the expert looking at the view (a feedback round): drawn apart from the others. */
  mine?: boolean
}

/** Everything the panel view draws. */
export interface PanelViewProps {
  rows: PanelRow[]
  compareLabel: string | null
  combined: { pdf: (x: number) => number; quantile: (p: number) => number } | null
  combinedLabel: string
  prior: Distribution | null
  priorLabel: string
  bounds: { lower: number; upper: number }
  xLabel: string
  caption: string
  /** The name of the combination's row (default "Combined"). */
  combinedRowLabel?: string
  /** How values are written on the axis and in the rows' descriptions (default: plain numbers). */
  format?: (value: number) => string
  /** The word for the notch (default "median"; experts read "middle value"). */
  medianWord?: string
}

export interface PanelAxis {
  min: number
  max: number
  /** Round values between min and max (inclusive) where the axis is labelled. */
  ticks: number[]
}

/**
 * An axis from `lo` to `hi` widened to whole multiples of a 1-2-5 step (round ends, common practice), never past the
 * support's bounds: a bound of the support is an end of its own.
 */
export function roundedAxis(lo: number, hi: number, bounds: { lower: number; upper: number }, count = 5): PanelAxis {
  let a = Math.max(lo, bounds.lower)
  let b = Math.min(hi, bounds.upper)
  if (!(b > a)) {
    const centre = Number.isFinite(a) ? a : 0
    const half = Math.abs(centre) > 0 ? Math.abs(centre) * 0.1 : 1
    a = Math.max(centre - half, bounds.lower)
    b = Math.min(centre + half, bounds.upper)
  }
  const step = niceStep(b - a, count)
  const min = Math.max(Math.floor(a / step + 1e-9) * step, bounds.lower)
  const max = Math.min(Math.ceil(b / step - 1e-9) * step, bounds.upper)
  const ticks: number[] = []
  for (let t = Math.ceil(min / step - 1e-9) * step; t <= max + step * 1e-9; t += step) ticks.push(Number(t.toPrecision(12)))
  return { min, max, ticks }
}

/** Where a value sits on the axis, in per cent of its length (clamped to the axis). */
export function axisPercent(axis: PanelAxis, value: number): number {
  const f = (value - axis.min) / (axis.max - axis.min)
  return Math.min(100, Math.max(0, f * 100))
}

/** Density values on `n` + 1 evenly spaced points of the axis (0 where the density is not finite). */
export function sampleDensity(pdf: (x: number) => number, axis: PanelAxis, n = 200): { x: number; y: number }[] {
  return Array.from({ length: n + 1 }, (_, i) => {
    const x = axis.min + ((axis.max - axis.min) * i) / n
    const y = pdf(x)
    return { x, y: Number.isFinite(y) && y > 0 ? y : 0 }
  })
}

/**
 * An SVG path over a 1000 × 100 box for sampled density values scaled so that `peak` touches the top; `closed`
 * returns to the base line to make a filled shape.
 */
export function densityPath(points: { x: number; y: number }[], axis: PanelAxis, peak: number, closed: boolean): string {
  if (!points.length || !(peak > 0)) return ''
  const px = (x: number) => ((x - axis.min) / (axis.max - axis.min)) * 1000
  const py = (y: number) => 100 - Math.min(1, y / peak) * 96
  const line = points.map((p, i) => `${i ? 'L' : 'M'}${px(p.x).toFixed(1)},${py(p.y).toFixed(2)}`).join(' ')
  return closed ? `M${px(points[0].x).toFixed(1)},100 ${line.replace(/^M/, 'L')} L${px(points[points.length - 1].x).toFixed(1)},100 Z` : line
}
