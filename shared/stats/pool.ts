import { logDensityFunction, quantile, sd as sdOf, mean as meanOf, supportOf, toUnivariate, validateDistribution } from './distributions'
import { EngineInputError } from './errors'
import { findRoot, LogIntegral } from './quadrature'
import type { Distribution, Pool, Univariate } from './types'

/** Checks weights (finite, ≥ 0, positive sum, one per component) and returns them normalised to sum to 1. */
export function normaliseWeights(weights: number[], count: number, field = 'weights'): number[] {
  if (!Array.isArray(weights) || weights.length !== count)
    throw new EngineInputError(field, `Give one weight per component (${count}); ${Array.isArray(weights) ? weights.length : 0} given.`)
  weights.forEach((w, i) => {
    if (typeof w !== 'number' || !Number.isFinite(w)) throw new EngineInputError(field, `Weight ${i + 1} must be a finite number.`)
    if (w < 0) throw new EngineInputError(field, `Weight ${i + 1} is negative; weights must be 0 or more.`)
  })
  const total = weights.reduce((s, w) => s + w, 0)
  if (!(total > 0)) throw new EngineInputError(field, 'The weights sum to 0; at least one must be positive.')
  return weights.map((w) => w / total)
}

/** p-quantile of a mixture by root finding on Σ w_i F_i(x) = p, bracketed by the component quantiles (docs/methods/pooling.md). */
export function mixtureQuantile(components: readonly Pick<Univariate, 'cdf' | 'quantile'>[], weights: readonly number[], p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN
  const active = components.filter((_, i) => weights[i] > 0)
  const qs = active.map((c) => c.quantile(p))
  let lo = Math.min(...qs)
  let hi = Math.max(...qs)
  if (lo === hi || !Number.isFinite(lo) || !Number.isFinite(hi)) return lo === hi ? lo : p < 0.5 ? lo : hi
  const F = (x: number): number => {
    let s = 0
    for (let i = 0; i < components.length; i++) if (weights[i] > 0) s += weights[i] * components[i].cdf(x)
    return s - p
  }
  if (F(lo) > 0) lo = lo - (hi - lo)
  if (F(hi) < 0) hi = hi + (hi - lo)
  return findRoot(F, lo, hi, 1e-15)
}

/** Linear opinion pool F = Σ w_i F_i of arbitrary components (Stone 1961; Genest & Zidek 1986). */
export function mixture(components: readonly Univariate[], weights: readonly number[]): Pool {
  const w = normaliseWeights([...weights], components.length)
  const mean = (): number => components.reduce((s, c, i) => (w[i] > 0 ? s + w[i] * c.mean() : s), 0)
  return {
    kind: 'linear-pool',
    components,
    weights: w,
    pdf: (x) => components.reduce((s, c, i) => (w[i] > 0 ? s + w[i] * c.pdf(x) : s), 0),
    cdf: (x) => components.reduce((s, c, i) => (w[i] > 0 ? s + w[i] * c.cdf(x) : s), 0),
    quantile: (p) => mixtureQuantile(components, w, p),
    mean,
    sd: () => {
      const m = mean()
      const second = components.reduce((s, c, i) => {
        if (!(w[i] > 0)) return s
        const ci = c.mean() - m
        const si = c.sd()
        return s + w[i] * (si * si + ci * ci)
      }, 0)
      return Math.sqrt(second)
    },
  }
}

function validateComponents(components: Distribution[]): void {
  if (!Array.isArray(components) || components.length === 0) throw new EngineInputError('components', 'At least one distribution is required.')
  components.forEach((c, i) => validateDistribution(c, `components[${i}]`))
}

/** Linear opinion pool of distributions: F(x) = Σ w_i F_i(x), weights normalised to sum to 1 (Stone 1961; Genest & Zidek 1986, §2). */
export function linearPool(components: Distribution[], weights: number[]): Pool {
  validateComponents(components)
  return mixture(components.map(toUnivariate), weights)
}

