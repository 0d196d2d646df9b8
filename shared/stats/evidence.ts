import { logCdfSf, quantile, studentTLogPdf, supportOf, toUnivariate, validateDistribution } from './distributions'
import { EngineInputError } from './errors'
import { findRoot, LogIntegral, maximize, type Hint } from './quadrature'
import { CheckedTable, SigmaMarginal } from './sigma-marginal'
import {
  gammaPQ,
  lbeta,
  lgamma,
  lgammaDiff,
  log1pmx,
  logBetaKernel,
  logBetaPQ,
  logBinomialPmf,
  logGammaPQ,
  logGammaPrefactor,
  logNormCdf,
  logNormDiff,
  logNormPdf,
  logPoissonPmf,
  normCdf,
  normPdf,
  softplus,
} from './special'
import { dirichletMultinomialAnalysis } from './dirichlet'
import type { Analysis, DirichletAnalysis, DirichletPrior, MultinomialData, PilotData, PosteriorSummary, PriorDistribution, Univariate } from './types'

const LN_2PI = Math.log(2 * Math.PI)
const PROBS = [0.025, 0.5, 0.975] as const

export type AnalyzeOptions = {
  /** Use quadrature even where a closed form exists (for cross-checks). */
  forceQuadrature?: boolean
  /** Skip Box's prior predictive p-value (NaN in the result); used by the width sweep. */
  skipPredictiveCheck?: boolean
}

// ─── Prior on an unconstrained scale ─────────────────────────────────────────────────────────────

/**
 * A prior expressed on u ∈ ℝ: θ = u (real support), θ = e^u (positive), θ = L + (U − L)/(1 + e^(−u)) (bounded);
 * logPrior(u) is the log density of u, Jacobian included.
 */
export interface PriorScale {
  theta(u: number): number
  /** 1 − θ without cancellation (meaningful when θ ∈ [0, 1]). */
  oneMinusTheta(u: number): number
  logPrior(u: number): number
  toU(theta: number): number
  hint: Hint
}

export function priorScale(prior: PriorDistribution): PriorScale {
  switch (prior.family) {
    case 'normal':
    case 'student-t': {
      const { mu, sigma } = prior
      const df = prior.family === 'student-t' ? prior.df : Infinity
      const c = prior.family === 'student-t' ? studentTLogPdf(0, df) - Math.log(sigma) : -Math.log(sigma)
      return {
        theta: (u) => u,
        oneMinusTheta: (u) => 1 - u,
        logPrior:
          prior.family === 'student-t'
            ? (u) => c - ((df + 1) / 2) * Math.log1p(((u - mu) / sigma) ** 2 / df)
            : (u) => c + logNormPdf((u - mu) / sigma),
        toU: (t) => t,
        hint: { center: mu, scale: sigma },
      }
    }
    case 'lognormal':
      return {
        theta: Math.exp,
        oneMinusTheta: (u) => -Math.expm1(u),
        logPrior: (u) => logNormPdf((u - prior.meanlog) / prior.sdlog) - Math.log(prior.sdlog),
        toU: (t) => (t > 0 ? Math.log(t) : NaN),
        hint: { center: prior.meanlog, scale: prior.sdlog },
      }
    case 'gamma': {
      const { shape: a, rate: b } = prior
      const c = a * Math.log(b) - lgamma(a)
      return {
        theta: Math.exp,
        oneMinusTheta: (u) => -Math.expm1(u),
        logPrior: (u) => a * u - b * Math.exp(u) + c,
        toU: (t) => (t > 0 ? Math.log(t) : NaN),
        hint: { center: Math.log(a / b), scale: 1 / Math.sqrt(a) },
      }
    }
    case 'half-normal': {
      const s = prior.scale
      return {
        theta: Math.exp,
        oneMinusTheta: (u) => -Math.expm1(u),
        logPrior: (u) => Math.LN2 + logNormPdf(Math.exp(u) / s) - Math.log(s) + u,
        toU: (t) => (t > 0 ? Math.log(t) : NaN),
        hint: { center: Math.log(s), scale: 0.7 },
      }
    }
    case 'beta':
    case 'scaled-beta':
    case 'uniform': {
      const a = prior.family === 'uniform' ? 1 : prior.alpha
      const b = prior.family === 'uniform' ? 1 : prior.beta
      const lower = prior.family === 'beta' ? 0 : prior.lower
      const upper = prior.family === 'beta' ? 1 : prior.upper
      const w = upper - lower
      const lb = lbeta(a, b)
      return {
        theta: (u) => (u <= 0 ? lower + w / (1 + Math.exp(-u)) : upper - w / (1 + Math.exp(u))),
        oneMinusTheta: (u) => 1 - upper + w / (1 + Math.exp(u)),
        logPrior: (u) => -a * softplus(-u) - b * softplus(u) - lb,
        toU: (t) => (t > lower && t < upper ? Math.log((t - lower) / (upper - t)) : NaN),
        hint: { center: Math.log(a / b), scale: Math.sqrt(1 / a + 1 / b) },
      }
    }
  }
}

/** A likelihood hint (centre and scale on θ) carried over to the prior's u scale. */
export function hintOnU(scale: PriorScale, center: number, spread: number): Hint | null {
  const u = scale.toU(center)
  if (!Number.isFinite(u)) return null
  const eps = Math.min(spread, Math.abs(center) + spread) * 1e-3
  const du = Math.abs(scale.toU(center + eps) - scale.toU(center - eps)) / (2 * eps)
  const s = spread * du
  return Number.isFinite(s) && s > 0 ? { center: u, scale: s } : { center: u, scale: scale.hint.scale }
}

function priorHints(scale: PriorScale, extra: (Hint | null)[]): Hint[] {
  return [scale.hint, ...extra.filter((h): h is Hint => h !== null)]
}

// ─── Data checks and sufficient statistics ───────────────────────────────────────────────────────

export type NormalStats = { n: number; mean: number; ss: number }

export function normalStats(values: number[]): NormalStats {
  if (!Array.isArray(values) || values.length === 0) throw new EngineInputError('values', 'The data contain no observations.')
  values.forEach((v, i) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new EngineInputError('values', `Observation ${i + 1} is not a finite number.`)
  })
  const n = values.length
  const mean = values.reduce((s, v) => s + v, 0) / n
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0)
  return { n, mean, ss }
}

function requireSupportWithin(prior: PriorDistribution, lower: number, upper: number, field: string, what: string): void {
  const s = supportOf(prior)
  if (s.lower < lower || s.upper > upper) throw new EngineInputError(field, `The prior must put all its mass on ${what}; a ${prior.family} prior does not.`)
}

export function validateData(prior: PriorDistribution, data: PilotData): void {
  validateDistribution(prior, 'prior')
  if (!data || typeof data !== 'object') throw new EngineInputError('data', 'Pilot data are required.')
  switch (data.model) {
    case 'normal-known-sigma':
      if (!(data.sigma > 0 && Number.isFinite(data.sigma))) throw new EngineInputError('sigma', 'σ must be a positive number.')
      normalStats(data.values)
      return
    case 'normal': {
      const st = normalStats(data.values)
      if (st.n >= 2 && !(st.ss > 0))
        throw new EngineInputError('values', 'All observations are equal: with σ unknown the likelihood grows without bound as σ → 0.')
      validateDistribution(data.sigmaPrior, 'sigmaPrior')
      requireSupportWithin(data.sigmaPrior, 0, Infinity, 'sigmaPrior', 'positive values of σ')
      return
    }
    case 'binomial':
      if (!Number.isInteger(data.trials) || data.trials < 1) throw new EngineInputError('trials', 'The number of trials must be a whole number of at least 1.')
      if (!Number.isInteger(data.successes) || data.successes < 0) throw new EngineInputError('successes', 'The number of successes must be a whole number, 0 or more.')
      if (data.successes > data.trials) throw new EngineInputError('successes', 'There cannot be more successes than trials.')
      if (data.rows !== undefined) validateBinomialRows(data.rows, data.successes, data.trials)
      requireSupportWithin(prior, 0, 1, 'prior', 'probabilities in [0, 1]')
      return
    case 'poisson':
      if (!Array.isArray(data.counts) || data.counts.length === 0) throw new EngineInputError('counts', 'The data contain no counts.')
      data.counts.forEach((c, i) => {
        if (!Number.isInteger(c) || c < 0) throw new EngineInputError('counts', `Count ${i + 1} must be a whole number, 0 or more.`)
      })
      if (!Array.isArray(data.exposures) || data.exposures.length !== data.counts.length)
        throw new EngineInputError('exposures', 'Give one exposure per count.')
      data.exposures.forEach((t, i) => {
        if (!(t > 0 && Number.isFinite(t))) throw new EngineInputError('exposures', `Exposure ${i + 1} must be a positive number.`)
      })
      requireSupportWithin(prior, 0, Infinity, 'prior', 'positive rates')
      return
    default:
      throw new EngineInputError('model', `Unknown data model "${(data as { model: unknown }).model}".`)
  }
}

