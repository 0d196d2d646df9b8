import type { ChartData } from 'chart.js'

/** One density drawn as a line: a function of x, its look, and its quantile function to choose the x range. */
export interface DensityCurve {
  id: string
  label: string
  pdf: (x: number) => number
  quantile?: (p: number) => number
  color: string
  width?: number
  /** Line dash pattern, e.g. [6, 4]; solid when absent. */
  dash?: number[]
  /** Drawn above the others (higher number on top). */
  order?: number
  /** Marks (diamonds) along the line, so that it reads apart from the others without colour. */
  markers?: boolean
}

/** Every how many grid points a curve with markers shows one. */
const MARKER_EVERY = 20

/** Range that holds the central 99 % of every curve, padded a little, clipped to the support. */
export function densityRange(curves: DensityCurve[], min = -Infinity, max = Infinity): [number, number] {
  let lo = Infinity
  let hi = -Infinity
  for (const c of curves) {
    if (!c.quantile) continue
    const a = c.quantile(0.005)
    const b = c.quantile(0.995)
    if (Number.isFinite(a)) lo = Math.min(lo, a)
    if (Number.isFinite(b)) hi = Math.max(hi, b)
  }
  if (!(lo < hi)) return [Number.isFinite(min) ? min : 0, Number.isFinite(max) ? max : 1]
  const pad = (hi - lo) * 0.04
  return [Math.max(min, lo - pad), Math.min(max, hi + pad)]
}

/** Evaluates each curve on an even grid (non-finite densities leave a gap). */
export function densityData(curves: DensityCurve[], range: [number, number], n = 240): ChartData<'line', { x: number; y: number | null }[]> {
  const [lo, hi] = range
  const xs = Array.from({ length: n + 1 }, (_, i) => lo + ((hi - lo) * i) / n)
  return {
    datasets: curves.map((c) => ({
      label: c.label,
      data: xs.map((x) => {
        const y = c.pdf(x)
        return { x, y: Number.isFinite(y) ? y : null }
      }),
      borderColor: c.color,
      backgroundColor: c.color,
      borderWidth: c.width ?? 1.5,
      borderDash: c.dash ?? [],
      pointRadius: c.markers ? xs.map((_, i) => (i % MARKER_EVERY === MARKER_EVERY / 2 ? 4 : 0)) : 0,
      pointStyle: 'rectRot' as const,
      pointBackgroundColor: c.color,
      pointHoverRadius: 0,
      tension: 0,
      spanGaps: false,
      order: -(c.order ?? 0),
    })),
  }
}