/**
 * Logarithmic opinion pool f ∝ Π f_i^{w_i} with weights normalised to sum to 1 (Genest & Zidek 1986, §3). Closed forms
 * (docs/methods/pooling.md): normals → normal, lognormals → lognormal, gammas → gamma, betas → beta, scaled betas on one range →
 * scaled beta, uniforms → uniform on the intersection; other mixes are normalised numerically.
 */
export function logPool(components: Distribution[], weights: number[]): Pool | Distribution {
  validateComponents(components)
  const w = normaliseWeights(weights, components.length)
  const fam = components[0].family
  const same = components.every((c) => c.family === fam)
  if (same) {
    const closed = logPoolClosedForm(components, w)
    if (closed) return closed
  }
  return numericLogPool(components, w)
}

function logPoolClosedForm(components: Distribution[], w: number[]): Distribution | null {
  const sumW = (f: (c: Distribution, i: number) => number): number => components.reduce((s, c, i) => s + w[i] * f(c, i), 0)
  const fam = components[0].family
  if (fam === 'normal' || fam === 'lognormal') {
    const loc = (c: Distribution): number => (c.family === 'normal' ? c.mu : c.family === 'lognormal' ? c.meanlog : NaN)
    const scale = (c: Distribution): number => (c.family === 'normal' ? c.sigma : c.family === 'lognormal' ? c.sdlog : NaN)
    const precision = sumW((c) => 1 / scale(c) ** 2)
    const m = sumW((c) => loc(c) / scale(c) ** 2) / precision
    const s = 1 / Math.sqrt(precision)
    return fam === 'normal' ? { family: 'normal', mu: m, sigma: s } : { family: 'lognormal', meanlog: m, sdlog: s }
  }
  if (fam === 'gamma') {
    const shape = sumW((c) => (c as { shape: number }).shape - 1) + 1
    const rate = sumW((c) => (c as { rate: number }).rate)
    return shape > 0 ? { family: 'gamma', shape, rate } : null
  }
  if (fam === 'beta' || fam === 'scaled-beta') {
    if (fam === 'scaled-beta') {
      const c0 = components[0] as { lower: number; upper: number }
      if (!components.every((c) => c.family === 'scaled-beta' && c.lower === c0.lower && c.upper === c0.upper)) return null
    }
    const alpha = sumW((c) => (c as { alpha: number }).alpha - 1) + 1
    const beta = sumW((c) => (c as { beta: number }).beta - 1) + 1
    if (!(alpha > 0 && beta > 0)) return null
    if (fam === 'beta') return { family: 'beta', alpha, beta }
    const c0 = components[0] as { lower: number; upper: number }
    return { family: 'scaled-beta', alpha, beta, lower: c0.lower, upper: c0.upper }
  }
  if (fam === 'uniform') {
    const active = components.filter((_, i) => w[i] > 0) as { lower: number; upper: number }[]
    const lower = Math.max(...active.map((c) => c.lower))
    const upper = Math.min(...active.map((c) => c.upper))
    if (!(lower < upper)) throw new EngineInputError('components', 'The uniform distributions do not overlap, so their logarithmic pool is empty.')
    return { family: 'uniform', lower, upper }
  }
  return null
}

/** How many numerically normalised log pools are kept, most recently used first (see numericLogPool). */
const NUMERIC_POOL_CACHE_SIZE = 256

/** How many quantiles one numeric log pool remembers (a view asks for the same few probabilities again and again). */
const POOL_QUANTILE_MEMO_SIZE = 64

const numericPoolCache = new Map<string, Pool>()

/**
 * The log pool normalised by quadrature, kept by its components and weights: the reconciliation view asks for the same
 * pools (the full pool and each leave-one-out pool) on every view and every save, and a pool is an immutable value.
 */