// ─── Distributions built on the way ──────────────────────────────────────────────────────────────

/** A posterior on θ: CDF, quantiles and moments. */
export type Posterior = Pick<Univariate, 'cdf' | 'quantile' | 'mean' | 'sd'>

function normalUnivariate(m: number, s: number): Univariate {
  return {
    pdf: (x) => normPdf((x - m) / s) / s,
    cdf: (x) => normCdf((x - m) / s),
    quantile: (p) => quantile({ family: 'normal', mu: m, sigma: s }, p),
    mean: () => m,
    sd: () => s,
  }
}

/** N(m, s²) truncated to [a, b], with tail-safe log-scale normalisation (Johnson, Kotz & Balakrishnan 1994, §10.1). */
export function truncatedNormal(m: number, s: number, a: number, b: number): Univariate {
  const alpha = (a - m) / s
  const beta = (b - m) / s
  const logZ = logNormDiff(alpha, beta)
  const ra = Number.isFinite(alpha) ? Math.exp(logNormPdf(alpha) - logZ) : 0
  const rb = Number.isFinite(beta) ? Math.exp(logNormPdf(beta) - logZ) : 0
  const mean = m + s * (ra - rb)
  const aTerm = Number.isFinite(alpha) ? alpha * ra : 0
  const bTerm = Number.isFinite(beta) ? beta * rb : 0
  const variance = s * s * Math.max(0, 1 + aTerm - bTerm - (ra - rb) ** 2)
  const cdf = (x: number): number => (x <= a ? 0 : x >= b ? 1 : Math.exp(logNormDiff(alpha, (x - m) / s) - logZ))
  return {
    pdf: (x) => (x < a || x > b ? 0 : Math.exp(logNormPdf((x - m) / s) - logZ) / s),
    cdf,
    quantile: (p) => {
      if (p <= 0) return a
      if (p >= 1) return b
      const lo = Math.max(a, m - 40 * s)
      const hi = Math.min(b, m + 40 * s)
      return findRoot((x) => cdf(x) - p, lo < hi ? lo : a, lo < hi ? hi : b, 1e-15)
    },
    mean: () => mean,
    sd: () => Math.sqrt(variance),
  }
}

export function summarise(d: Pick<Univariate, 'quantile' | 'mean' | 'sd'>): PosteriorSummary {
  return { mean: d.mean(), sd: d.sd(), q025: d.quantile(PROBS[0]), q50: d.quantile(PROBS[1]), q975: d.quantile(PROBS[2]) }
}

/**
 * Posterior moments, CDF and quantiles on θ from a LogIntegral on the prior's u scale; the moments are integrated when first
 * asked for (power scaling reads only the CDF of its scaled posteriors).
 */
export function posteriorFromIntegral(li: LogIntegral, scale: PriorScale): Posterior {
  let moments: { mean: number; variance: number } | null = null
  const momentsOf = (): { mean: number; variance: number } => {
    if (!moments) {
      const mean = li.expect((u) => scale.theta(u))
      moments = { mean, variance: li.expect((u) => (scale.theta(u) - mean) ** 2) }
    }
    return moments
  }
  return {
    cdf: (t) => {
      const u = scale.toU(t)
      return Number.isNaN(u) ? (t <= scale.theta(li.lower) ? 0 : 1) : li.cdf(u)
    },
    quantile: (p) => scale.theta(li.quantile(p)),
    mean: () => momentsOf().mean,
    sd: () => Math.sqrt(momentsOf().variance),
  }
}

// ─── Normal data with known σ ────────────────────────────────────────────────────────────────────

type Conditional = { logEvidence: number; closed: boolean; posterior: () => Posterior }

type ClosedMeanPrior = Extract<PriorDistribution, { family: 'normal' | 'uniform' }>

/** Log marginal likelihood of normal data with known σ under a normal or uniform prior on μ, all constants included (BDA3 §2.5). */
function closedMeanLogEvidence(prior: ClosedMeanPrior, st: NormalStats, sigma: number): number {
  const { n, mean: xbar, ss } = st
  const se = sigma / Math.sqrt(n)
  const base = -(n / 2) * (LN_2PI + 2 * Math.log(sigma)) - ss / (2 * sigma * sigma) + 0.5 * (LN_2PI + 2 * Math.log(se))
  if (prior.family === 'normal') {
    const predSd = Math.sqrt(prior.sigma * prior.sigma + se * se)
    return base + logNormPdf((xbar - prior.mu) / predSd) - Math.log(predSd)
  }
  return base + logNormDiff((prior.lower - xbar) / se, (prior.upper - xbar) / se) - Math.log(prior.upper - prior.lower)
}

/** Marginal likelihood and posterior of μ for normal data with known σ (BDA3 §2.5; docs/methods/evidence.md). */
function normalKnownSigma(prior: PriorDistribution, st: NormalStats, sigma: number, force: boolean): Conditional {
  const { n, mean: xbar } = st
  const se = sigma / Math.sqrt(n)
  if (!force && prior.family === 'normal') {
    const tau = prior.sigma
    return {
      logEvidence: closedMeanLogEvidence(prior, st, sigma),
      closed: true,
      posterior: () => {
        const precision = 1 / (tau * tau) + 1 / (se * se)
        const v = 1 / precision
        const m = v * (prior.mu / (tau * tau) + xbar / (se * se))
        return normalUnivariate(m, Math.sqrt(v))
      },
    }
  }
  if (!force && prior.family === 'uniform') {
    return {
      logEvidence: closedMeanLogEvidence(prior, st, sigma),
      closed: true,
      posterior: () => truncatedNormal(xbar, se, prior.lower, prior.upper),
    }
  }
  const { ss } = st
  const base = -(n / 2) * (LN_2PI + 2 * Math.log(sigma)) - ss / (2 * sigma * sigma)
  const scale = priorScale(prior)
  const h = (u: number): number => scale.logPrior(u) - (n * (xbar - scale.theta(u)) ** 2) / (2 * sigma * sigma)
  const li = new LogIntegral(h, priorHints(scale, [hintOnU(scale, xbar, se)]))
  let post: Posterior | null = null
  return {
    logEvidence: base + li.logValue,
    closed: false,
    posterior: () => (post ??= posteriorFromIntegral(li, scale)),
  }
}

// ─── Normal data with unknown σ ──────────────────────────────────────────────────────────────────

