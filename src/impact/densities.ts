import { pdf, posteriorOf, quantile, supportBounds, type PilotData, type Posterior, type Support } from '@shared/stats'
import type { ImpactCandidate, ImpactRequest } from '@/api/impact'
import { robustMixture } from '@shared/elicitation/impact'

/** Chart colours fixed app-wide (theme.css): prior amber, likelihood slate, posterior green, pooled/consensus ink dashed. */
export const CHART_COLOURS = {
  prior: '#c9821a',
  likelihood: '#5b6b7a',
  posterior: '#1f6f5c',
  pooled: '#1d2733',
  /** Muted tones for the priors other than the reconciled one. */
  mutedPrior: '#b89a6e',
  mutedComparison: '#8c97a2',
  mutedPosterior: '#6fa596',
} as const

/** How each candidate's prior and posterior are drawn. */
export function curveStyle(kind: ImpactCandidate['kind'], role: 'prior' | 'posterior'): { color: string; dash: number[]; width: number } {
  if (role === 'posterior') {
    if (kind === 'reconciled') return { color: CHART_COLOURS.posterior, dash: [], width: 2.5 }
    return { color: CHART_COLOURS.mutedPosterior, dash: kind === 'comparison' ? [2, 3] : kind === 'mixture' ? [8, 3, 2, 3] : [5, 4], width: 1.5 }
  }
  switch (kind) {
    case 'reconciled':
      return { color: CHART_COLOURS.prior, dash: [], width: 2.5 }
    case 'pooled':
    case 'consensus':
      return { color: CHART_COLOURS.pooled, dash: [6, 4], width: 1.5 }
    case 'comparison':
      return { color: CHART_COLOURS.mutedComparison, dash: [2, 3], width: 1.5 }
    case 'mixture':
      return { color: CHART_COLOURS.mutedPrior, dash: [8, 3, 2, 3], width: 1.5 }
    default:
      return { color: CHART_COLOURS.mutedPrior, dash: [1, 3], width: 1.5 }
  }
}

/** A candidate's prior as functions: a plain distribution, or the robust mixture of the reconciled prior and the wide component. */
export interface PriorModel {
  pdf(x: number): number
  quantile(p: number): number
  posterior: Posterior
}

/**
 * The prior and posterior of a candidate for drawing. The mixture's posterior weights follow from
 * each component's evidence (w_i p_i(x) / Σ w_j p_j(x)), computed here with the shared engine.
 */
export function priorModel(candidate: ImpactCandidate, data: PilotData, input?: Pick<ImpactRequest, 'mixtureWeight' | 'mixtureWide'> | null): PriorModel {
  if (candidate.kind === 'mixture' && input?.mixtureWeight && input.mixtureWide) {
    const mix = robustMixture([candidate.prior, input.mixtureWide], [1 - input.mixtureWeight, input.mixtureWeight], data)
    return { pdf: mix.prior.pdf, quantile: mix.prior.quantile, posterior: mix.posterior }
  }
  return { pdf: (x) => pdf(candidate.prior, x), quantile: (p) => quantile(candidate.prior, p), posterior: posteriorOf(candidate.prior, data) }
}

export interface CurvePoint {
  x: number
  y: number | null
}

export interface Curve {
  id: string
  label: string
  kind: ImpactCandidate['kind']
  role: 'prior' | 'posterior'
  color: string
  dash: number[]
  width: number
  points: CurvePoint[]
}

/**
 * x range holding the central 99.8 % of every posterior and 99 % of every elicited prior, padded and
 * clipped to the support. The comparison prior and the mixture's wide component are deliberately wide and would
 * flatten the rest: they are drawn clipped to this range.
 */
export function chartRange(models: { kind: ImpactCandidate['kind']; model: PriorModel }[], support?: Support): [number, number] {
  let lo = Infinity
  let hi = -Infinity
  const take = (a: number, b: number) => {
    if (Number.isFinite(a)) lo = Math.min(lo, a)
    if (Number.isFinite(b)) hi = Math.max(hi, b)
  }
  for (const { kind, model } of models) {
    take(model.posterior.quantile(0.001), model.posterior.quantile(0.999))
    if (kind !== 'comparison' && kind !== 'mixture') take(model.quantile(0.005), model.quantile(0.995))
  }
  const { lower: slo, upper: shi } = support ? supportBounds(support) : { lower: -Infinity, upper: Infinity }
  if (!(lo < hi)) return [Number.isFinite(slo) ? slo : 0, Number.isFinite(shi) ? shi : 1]
  const pad = (hi - lo) * 0.04
  return [Math.max(slo, lo - pad), Math.min(shi, hi + pad)]
}

/** Even grid of n + 1 points over the range. */
export function grid([lo, hi]: [number, number], n = 240): number[] {
  return Array.from({ length: n + 1 }, (_, i) => lo + ((hi - lo) * i) / n)
}

/** Density from a CDF by central differences on the grid (one-sided at the ends); never negative. */
export function densityFromCdf(cdf: (x: number) => number, xs: number[]): CurvePoint[] {
  const F = xs.map((x) => cdf(x))
  return xs.map((x, i) => {
    const a = Math.max(0, i - 1)
    const b = Math.min(xs.length - 1, i + 1)
    const y = (F[b] - F[a]) / (xs[b] - xs[a])
    return { x, y: Number.isFinite(y) ? Math.max(0, y) : null }
  })
}

/** Density by its pdf on the grid; infinite spikes (a beta at its edge) leave a gap. */
export function densityFromPdf(f: (x: number) => number, xs: number[]): CurvePoint[] {
  return xs.map((x) => {
    const y = f(x)
    return { x, y: Number.isFinite(y) ? y : null }
  })
}

const nextFrame = () => new Promise<void>((resolve) => setTimeout(resolve, 0))

/**
 * Prior and posterior curves of the chosen candidates. One candidate at a time, yielding to the
 * browser in between so the page stays responsive; `isStale` stops early when the choice changed.
 */
export async function computeCurves(
  candidates: ImpactCandidate[],
  data: PilotData,
  input: ImpactRequest | null | undefined,
  support: Support | undefined,
  isStale: () => boolean = () => false,
): Promise<{ curves: Curve[]; range: [number, number] } | null> {
  const models: { c: ImpactCandidate; kind: ImpactCandidate['kind']; model: PriorModel }[] = []
  for (const c of candidates) {
    models.push({ c, kind: c.kind, model: priorModel(c, data, input) })
    await nextFrame()
    if (isStale()) return null
  }
  const range = chartRange(models, support)
  const xs = grid(range)
  const curves: Curve[] = []
  for (const { c, model } of models) {
    curves.push({ id: `${c.key}-prior`, label: `${c.label}: prior`, kind: c.kind, role: 'prior', ...curveStyle(c.kind, 'prior'), points: densityFromPdf(model.pdf, xs) })
    curves.push({ id: `${c.key}-posterior`, label: `${c.label}: posterior`, kind: c.kind, role: 'posterior', ...curveStyle(c.kind, 'posterior'), points: densityFromCdf(model.posterior.cdf, xs) })
    await nextFrame()
    if (isStale()) return null
  }
  return { curves, range }
}

