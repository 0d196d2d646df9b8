import { pdf, posteriorOf, quantile, supportBounds, type PilotData, type Posterior, type Support } from '@shared/stats'
import type { ImpactCandidate, ImpactRequest } from '@/api/impact'
import { robustMixture } from '@shared/elicitation/impact'
import { niceAxis } from '@shared/format/axis'

/** Chart colours fixed app-wide (theme.css): prior amber, likelihood slate, posterior green, pooled/consensus ink. */
export const CHART_COLOURS = {
  prior: '#c9821a',
  likelihood: '#5b6b7a',
  posterior: '#1f6f5c',
  pooled: '#1d2733',
} as const

/** Marker shapes (chart.js point styles) that tell candidates apart without colour. */
export type Marker = 'circle' | 'rect' | 'triangle' | 'rectRot' | 'star' | 'crossRot' | 'cross' | 'rectRounded'

/** How one candidate is drawn: its own colour and marker; its prior dashed, its posterior solid. */
export interface CandidateLook {
  color: string
  marker: Marker
  width: number
}

export const ROLE_DASH: Record<'prior' | 'posterior', number[]> = { prior: [7, 4], posterior: [] }

const KIND_LOOKS: Partial<Record<ImpactCandidate['kind'], Omit<CandidateLook, 'width'>>> = {
  reconciled: { color: CHART_COLOURS.posterior, marker: 'circle' },
  comparison: { color: CHART_COLOURS.likelihood, marker: 'rect' },
  mixture: { color: CHART_COLOURS.prior, marker: 'triangle' },
  pooled: { color: CHART_COLOURS.pooled, marker: 'rectRot' },
  consensus: { color: '#7b4b94', marker: 'star' },
}
/** The experts' looks in turn, none sharing a colour or a marker with another kind. */
const EXPERT_LOOKS: Omit<CandidateLook, 'width'>[] = [
  { color: '#2a6fb0', marker: 'crossRot' },
  { color: '#b5446e', marker: 'cross' },
  { color: '#8a6d1c', marker: 'rectRounded' },
  { color: '#3b8ea5', marker: 'star' },
  { color: '#9c5b2e', marker: 'rect' },
]

/** A candidate's look on the density chart; `expertIndex` counts the experts before it (0 for the first). */
export function candidateLook(kind: ImpactCandidate['kind'], expertIndex = 0): CandidateLook {
  const look = KIND_LOOKS[kind] ?? EXPERT_LOOKS[expertIndex % EXPERT_LOOKS.length]
  return { ...look, width: kind === 'reconciled' ? 2.75 : 2 }
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
  marker: Marker
  /** Grid indices where the candidate's marker is drawn on this curve. */
  markerAt: number[]
  points: CurvePoint[]
}

/** One legend entry per drawn candidate, in the order of the analysis. */
export interface LegendEntry extends CandidateLook {
  key: string
  label: string
}

/** Every `every`-th grid index from `offset`, where the curve stands above 5 % of its peak (markers on visible ink). */
export function markerIndices(points: CurvePoint[], offset: number, every = 30): number[] {
  const peak = Math.max(0, ...points.map((p) => p.y ?? 0))
  const out: number[] = []
  for (let i = offset % every; i < points.length; i += every) if ((points[i].y ?? 0) >= 0.05 * peak && peak > 0) out.push(i)
  return out
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
 * Prior and posterior curves of the chosen candidates on round axis ends (niceAxis). One candidate at a time,
 * yielding to the browser in between so the page stays responsive; `isStale` stops early when the choice changed.
 * Each candidate's look follows its place among all the analysis's candidates, so it keeps it whatever else is chosen.
 */
export async function computeCurves(
  candidates: ImpactCandidate[],
  data: PilotData,
  input: ImpactRequest | null | undefined,
  support: Support | undefined,
  isStale: () => boolean = () => false,
  all: ImpactCandidate[] = candidates,
): Promise<{ curves: Curve[]; range: [number, number]; step: number; legend: LegendEntry[] } | null> {
  const models: { c: ImpactCandidate; kind: ImpactCandidate['kind']; model: PriorModel }[] = []
  for (const c of candidates) {
    models.push({ c, kind: c.kind, model: priorModel(c, data, input) })
    await nextFrame()
    if (isStale()) return null
  }
  const [lo, hi] = chartRange(models, support)
  const { lower, upper } = support ? supportBounds(support) : { lower: -Infinity, upper: Infinity }
  const axis = niceAxis(lo, hi, 6, lower, upper)
  const range: [number, number] = [axis.min, axis.max]
  const xs = grid(range)
  const curves: Curve[] = []
  const legend: LegendEntry[] = []
  for (const [n, { c, model }] of models.entries()) {
    const look = candidateLook(c.kind, all.filter((o) => o.kind === 'expert').findIndex((o) => o.key === c.key))
    legend.push({ key: c.key, label: c.label, ...look })
    const prior = densityFromPdf(model.pdf, xs)
    const posterior = densityFromCdf(model.posterior.cdf, xs)
    const offset = 6 + 7 * n
    curves.push({ id: `${c.key}-prior`, label: `${c.label}: prior`, kind: c.kind, role: 'prior', ...look, dash: ROLE_DASH.prior, markerAt: markerIndices(prior, offset), points: prior })
    curves.push({ id: `${c.key}-posterior`, label: `${c.label}: posterior`, kind: c.kind, role: 'posterior', ...look, dash: ROLE_DASH.posterior, markerAt: markerIndices(posterior, offset), points: posterior })
    await nextFrame()
    if (isStale()) return null
  }
  return { curves, range, step: axis.step, legend }
}