/** μ and σ independent a priori: σ by quadrature on ln σ with μ integrated out in closed form (normal and uniform priors), otherwise μ by quadrature against the σ-marginal likelihood (docs/methods/evidence.md). */
function normalUnknownSigma(prior: PriorDistribution, st: NormalStats, sigmaPrior: PriorDistribution, force: boolean) {
  if (force || (prior.family !== 'normal' && prior.family !== 'uniform')) return marginalOfMean(prior, st, sigmaPrior)
  const closedPrior = prior
  const sScale = priorScale(sigmaPrior)
  const h = (v: number): number => {
    const sigma = sScale.theta(v)
    if (!(sigma > 0) || !Number.isFinite(sigma)) return -Infinity
    return sScale.logPrior(v) + closedMeanLogEvidence(closedPrior, st, sigma)
  }
  const sigmaHat = Math.sqrt(st.ss / Math.max(1, st.n - 1))
  const hints = priorHints(sScale, [sigmaHat > 0 ? hintOnU(sScale, sigmaHat, sigmaHat / Math.sqrt(2 * st.n)) : null])
  const li = new LogIntegral(h, hints)
  let parts: Posterior | null = null
  const posteriorParts = (): Posterior => (parts ??= sigmaMixturePosterior(closedPrior, st, li.nodes().map((nd) => ({ sigma: sScale.theta(nd.u), weight: nd.weight }))))
  const posterior = (): PosteriorSummary => summarise(posteriorParts())
  return { logEvidence: li.logValue, posterior, posteriorParts }
}

/**
 * The posterior of μ as the mixture over the σ quadrature nodes of the conditional posteriors given σ (normal for a normal
 * prior, truncated normal for a uniform one; BDA3 §2.5), nodes below 1e-17 of the largest weight left out.
 */
function sigmaMixturePosterior(prior: ClosedMeanPrior, st: NormalStats, nodes: { sigma: number; weight: number }[]): Posterior {
  const positive = nodes.filter((nd) => nd.weight > 0)
  const top = Math.max(...positive.map((nd) => nd.weight))
  const kept = positive.filter((nd) => nd.weight > 1e-17 * top)
  const total = kept.reduce((s, nd) => s + nd.weight, 0)
  const count = kept.length
  const w = new Float64Array(count)
  const m = new Float64Array(count)
  const sd = new Float64Array(count)
  const { n, mean: xbar } = st
  const truncated: Univariate[] = []
  for (let i = 0; i < count; i++) {
    w[i] = kept[i].weight / total
    const se = kept[i].sigma / Math.sqrt(n)
    if (prior.family === 'normal') {
      const tau = prior.sigma
      const v = 1 / (1 / (tau * tau) + 1 / (se * se))
      m[i] = v * (prior.mu / (tau * tau) + xbar / (se * se))
      sd[i] = Math.sqrt(v)
    } else {
      const d = truncatedNormal(xbar, se, prior.lower, prior.upper)
      truncated.push(d)
      m[i] = d.mean()
      sd[i] = d.sd()
    }
  }
  let mean = 0
  for (let i = 0; i < count; i++) mean += w[i] * m[i]
  let variance = 0
  for (let i = 0; i < count; i++) variance += w[i] * (sd[i] * sd[i] + (m[i] - mean) ** 2)
  const cdf = (x: number): number => {
    let s = 0
    if (prior.family === 'normal') for (let i = 0; i < count; i++) s += w[i] * normCdf((x - m[i]) / sd[i])
    else for (let i = 0; i < count; i++) s += w[i] * truncated[i].cdf(x)
    return s
  }
  const pdf = (x: number): number => {
    let s = 0
    if (prior.family === 'normal') for (let i = 0; i < count; i++) s += (w[i] * normPdf((x - m[i]) / sd[i])) / sd[i]
    else for (let i = 0; i < count; i++) s += w[i] * truncated[i].pdf(x)
    return s
  }
  const bounds = supportOf(prior)
  const spread = Math.sqrt(variance)
  return { cdf, quantile: (p) => quantileByNewton(cdf, pdf, p, mean, spread, bounds.lower, bounds.upper), mean: () => mean, sd: () => spread }
}

/**
 * The p-quantile of a continuous distribution with the given CDF, density, mean and sd on [lower, upper]: a bracket grown
 * from the normal approximation mean + sd·z_p by doubling steps, then Newton steps kept inside the bracket by bisection,
 * to 1e-15 of the sd (common practice).
 */
function quantileByNewton(cdf: (x: number) => number, pdf: (x: number) => number, p: number, mean: number, sd: number, lower: number, upper: number): number {
  if (!(p >= 0 && p <= 1)) return NaN
  if (p === 0) return lower
  if (p === 1) return upper
  const clamp = (x: number): number => Math.min(upper, Math.max(lower, x))
  let x = clamp(mean + sd * quantile({ family: 'normal', mu: 0, sigma: 1 }, p))
  let f = cdf(x) - p
  if (f === 0) return x
  // The bracket [lo, hi]: the starting point on one side, a point found by doubling steps away from it on the other.
  let lo = f < 0 ? x : lower
  let hi = f < 0 ? upper : x
  for (let step = sd, i = 0; i < 200; step *= 2, i++) {
    const probe = clamp(f < 0 ? x + step : x - step)
    const fp = cdf(probe) - p
    if (fp === 0) return probe
    if ((fp > 0) === (f < 0)) {
      if (f < 0) hi = probe
      else lo = probe
      break
    }
    if (f < 0) lo = probe
    else hi = probe
    if (probe === lower || probe === upper) break
  }
  for (let i = 0; i < 100; i++) {
    let next = x - f / pdf(x)
    // A Newton step this small has converged (a step to the bracket's own end included).
    if (Math.abs(next - x) <= 1e-15 * (Math.abs(x) + sd)) return next
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi)
    x = next
    if (!(hi - lo > 2e-16 * (Math.abs(x) + sd))) break
    f = cdf(x) - p
    if (f === 0) break
    if (f < 0) lo = x
    else hi = x
  }
  return x
}

/** The σ-marginal likelihood tables in use, keyed by (n, S, power, σ prior); a few are kept so that a whole impact analysis shares them. */
const sigmaMarginals = new Map<string, SigmaMarginal>()

/**
 * The table of ln M for the data's (n, S) and the σ prior; with a power α, of the likelihood raised to α (n·α observations,
 * S·α: read it at α·q).
 */
export function sigmaMarginalFor(st: NormalStats, sigmaPrior: PriorDistribution, power = 1): SigmaMarginal {
  const key = `${st.n}|${st.ss}|${power}|${JSON.stringify(sigmaPrior)}`
  let m = sigmaMarginals.get(key)
  if (!m) {
    const sScale = priorScale(sigmaPrior)
    m = new SigmaMarginal(
      {
        theta: sScale.theta,
        logPrior: sScale.logPrior,
        hints: (sigma, spread) => priorHints(sScale, [sigma !== null && spread !== null ? hintOnU(sScale, sigma, spread) : null]),
      },
      st.n * power,
      st.ss * power,
      sScale.theta(sScale.hint.center),
    )
    if (sigmaMarginals.size >= 32) sigmaMarginals.delete(sigmaMarginals.keys().next().value!)
    sigmaMarginals.set(key, m)
  }
  return m
}

/**
 * Evidence and marginal posterior of μ when σ is unknown, for any prior on μ: σ is integrated out first, giving the
 * likelihood of μ as a function of q = S + n(x̄ − μ)² alone (SigmaMarginal, shared by every prior for the same data), then
 * μ by adaptive quadrature on the prior's scale (Fubini: the same double integral in the other order).
 */
function marginalOfMean(prior: PriorDistribution, st: NormalStats, sigmaPrior: PriorDistribution) {
  const { n, mean: xbar, ss } = st
  const marginal = sigmaMarginalFor(st, sigmaPrior)
  const scale = priorScale(prior)
  const h = (u: number): number => {
    const d = xbar - scale.theta(u)
    return scale.logPrior(u) + marginal.logM(ss + n * d * d)
  }
  const sScale = priorScale(sigmaPrior)
  const sigmaHat = Math.sqrt(ss / Math.max(1, n - 1)) || sScale.theta(sScale.hint.center)
  const li = new LogIntegral(h, priorHints(scale, [hintOnU(scale, xbar, sigmaHat / Math.sqrt(n))]))
  let parts: Posterior | null = null
  const posteriorParts = (): Posterior => (parts ??= posteriorFromIntegral(li, scale))
  return { logEvidence: li.logValue, posterior: (): PosteriorSummary => summarise(posteriorParts()), posteriorParts }
}