function numericLogPool(components: Distribution[], w: number[]): Pool {
  const key = JSON.stringify([components, w])
  const cached = numericPoolCache.get(key)
  if (cached) {
    numericPoolCache.delete(key)
    numericPoolCache.set(key, cached)
    return cached
  }
  const pool = makeNumericLogPool(components, w)
  numericPoolCache.set(key, pool)
  if (numericPoolCache.size > NUMERIC_POOL_CACHE_SIZE) numericPoolCache.delete(numericPoolCache.keys().next().value as string)
  return pool
}

function makeNumericLogPool(components: Distribution[], w: number[]): Pool {
  const active = components.map((c, i) => ({ c, w: w[i] })).filter((a) => a.w > 0)
  const lower = Math.max(...active.map((a) => supportOf(a.c).lower))
  const upper = Math.min(...active.map((a) => supportOf(a.c).upper))
  if (!(lower < upper)) throw new EngineInputError('components', 'The distributions have no common support, so their logarithmic pool is empty.')
  // Each component's log density is made once (parameters checked, constants computed), not at every quadrature node.
  const logDensities = active.map((a) => logDensityFunction(a.c))
  const activeWeights = active.map((a) => a.w)
  const logF = (x: number): number => {
    let s = 0
    for (let i = 0; i < logDensities.length; i++) s += activeWeights[i] * logDensities[i](x)
    return s
  }
  const toX = (u: number): number =>
    Number.isFinite(lower) && Number.isFinite(upper)
      ? lower + (upper - lower) / (1 + Math.exp(-u))
      : Number.isFinite(lower)
        ? lower + Math.exp(u)
        : Number.isFinite(upper)
          ? upper - Math.exp(-u)
          : u
  const logJac = (u: number): number =>
    Number.isFinite(lower) && Number.isFinite(upper)
      ? Math.log(upper - lower) - Math.log1p(Math.exp(-u)) - Math.log1p(Math.exp(u))
      : Number.isFinite(lower)
        ? u
        : Number.isFinite(upper)
          ? -u
          : 0
  const fromX = (x: number): number =>
    Number.isFinite(lower) && Number.isFinite(upper)
      ? Math.log((x - lower) / (upper - x))
      : Number.isFinite(lower)
        ? Math.log(x - lower)
        : Number.isFinite(upper)
          ? -Math.log(upper - x)
          : x
  const h = (u: number): number => logF(toX(u)) + logJac(u)
  const hints = active
    .map((a) => {
      const m = quantile(a.c, 0.5)
      const s = Math.abs(fromX(quantile(a.c, 0.75)) - fromX(quantile(a.c, 0.25))) || 1
      return { center: fromX(m), scale: s }
    })
    .filter((hnt) => Number.isFinite(hnt.center))
  const li = new LogIntegral(h, hints)
  const logNorm = li.logValue
  const mean = li.expect((u) => toX(u))
  const sd = Math.sqrt(li.expect((u) => (toX(u) - mean) ** 2))
  const quantiles = new Map<number, number>()
  const quantileOf = (p: number): number => {
    if (p <= 0) return lower
    if (p >= 1) return upper
    const known = quantiles.get(p)
    if (known !== undefined) return known
    const q = toX(li.quantile(p))
    if (quantiles.size < POOL_QUANTILE_MEMO_SIZE) quantiles.set(p, q)
    return q
  }
  return Object.freeze({
    kind: 'log-pool' as const,
    components: Object.freeze(active.map((a) => toUnivariate(a.c))),
    weights: Object.freeze(active.map((a) => a.w)),
    pdf: (x: number) => (x > lower && x < upper ? Math.exp(logF(x) - logNorm) : 0),
    cdf: (x: number) => (x <= lower ? 0 : x >= upper ? 1 : li.cdf(fromX(x))),
    quantile: quantileOf,
    mean: () => mean,
    sd: () => sd,
  })
}

/** Mean and sd of a pooled result, whichever form logPool returned. */
export function poolSummary(result: Pool | Distribution): { mean: number; sd: number } {
  if ('family' in result) return { mean: meanOf(result), sd: sdOf(result) }
  return { mean: result.mean(), sd: result.sd() }
}
