import {
  EngineInputError, fitAll, linearPool, logPool, quantile, toUnivariate,
  type Distribution, type Point, type Pool, type Support, type Univariate,
} from '../stats/index'
import { fitWithRange, orderFits, type JudgedFit } from './fits'

export type PoolMethod = 'linear' | 'logarithmic'

/** One expert's fitted distribution entering the combination. */
export interface Component {
  expertId: number
  label: string
  distribution: Distribution
}

/** Probabilities at which a combination is matched when fitted to a parametric family. */
export const POOL_FIT_PROBS = [0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95]

/** Linear or logarithmic opinion pool of the components (Stone 1961; Genest & Zidek 1986). */
export function combine(method: PoolMethod, components: Component[], weights: number[]): Univariate {
  const ds = components.map((c) => c.distribution)
  if (method === 'linear') return linearPool(ds, weights)
  const result: Pool | Distribution = logPool(ds, weights)
  return 'family' in result ? toUnivariate(result) : result
}

export interface Summary {
  q05: number
  q50: number
  q95: number
  mean: number
  sd: number
}

export function summarise(u: Univariate): Summary {
  return { q05: u.quantile(0.05), q50: u.quantile(0.5), q95: u.quantile(0.95), mean: u.mean(), sd: u.sd() }
}

/**
 * Fits every family valid for the support to a combination, by least squares on its CDF at POOL_FIT_PROBS
 * (the same criterion as for an expert's answer), the default first by the same rule (docs/methods/fitting.md).
 */
export function fitCombination(u: Univariate, support: Support): JudgedFit[] {
  const points = POOL_FIT_PROBS.map((prob) => ({ value: u.quantile(prob), prob }))
  const distinct = points.filter((p, i) => i === 0 || p.value > points[i - 1].value)
  return orderFits(fitAll(distinct, support), null, support)
}

/** Fits to an agreed consensus (agreed values only, no separate bounds), the default first: server, browser and impact use this. */
export function fitConsensus(points: Point[], support: Support): JudgedFit[] {
  return fitWithRange(points, support, null)
}

export interface LeaveOneOut {
  expertId: number
  label: string
  q50: number
  q05: number
  q95: number
  /** Shift of the pooled median without this expert, as a share of the full pool's 90 % interval width. */
  medianShift: number
  /** Ratio of the 90 % interval width without this expert to the full pool's. */
  widthRatio: number
}

/** How the pooled median and 90 % interval move when each expert is left out in turn (weights renormalised). */
export function leaveOneOut(method: PoolMethod, components: Component[], weights: number[]): LeaveOneOut[] {
  if (components.length < 3) return []
  const full = summarise(combine(method, components, weights))
  const width = full.q95 - full.q05
  return components.flatMap((c, i) => {
    const rest = components.filter((_, j) => j !== i)
    const restWeights = weights.filter((_, j) => j !== i)
    if (!(restWeights.reduce((s, w) => s + w, 0) > 0)) return []
    const s = summarise(combine(method, rest, restWeights))
    return [{ expertId: c.expertId, label: c.label, q50: s.q50, q05: s.q05, q95: s.q95, medianShift: (s.q50 - full.q50) / width, widthRatio: (s.q95 - s.q05) / width }]
  })
}

/** Pairs of experts whose central 90 % intervals do not overlap: a sign of strong disagreement. */
export function disagreements(components: Component[]): { a: string; b: string }[] {
  const ranges = components.map((c) => ({ label: c.label, lo: quantile(c.distribution, 0.05), hi: quantile(c.distribution, 0.95) }))
  const pairs: { a: string; b: string }[] = []
  for (let i = 0; i < ranges.length; i++) {
    for (let j = i + 1; j < ranges.length; j++) {
      if (ranges[i].hi < ranges[j].lo || ranges[j].hi < ranges[i].lo) pairs.push({ a: ranges[i].label, b: ranges[j].label })
    }
  }
  return pairs
}

/**
 * A consensus is suspiciously narrow when its central 90 % interval is shorter than the spread between the
 * experts' own medians: the group then claims more certainty than its members' disagreement allows.
 */
export function consensusNarrowerThanSpread(consensus: Distribution, components: Component[]): { narrow: boolean; width: number; spread: number } {
  const width = quantile(consensus, 0.95) - quantile(consensus, 0.05)
  const medians = components.map((c) => quantile(c.distribution, 0.5))
  const spread = medians.length ? Math.max(...medians) - Math.min(...medians) : 0
  return { narrow: components.length > 1 && width < spread, width, spread }
}

/** Equal weights, or the given ones checked: non-negative, not all zero. */
export function resolveWeights(mode: 'equal' | 'performance' | 'custom', count: number, given?: number[]): number[] {
  if (mode === 'equal') return Array.from({ length: count }, () => 1 / count)
  if (!given || given.length !== count) throw new EngineInputError('weights', `Give one weight for each of the ${count} experts`)
  if (given.some((w) => !(w >= 0) || !Number.isFinite(w))) throw new EngineInputError('weights', 'Weights must be 0 or more')
  const total = given.reduce((s, w) => s + w, 0)
  if (!(total > 0)) throw new EngineInputError('weights', mode === 'performance' ? 'No expert passes the calibration cutoff; lower it or use equal weights' : 'At least one weight must be above 0')
  return given.map((w) => w / total)
}