// ─── Box's prior predictive check for the sample mean ────────────────────────────────────────────

/** Prior predictive of x̄: log density and log tails (kept in logs so that a strong conflict gives ln p, not 0). */
type Predictive = { logDensity(t: number): number; logLower(t: number): number; logUpper(t: number): number; symmetric: boolean; center: number; spread: number }

/**
 * Error kernel of x̄ − μ: a normal (known σ) or a scale mixture of normals Σ w_j N(0, s_j²) (σ integrated over its prior),
 * with its log density and log CDF.
 */
type Kernel = { s: number[]; w: number[]; logPdf(e: number): number; logCdf(e: number): number }

export function logSumExp(terms: number[]): number {
  const m = Math.max(...terms)
  if (!Number.isFinite(m)) return m
  let total = 0
  for (const t of terms) total += Math.exp(t - m)
  return m + Math.log(total)
}

function psi(z: number): number {
  return z * normCdf(z) + normPdf(z)
}

/** Prior predictive distribution of x̄ = μ + e: closed form for normal and uniform priors, quadrature over μ otherwise. */
function meanPredictive(prior: PriorDistribution, kernel: Kernel): Predictive {
  const { s, w } = kernel
  const logW = w.map(Math.log)
  const sBar = Math.sqrt(s.reduce((acc, sj, j) => acc + w[j] * sj * sj, 0))
  if (prior.family === 'normal') {
    const total = s.map((sj) => Math.sqrt(prior.sigma ** 2 + sj * sj))
    const logTail = (z: number): number => logSumExp(total.map((tj, j) => logW[j] + logNormCdf(z / tj)))
    return {
      logDensity: (t) => logSumExp(total.map((tj, j) => logW[j] + logNormPdf((t - prior.mu) / tj) - Math.log(tj))),
      logLower: (t) => logTail(t - prior.mu),
      logUpper: (t) => logTail(prior.mu - t),
      symmetric: true,
      center: prior.mu,
      spread: Math.sqrt(prior.sigma ** 2 + sBar * sBar),
    }
  }
  const scale = priorScale(prior)
  const logK = kernel.logCdf
  const logk = kernel.logPdf
  const integral = (t: number, logKernel: (theta: number) => number): number =>
    s.length > 1 ? logConvolutionSplit(scale, t, sBar, logKernel) : new LogIntegral((u) => scale.logPrior(u) + logKernel(scale.theta(u)), priorHints(scale, [hintOnU(scale, t, sBar)])).logValue
  const logLowerByQuadrature = (t: number): number => integral(t, (th) => logK(t - th))
  const logUpperByQuadrature = (t: number): number => integral(t, (th) => logK(th - t))
  if (prior.family === 'uniform') {
    const { lower: a, upper: b } = prior
    const lowerTail = (t: number): number => s.reduce((acc, sj, j) => acc + ((w[j] * sj) / (b - a)) * (psi((t - a) / sj) - psi((t - b) / sj)), 0)
    // ψ(z) = zΦ(z) + φ(z) cancels for z ≪ 0: below 1e-8 the tail is taken by quadrature in logs instead.
    const logTail = (t: number, byQuadrature: (t: number) => number): number => {
      const v = lowerTail(t)
      return v > 1e-8 ? Math.log(v) : byQuadrature(t)
    }
    return {
      logDensity: (t) => logSumExp(s.map((sj, j) => logW[j] + logNormDiff((a - t) / sj, (b - t) / sj))) - Math.log(b - a),
      logLower: (t) => logTail(t, logLowerByQuadrature),
      logUpper: (t) => logTail(a + b - t, () => logUpperByQuadrature(t)),
      symmetric: true,
      center: (a + b) / 2,
      spread: Math.sqrt((b - a) ** 2 / 12 + sBar * sBar),
    }
  }
  const iqr = quantile(prior, 0.75) - quantile(prior, 0.25)
  return {
    logDensity: (t) => integral(t, (th) => logk(t - th)),
    logLower: logLowerByQuadrature,
    logUpper: logUpperByQuadrature,
    symmetric: prior.family === 'student-t',
    center: quantile(prior, 0.5),
    spread: Math.sqrt((iqr / 1.349) ** 2 + sBar * sBar),
  }
}

/**
 * ln ∫ π(u) F(θ(u)) du over the prior's u scale for a kernel term F of a scale mixture read at θ(u), split at u_t = u(t)
 * and taken on each side in w = ln|u − u_t|. The mixture's components down to tiny widths make F a peak at θ = t that spans
 * many scales, which adaptive bisection in u resolves only after dozens of halvings; in ln|u − u_t| it is smooth (common
 * practice: a change of variable that takes an endpoint singularity away). Where t is outside the prior's support, the
 * plain integral in u.
 */
function logConvolutionSplit(scale: PriorScale, t: number, sBar: number, logKernel: (theta: number) => number): number {
  const ut = scale.toU(t)
  const kernelHint = hintOnU(scale, t, sBar)
  const hints = priorHints(scale, [kernelHint])
  if (!Number.isFinite(ut)) return new LogIntegral((u) => scale.logPrior(u) + logKernel(scale.theta(u)), hints).logValue
  const centres = [Math.abs(scale.hint.center - ut), scale.hint.scale, ...(kernelHint ? [kernelHint.scale] : [])].filter((d) => d > 0 && Number.isFinite(d))
  const sides = [-1, 1].map((dir) => {
    const h = (w: number): number => {
      const u = ut + dir * Math.exp(w)
      return scale.logPrior(u) + logKernel(scale.theta(u)) + w
    }
    return new LogIntegral(h, centres.map((d) => ({ center: Math.log(d), scale: 1 }))).logValue
  })
  return logSumExp(sides)
}

/**
 * The first component (of widths in ascending order) that can matter at e: one narrower than |e|/40 has a term below
 * e^(−800) of its weight, negligible beside any wider one; all of them when none is wider.
 */
function firstWideEnough(s: Float64Array, e: number): number {
  const narrowest = Math.abs(e) / 40
  let lo = 0
  let hi = s.length
  while (lo < hi) {
    const mid = (lo + hi) >> 1
    if (s[mid] < narrowest) lo = mid + 1
    else hi = mid
  }
  return lo < s.length ? lo : 0
}

/** ln Σ w_j Φ(e / s_j): the kernel's log CDF (widths s ascending), each term once into the scratch array. */
function kernelLogCdf(s: Float64Array, logW: Float64Array, scratch: Float64Array, e: number): number {
  const from = firstWideEnough(s, e)
  let top = -Infinity
  for (let j = from; j < s.length; j++) {
    const t = logW[j] + logNormCdf(e / s[j])
    scratch[j] = t
    if (t > top) top = t
  }
  if (!Number.isFinite(top)) return top
  let total = 0
  for (let j = from; j < s.length; j++) total += Math.exp(scratch[j] - top)
  return top + Math.log(total)
}

/** ln Σ w_j φ(e / s_j) / s_j: the kernel's log density (widths ascending; inv = 1/s_j, c = ln w_j − ln s_j − ½ ln 2π). */
function kernelLogPdf(s: Float64Array, inv: Float64Array, c: Float64Array, e: number): number {
  const from = firstWideEnough(s, e)
  let top = -Infinity
  for (let j = from; j < inv.length; j++) {
    const z = e * inv[j]
    const t = c[j] - 0.5 * z * z
    if (t > top) top = t
  }
  if (!Number.isFinite(top)) return top
  let total = 0
  for (let j = from; j < inv.length; j++) {
    const z = e * inv[j]
    total += Math.exp(c[j] - 0.5 * z * z - top)
  }
  return top + Math.log(total)
}

/**
 * The kernel Σ w_j N(0, s_j²). A normal is read directly; a mixture through CheckedTables of its log density and log CDF
 * (e ≤ 0; the other side by symmetry, K(e) = 1 − K(−e)) in t = ln(|e| + min s_j), which follow the sums to 2e-13: the
 * predictive check reads the kernel inside nested quadratures, and each direct read costs one exponential per component.
 */
function scaleMixtureKernel(s: number[], w: number[]): Kernel {
  const order = s.map((_, j) => j).sort((i, j) => s[i] - s[j])
  const sd = Float64Array.from(order, (j) => s[j])
  const logW = Float64Array.from(order, (j) => Math.log(w[j]))
  const inv = Float64Array.from(sd, (sj) => 1 / sj)
  const c = Float64Array.from(sd, (sj, j) => logW[j] - Math.log(sj) - 0.5 * LN_2PI)
  const scratch = new Float64Array(sd.length)
  const logPdf = (e: number): number => kernelLogPdf(sd, inv, c, e)
  const logCdf = (e: number): number => kernelLogCdf(sd, logW, scratch, e)
  if (s.length === 1) return { s, w, logPdf, logCdf }
  const floor = sd[0]
  const origin = Math.log(floor)
  const atDistance = (t: number): number => Math.max(0, Math.exp(t) - floor)
  const pdf = new CheckedTable((t) => logPdf(atDistance(t)), origin, 2)
  const lowerTail = new CheckedTable((t) => logCdf(-atDistance(t)), origin, 2)
  const logLowerTail = (e: number): number => lowerTail.at(Math.log(-e + floor))
  return {
    s,
    w,
    logPdf: (e) => (Number.isFinite(e) ? pdf.at(Math.log(Math.abs(e) + floor)) : -Infinity),
    logCdf: (e) => {
      if (Number.isNaN(e)) return NaN
      if (e === -Infinity) return -Infinity
      if (e === Infinity) return 0
      return e <= 0 ? logLowerTail(e) : Math.log1p(-Math.exp(logLowerTail(-e)))
    },
  }
}

/**
 * The components of a scale mixture narrower than 1e-6 of its root-mean-square width, merged into one with their total
 * weight and their mean variance: convolved with a prior whose own scale L is wider, the merged part differs from the
 * parts by O(W (s/L)⁴) relative (the second moments agree), under 1e-18 for L above 1e-3 of the kernel's width (common
 * practice: moment matching). The σ prior's nodes reach down to 1e-17 of its scale, and each of those narrow components
 * otherwise needs its own detail in the kernel's tables.
 */
function mergeNarrowComponents(s: number[], w: number[]): [number[], number[]] {
  const rms = Math.sqrt(s.reduce((acc, sj, j) => acc + w[j] * sj * sj, 0))
  const narrow = s.map((sj) => sj < 1e-6 * rms)
  const weight = w.reduce((acc, wj, j) => acc + (narrow[j] ? wj : 0), 0)
  if (!(weight > 0)) return [s, w]
  const variance = s.reduce((acc, sj, j) => acc + (narrow[j] ? w[j] * sj * sj : 0), 0) / weight
  return [[Math.sqrt(variance), ...s.filter((_, j) => !narrow[j])], [weight, ...w.filter((_, j) => !narrow[j])]]
}

/** The kernels of x̄ − μ for σ priors in use, by (σ prior, n): every candidate of an analysis shares one. */
const sigmaKernels = new Map<string, Kernel>()

/** The kernel of x̄ − μ when σ has a prior: the σ prior's quadrature nodes as a scale mixture of N(0, σ²/n). */
function sigmaMixtureKernel(sigmaPrior: PriorDistribution, n: number): Kernel {
  const key = `${n}|${JSON.stringify(sigmaPrior)}`
  const known = sigmaKernels.get(key)
  if (known) return known
  const sScale = priorScale(sigmaPrior)
  const nodes = new LogIntegral((v) => sScale.logPrior(v), [sScale.hint]).nodes()
  const top = Math.max(...nodes.map((nd) => nd.weight))
  const kept = nodes.filter((nd) => nd.weight > 1e-16 * top)
  const total = kept.reduce((acc, nd) => acc + nd.weight, 0)
  const kernel = scaleMixtureKernel(...mergeNarrowComponents(kept.map((nd) => sScale.theta(nd.u) / Math.sqrt(n)), kept.map((nd) => nd.weight / total)))
  if (sigmaKernels.size >= 16) sigmaKernels.delete(sigmaKernels.keys().next().value!)
  sigmaKernels.set(key, kernel)
  return kernel
}

/**
 * Box's (1980) p-value P(g(X̄) ≤ g(x̄)) under the prior predictive density g of the sample mean: 2·min(tail) when g is
 * symmetric; otherwise the two tails beyond x̄ and beyond the point on the other side of the mode with equal density
 * (g is unimodal when the prior is: normal errors are strongly unimodal, Ibragimov 1956).
 */
function logBoxPForMean(pred: Predictive, xbar: number): number {
  if (pred.symmetric) {
    const logTail = xbar <= pred.center ? pred.logLower(xbar) : pred.logUpper(xbar)
    return Math.min(0, Math.LN2 + logTail)
  }
  const mode = maximize((t) => pred.logDensity(t), pred.center, pred.spread).u
  const target = pred.logDensity(xbar)
  if (xbar === mode) return 0
  const dir = xbar < mode ? 1 : -1
  const g = (t: number): number => pred.logDensity(t) - target
  if (g(mode) <= 0) return 0
  let step = pred.spread
  let far = mode + dir * step
  for (let i = 0; i < 60 && g(far) > 0; i++) {
    step *= 2
    far = mode + dir * step
  }
  const other = findRoot(g, Math.min(mode, far), Math.max(mode, far), 1e-10)
  const left = Math.min(xbar, other)
  const right = Math.max(xbar, other)
  return Math.min(0, logSumExp([pred.logLower(left), pred.logUpper(right)]))
}

// ─── Counts ──────────────────────────────────────────────────────────────────────────────────────

/** The Beta(a, b) on [0, 1] that a beta, a uniform or a scaled beta on exactly [0, 1] is; null otherwise. */
export function asStandardBeta(prior: PriorDistribution): { a: number; b: number } | null {
  if (prior.family === 'beta') return { a: prior.alpha, b: prior.beta }
  if (prior.family === 'uniform' && prior.lower === 0 && prior.upper === 1) return { a: 1, b: 1 }
  if (prior.family === 'scaled-beta' && prior.lower === 0 && prior.upper === 1) return { a: prior.alpha, b: prior.beta }
  return null
}

function validateBinomialRows(rows: { successes: number[]; trials: number[] }, successes: number, trials: number): void {
  const { successes: ys, trials: ns } = rows ?? ({} as typeof rows)
  if (!Array.isArray(ys) || !Array.isArray(ns) || ys.length === 0 || ys.length !== ns.length) throw new EngineInputError('rows', 'Give one number of successes and one of trials per row.')
  ys.forEach((y, i) => {
    const n = ns[i]
    if (!Number.isInteger(n) || n < 0 || !Number.isInteger(y) || y < 0 || y > n) throw new EngineInputError('rows', `Row ${i + 1} must have whole numbers of successes and trials, the successes no more than the trials.`)
  })
  if (ys.reduce((s, y) => s + y, 0) !== successes || ns.reduce((s, n) => s + n, 0) !== trials) throw new EngineInputError('rows', 'The rows do not add up to the totals.')
}

/**
 * ln of the binomial likelihood of the data as recorded at the pooled proportion p̂ = y/n: with rows, the sum of the
 * per-row log pmfs (a 0/1 column has no coefficient: its pmf is p̂ or 1 − p̂); given as totals only, the one pmf. The
 * factor in θ is the same either way, so Bayes factors do not change (common practice: independent rows multiply their
 * pmfs). Each pmf is Loader's saddle-point form, so that nothing cancels at n in the billions; the evidence is this plus
 * the log of the prior mean of the likelihood ratio L(θ)/L(p̂).
 */
function binomialLogLikelihoodAtPooled(data: Extract<PilotData, { model: 'binomial' }>): number {
  const { successes: y, trials: n } = data
  if (y === 0 || y === n) return 0
  const p = y / n
  const q = (n - y) / n
  if (!data.rows) return logBinomialPmf(y, n, p, q)
  return data.rows.successes.reduce((s, yi, i) => s + logBinomialPmf(yi, data.rows!.trials[i], p, q), 0)
}

/**
 * ln of the beta-binomial probability C(n, y) B(a + y, b + n − y)/B(a, b), as three ln Γ differences grouped so that
 * none cancels: by the counts when n ≥ a + b (ln Γ(y + a) − ln Γ(y + 1), …), by the prior otherwise (ln Γ(a + y) − ln Γ(a), …).
 */
function logBetaBinomialPmf(y: number, n: number, a: number, b: number): number {
  if (n >= a + b) return lgammaDiff(y + 1, a - 1) + lgammaDiff(n - y + 1, b - 1) - lgammaDiff(n + 1, a + b - 1) - lbeta(a, b)
  return lgammaDiff(a, y) + lgammaDiff(b, n - y) - lgammaDiff(a + b, n) - Math.log(n + 1) - lbeta(y + 1, n - y + 1)
}

/** ln of the negative binomial probability Γ(a + Y)/(Γ(a) Y!) p^a q^Y, as a/(a + Y) times Loader's binomial pmf of a in a + Y (Loader 2000; common practice). */
function logNegativeBinomialPmf(Y: number, a: number, p: number, q: number): number {
  if (Y === 0) return a * (p <= 0.5 ? Math.log(p) : Math.log1p(-q))
  return Math.log(a / (a + Y)) + logBinomialPmf(a, a + Y, p, q)
}

/** ln of Box's two-sided p for a discrete statistic, 2·min(P(T ≤ t), P(T ≥ t)) capped at 1, from the log tails. */
function logCountP(logLower: number, logUpper: number): number {
  return Math.min(0, Math.LN2 + Math.min(logLower, logUpper))
}

/**
 * Largest count for which the tails of the prior predictive are taken over the prior (a beta-binomial summed term by term,
 * otherwise quadrature of the count's tail under the prior); beyond it the tail of the count is a step of width about
 * 1/√n in θ, and the tails are taken as the prior's CDF averaged over a beta or gamma instead (largeCountLogTails).
 */
const LARGE_COUNT = 20_000

/**
 * ln P(T ≤ y) and ln P(T ≥ y) for a beta-binomial, summing the pmf relative to its value at y; the running sums are
 * rescaled in logs so that a y far in the tail (terms growing past 1e308 towards the mode) neither overflows nor underflows.
 */
function betaBinomialLogTails(y: number, n: number, a: number, b: number): { logLower: number; logUpper: number } {
  const side = (step: (k: number) => number, from: number, to: number, dir: 1 | -1): number => {
    let logScale = 0
    let sum = 1
    let term = 1
    for (let k = from; dir < 0 ? k > to : k < to; k += dir) {
      term *= step(k)
      sum += term
      if (sum > 1e280) {
        logScale += Math.log(sum)
        term /= sum
        sum = 1
      }
      if (term < 1e-300 * sum) break
    }
    return logScale + Math.log(sum)
  }
  const logLowerSum = side((k) => (k / (n - k + 1)) * ((b + n - k) / (a + k - 1)), y, 0, -1)
  const logUpperSum = side((k) => ((n - k) / (k + 1)) * ((a + k) / (b + n - k - 1)), y, n, 1)
  // total = lower + upper − the shared term at y (1 on the relative scale)
  const logTotal = logSumExp([logLowerSum, logUpperSum]) + Math.log1p(-Math.exp(-logSumExp([logLowerSum, logUpperSum])))
  return { logLower: logLowerSum - logTotal, logUpper: logUpperSum - logTotal }
}

/** ln E[P(θ)] under the prior for a probability P given in logs, by quadrature on the prior's u scale. */
function logPriorExpectation(scale: PriorScale, logValue: (u: number) => number, hints: (Hint | null)[]): number {
  return new LogIntegral((u) => scale.logPrior(u) + logValue(u), priorHints(scale, hints)).logValue
}

/** ln P(T ≤ y) and ln P(T ≥ y) for T ~ Binomial(n, θ), θ from the prior: E[I_{1−θ}(n − y, y + 1)] and E[I_θ(y, n − y + 1)]. */
function binomialLogTailsByQuadrature(scale: PriorScale, y: number, n: number, likHint: Hint | null): { logLower: number; logUpper: number } {
  const logLower = y === n ? 0 : logPriorExpectation(scale, (u) => logBetaPQ(scale.oneMinusTheta(u), n - y, y + 1, scale.theta(u)).logP, [likHint])
  const logUpper = y === 0 ? 0 : logPriorExpectation(scale, (u) => logBetaPQ(scale.theta(u), y, n - y + 1, scale.oneMinusTheta(u)).logP, [likHint])
  return { logLower, logUpper }
}

/** ln E[e^g(s)] for s ~ Beta(α, β), by quadrature on v = logit s with the density kept free of cancellation (logBetaKernel). */
function logBetaExpectation(alpha: number, beta: number, logG: (s: number) => number): number {
  const h = (v: number): number => {
    const s = 1 / (1 + Math.exp(-v))
    const sc = 1 / (1 + Math.exp(v))
    return logBetaKernel(s, alpha, beta, sc) + logG(s)
  }
  return new LogIntegral(h, [{ center: Math.log(alpha / beta), scale: Math.sqrt(1 / alpha + 1 / beta) }]).logValue
}

/** ln E[e^g(x)] for x ~ Gamma(shape, 1), by quadrature on v = ln x with the density in Temme's stable form (logGammaPrefactor). */
function logGammaExpectation(shape: number, logG: (x: number) => number): number {
  const h = (v: number): number => logGammaPrefactor(shape, Math.exp(v)) + logG(Math.exp(v))
  return new LogIntegral(h, [{ center: Math.log(shape), scale: 1 / Math.sqrt(shape) }]).logValue
}

/**
 * ln P(T ≤ y) and ln P(T ≥ y) for a count at large n from the prior's log CDF and survival function: for the binomial
 * P(Bin(n, θ) ≤ y) = P(Beta(y + 1, n − y) > θ) (Abramowitz & Stegun 1964, 26.5.24), so P(T ≤ y) = E[F(B)] with
 * B ~ Beta(y + 1, n − y) and P(T ≥ y) = E[S(B′)] with B′ ~ Beta(y, n − y + 1); for the Poisson with exposure E,
 * P(Pois(λE) ≤ Y) = P(Gamma(Y + 1) > λE) (Abramowitz & Stegun 1964, 26.4.21), so P(T ≤ Y) = E[F(G/E)], G ~ Gamma(Y + 1),
 * and P(T ≥ Y) = E[S(G′/E)], G′ ~ Gamma(Y). The averaged function is the prior's smooth CDF and the weight a peak of
 * known place and width, so the cost does not grow with n (common practice: conditioning on θ the other way round).
 */
function largeCountLogTails(prior: PriorDistribution, data: { model: 'binomial'; y: number; n: number } | { model: 'poisson'; y: number; exposure: number }): { logLower: number; logUpper: number } {
  const y = data.y
  if (data.model === 'binomial') {
    const n = data.n
    return {
      logLower: y === n ? 0 : logBetaExpectation(y + 1, n - y, (s) => logCdfSf(prior, s).logCdf),
      logUpper: y === 0 ? 0 : logBetaExpectation(y, n - y + 1, (s) => logCdfSf(prior, s).logSf),
    }
  }
  const e = data.exposure
  return {
    logLower: logGammaExpectation(y + 1, (g) => logCdfSf(prior, g / e).logCdf),
    logUpper: y === 0 ? 0 : logGammaExpectation(y, (g) => logCdfSf(prior, g / e).logSf),
  }
}

/** Where the binomial likelihood sits on the prior's u scale: ŷ/n and its standard error. */
function binomialLikelihoodHint(scale: PriorScale, y: number, n: number): Hint | null {
  const pHat = (y + 0.5) / (n + 1)
  return hintOnU(scale, pHat, Math.sqrt((pHat * (1 - pHat)) / n))
}

/**
 * The binomial likelihood integrated against the prior on its u scale, as the likelihood ratio L(θ)/L(p̂) with p̂ = y/n:
 * y ln(θ/p̂) + (n − y) ln((1 − θ)/(1 − p̂)) = y φ(θ/p̂ − 1) + (n − y) φ((1 − θ)/(1 − p̂) − 1), φ(t) = ln(1 + t) − t (the linear
 * terms cancel exactly), so that no terms of size n cancel; binomialLogLikelihoodAtPooled adds ln L(p̂) back.
 */
function binomialIntegral(prior: PriorDistribution, y: number, n: number) {
  const scale = priorScale(prior)
  const p = y / n
  const q = (n - y) / n
  const logRatio = (u: number): number => {
    const th = scale.theta(u)
    const om = scale.oneMinusTheta(u)
    if (y === 0) return n * Math.log(om)
    if (y === n) return n * Math.log(th)
    return y * log1pmx((th - p) / p) + (n - y) * log1pmx((om - q) / q)
  }
  const likHint = binomialLikelihoodHint(scale, y, n)
  const li = new LogIntegral((u) => scale.logPrior(u) + logRatio(u), priorHints(scale, [likHint]))
  return { scale, li, likHint }
}

function binomialAnalysis(prior: PriorDistribution, data: Extract<PilotData, { model: 'binomial' }>, opts: AnalyzeOptions): Analysis {
  const { successes: y, trials: n } = data
  const asBeta = asStandardBeta(prior)
  if (asBeta && !opts.forceQuadrature) {
    const { a, b } = asBeta
    const post = { family: 'beta' as const, alpha: a + y, beta: b + n - y }
    let logP = NaN
    if (!opts.skipPredictiveCheck) {
      const tails = n <= LARGE_COUNT ? betaBinomialLogTails(y, n, a, b) : largeCountLogTails(prior, { model: 'binomial', y, n })
      logP = logCountP(tails.logLower, tails.logUpper)
    }
    // with rows: their pmfs at p̂ over the totals' pmf at p̂, the same ratio of coefficients without cancelling ln C(n, y)
    const rows = data.rows ? binomialLogLikelihoodAtPooled(data) - binomialLogLikelihoodAtPooled({ ...data, rows: undefined }) : 0
    return {
      logEvidence: logBetaBinomialPmf(y, n, a, b) + rows,
      method: 'closed-form',
      posterior: summariseDistribution(post),
      ...predictiveCheck(logP),
      priorEss: priorEffectiveSampleSize(prior, { model: 'binomial', successes: y, trials: n }),
    }
  }
  const { scale, li, likHint } = binomialIntegral(prior, y, n)
  let logP = NaN
  if (!opts.skipPredictiveCheck) {
    const tails = n <= LARGE_COUNT ? binomialLogTailsByQuadrature(scale, y, n, likHint) : largeCountLogTails(prior, { model: 'binomial', y, n })
    logP = logCountP(tails.logLower, tails.logUpper)
  }
  return {
    logEvidence: binomialLogLikelihoodAtPooled(data) + li.logValue,
    method: 'quadrature',
    posterior: summarise(posteriorFromIntegral(li, scale)),
    ...predictiveCheck(logP),
    priorEss: priorEffectiveSampleSize(prior, { model: 'binomial', successes: y, trials: n }),
  }
}

/**
 * The Poisson likelihood of Y events in exposure T integrated against the prior on its u scale, as the ratio L(λ)/L(λ̂)
 * with λ̂ = Y/T: Y ln(λ/λ̂) − (λ − λ̂)T = Y φ(λ/λ̂ − 1), φ(t) = ln(1 + t) − t, so that no terms of size Y cancel.
 */
function poissonIntegral(prior: PriorDistribution, Y: number, T: number) {
  const scale = priorScale(prior)
  const lamHat = Y / T
  const logRatio = (u: number): number => {
    const lam = scale.theta(u)
    return Y > 0 ? Y * log1pmx((lam - lamHat) / lamHat) : -lam * T
  }
  const hintCenter = (Y + 0.5) / T
  const likHint = hintOnU(scale, hintCenter, Math.sqrt(Y + 0.5) / T)
  const li = new LogIntegral((u) => scale.logPrior(u) + logRatio(u), priorHints(scale, [likHint]))
  return { scale, li, likHint }
}

/** ln of the Poisson likelihood of the counts at the pooled rate λ̂ = Y/T, each pmf in Loader's form (no cancellation at counts in the billions). */
function poissonLogLikelihoodAtPooled(counts: number[], exposures: number[], Y: number, T: number): number {
  return counts.reduce((s, c, i) => s + logPoissonPmf(c, (Y * exposures[i]) / T), 0)
}

function poissonAnalysis(prior: PriorDistribution, counts: number[], exposures: number[], opts: AnalyzeOptions): Analysis {
  const Y = counts.reduce((s, c) => s + c, 0)
  const T = exposures.reduce((s, t) => s + t, 0)
  const atPooled = poissonLogLikelihoodAtPooled(counts, exposures, Y, T)
  if (prior.family === 'gamma' && !opts.forceQuadrature) {
    const { shape: a, rate: b } = prior
    const post = { family: 'gamma' as const, shape: a + Y, rate: b + T }
    let logP = NaN
    if (!opts.skipPredictiveCheck) {
      const q = b / (b + T)
      const qc = T / (b + T)
      const logLower = logBetaPQ(q, a, Y + 1, qc).logP
      const logUpper = Y === 0 ? 0 : logBetaPQ(qc, Y, a, q).logP
      logP = logCountP(logLower, logUpper)
    }
    return {
      // the negative binomial of the total, times the counts' pmfs at λ̂ over the total's (the split of Y over the exposures)
      logEvidence: logNegativeBinomialPmf(Y, a, b / (b + T), T / (b + T)) + atPooled - logPoissonPmf(Y, Y),
      method: 'closed-form',
      posterior: summariseDistribution(post),
      ...predictiveCheck(logP),
      priorEss: priorEffectiveSampleSize(prior, { model: 'poisson', counts, exposures }),
    }
  }
  const { scale, li, likHint } = poissonIntegral(prior, Y, T)
  let logP = NaN
  if (!opts.skipPredictiveCheck) {
    const tails =
      Y <= LARGE_COUNT
        ? {
            logLower: logPriorExpectation(scale, (u) => logGammaPQ(Y + 1, scale.theta(u) * T).logQ, [likHint]),
            logUpper: Y === 0 ? 0 : logPriorExpectation(scale, (u) => logGammaPQ(Y, scale.theta(u) * T).logP, [likHint]),
          }
        : largeCountLogTails(prior, { model: 'poisson', y: Y, exposure: T })
    logP = logCountP(tails.logLower, tails.logUpper)
  }
  return {
    logEvidence: atPooled + li.logValue,
    method: 'quadrature',
    posterior: summarise(posteriorFromIntegral(li, scale)),
    ...predictiveCheck(logP),
    priorEss: priorEffectiveSampleSize(prior, { model: 'poisson', counts, exposures }),
  }
}

/** The level below which Box's p flags a prior–data conflict: the customary 5 % (Box 1980; docs/methods/box-check.md). */
export const CONFLICT_LEVEL = 0.05

/** Box's p from its logarithm, the log itself (finite where p underflows) and the conflict flag; NaN and false when skipped. */
function predictiveCheck(logP: number): Pick<Analysis, 'priorPredictiveP' | 'logPriorPredictiveP' | 'conflict'> {
  return { priorPredictiveP: Math.exp(logP), logPriorPredictiveP: logP, conflict: logP < Math.log(CONFLICT_LEVEL) }
}

function summariseDistribution(d: PriorDistribution): PosteriorSummary {
  return summarise(toUnivariate(d))
}

// ─── Entry point ─────────────────────────────────────────────────────────────────────────────────

/**
 * Log marginal likelihood (all constants included), posterior summary, Box's prior predictive p-value and prior ESS
 * for one prior and one pilot data set: closed forms for conjugate pairs (BDA3 §2.4–2.6; docs/methods/evidence.md), otherwise
 * adaptive Gauss–Kronrod quadrature in log space (Piessens et al. 1983; docs/methods/evidence.md).
 */
export function analyzePrior(prior: DirichletPrior, data: MultinomialData): DirichletAnalysis
export function analyzePrior(prior: PriorDistribution, data: PilotData, options?: AnalyzeOptions): Analysis
export function analyzePrior(
  prior: PriorDistribution | DirichletPrior,
  data: PilotData | MultinomialData,
  options: AnalyzeOptions = {},
): Analysis | DirichletAnalysis {
  if (prior?.family === 'dirichlet' || data?.model === 'multinomial') {
    if (prior?.family !== 'dirichlet') throw new EngineInputError('prior', 'Multinomial data need a Dirichlet prior on the shares.')
    if (data?.model !== 'multinomial') throw new EngineInputError('data', 'A Dirichlet prior goes with multinomial data (rows of category counts).')
    return dirichletMultinomialAnalysis(prior, data)
  }
  validateData(prior, data)
  const force = options.forceQuadrature === true
  switch (data.model) {
    case 'normal-known-sigma': {
      const st = normalStats(data.values)
      const c = normalKnownSigma(prior, st, data.sigma, force)
      const pred = options.skipPredictiveCheck ? null : meanPredictive(prior, scaleMixtureKernel([data.sigma / Math.sqrt(st.n)], [1]))
      return {
        logEvidence: c.logEvidence,
        method: c.closed ? 'closed-form' : 'quadrature',
        posterior: summarise(c.posterior()),
        ...predictiveCheck(pred ? logBoxPForMean(pred, st.mean) : NaN),
        priorEss: priorEffectiveSampleSize(prior, data),
      }
    }
    case 'normal': {
      const st = normalStats(data.values)
      const r = normalUnknownSigma(prior, st, data.sigmaPrior, force)
      const pred = options.skipPredictiveCheck ? null : meanPredictive(prior, sigmaMixtureKernel(data.sigmaPrior, st.n))
      return {
        logEvidence: r.logEvidence,
        method: 'quadrature',
        posterior: r.posterior(),
        ...predictiveCheck(pred ? logBoxPForMean(pred, st.mean) : NaN),
        priorEss: null,
      }
    }
    case 'binomial':
      return binomialAnalysis(prior, data, options)
    case 'poisson':
      return poissonAnalysis(prior, data.counts, data.exposures, options)
  }
}

/**
 * Normal data with a normal–inverse-gamma prior μ | σ² ~ N(m₀, σ²/κ₀), σ² ~ IG(α₀, β₀): posterior parameters and log
 * marginal likelihood (Murphy 2007, "Conjugate Bayesian analysis of the Gaussian distribution", NIG section; BDA3 §3.3).
 */
export function normalInverseGamma(values: number[], prior: { m0: number; kappa0: number; alpha0: number; beta0: number }) {
  const { n, mean: xbar, ss } = normalStats(values)
  const { m0, kappa0, alpha0, beta0 } = prior
  for (const [k, v] of Object.entries({ kappa0, alpha0, beta0 }))
    if (!(v > 0 && Number.isFinite(v))) throw new EngineInputError(k, `${k} must be a positive number.`)
  if (!Number.isFinite(m0)) throw new EngineInputError('m0', 'm0 must be a finite number.')
  const kappaN = kappa0 + n
  const mN = (kappa0 * m0 + n * xbar) / kappaN
  const alphaN = alpha0 + n / 2
  const betaN = beta0 + ss / 2 + (kappa0 * n * (xbar - m0) ** 2) / (2 * kappaN)
  const logEvidence =
    lgamma(alphaN) - lgamma(alpha0) + alpha0 * Math.log(beta0) - alphaN * Math.log(betaN) + 0.5 * (Math.log(kappa0) - Math.log(kappaN)) - (n / 2) * LN_2PI
  return {
    logEvidence,
    kappaN,
    mN,
    alphaN,
    betaN,
    posteriorMeanSigma2: alphaN > 1 ? betaN / (alphaN - 1) : Infinity,
    mu: { family: 'student-t' as const, mu: mN, sigma: Math.sqrt(betaN / (alphaN * kappaN)), df: 2 * alphaN },
  }
}

/**
 * Box's (1980) check for normal data with known σ and a N(m₀, τ²) prior on μ: the sample-mean version
 * (z = (x̄ − m₀)/√(τ² + σ²/n), two-sided and upper-tail p) and the full-data version Q = S/σ² + (x̄ − m₀)²/(τ² + σ²/n) ~ χ²_n.
 */
export function boxCheckNormalNormal(values: number[], sigma: number, prior: { mu: number; sigma: number }) {
  const { n, mean: xbar, ss } = normalStats(values)
  if (!(sigma > 0)) throw new EngineInputError('sigma', 'σ must be a positive number.')
  const predSd = Math.sqrt(prior.sigma ** 2 + (sigma * sigma) / n)
  const z = (xbar - prior.mu) / predSd
  const q = ss / (sigma * sigma) + z * z
  return {
    predictiveSd: predSd,
    z,
    pTwoSided: 2 * normCdf(-Math.abs(z)),
    pUpperTail: normCdf(-z),
    fullDataQ: q,
    fullDataP: gammaPQ(n / 2, q / 2).q,
  }
}

/**
 * Prior effective sample size (Morita, Thall & Müller 2008; docs/methods/effective-sample-size.md): beta a + b (a uniform or scaled beta on [0, 1]
 * counts as the beta it is), normal mean with known σ σ²/τ², gamma–Poisson the rate b in exposure units; null otherwise.
 */
export function priorEffectiveSampleSize(prior: PriorDistribution, data: PilotData): number | null {
  if (data.model === 'binomial') {
    const b = asStandardBeta(prior)
    return b ? b.a + b.b : null
  }
  if (data.model === 'normal-known-sigma' && prior.family === 'normal') return (data.sigma / prior.sigma) ** 2
  if (data.model === 'poisson' && prior.family === 'gamma') return prior.rate
  return null
}

/**
 * The posterior of θ for one prior and one pilot data set, as a distribution (CDF, quantiles, moments): conjugate
 * closed forms where they exist (BDA3 §2.4–2.6), otherwise from the same quadrature as the evidence.
 */
export function posteriorOf(prior: PriorDistribution, data: PilotData): Posterior {
  validateData(prior, data)
  switch (data.model) {
    case 'normal-known-sigma':
      return normalKnownSigma(prior, normalStats(data.values), data.sigma, false).posterior()
    case 'normal':
      return normalUnknownSigma(prior, normalStats(data.values), data.sigmaPrior, false).posteriorParts()
    case 'binomial': {
      const { successes: y, trials: n } = data
      const asBeta = asStandardBeta(prior)
      if (asBeta) return toUnivariate({ family: 'beta', alpha: asBeta.a + y, beta: asBeta.b + n - y })
      const { scale, li } = binomialIntegral(prior, y, n)
      return posteriorFromIntegral(li, scale)
    }
    case 'poisson': {
      const Y = data.counts.reduce((s, c) => s + c, 0)
      const T = data.exposures.reduce((s, t) => s + t, 0)
      if (prior.family === 'gamma') return toUnivariate({ family: 'gamma', shape: prior.shape + Y, rate: prior.rate + T })
      const { scale, li } = poissonIntegral(prior, Y, T)
      return posteriorFromIntegral(li, scale)
    }
  }
}
