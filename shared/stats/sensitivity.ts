// Fractional Bayes factors (O'Hagan 1995) and power-scaling sensitivity (Kallioinen, Paananen, Bürkner & Vehtari 2023),
// for every data model of the engine and for two-component robust mixtures; formulas in docs/methods/sensitivity.md.
import { logPdf, supportOf, toUnivariate } from './distributions'
import { EngineInputError } from './errors'
import {
  asStandardBeta, hintOnU, logSumExp, normalStats, posteriorFromIntegral, priorScale, sigmaMarginalFor, summarise, truncatedNormal, validateData,
  type Posterior, type PriorScale,
} from './evidence'
import { integrate, kronrod21FromValues, kronrod21Rule, LogIntegral, type Hint } from './quadrature'
import { lbeta, lgamma, logNormDiff, softplus } from './special'
import type { PilotData, PosteriorSummary, PriorDistribution } from './types'

/** A robust mixture prior: Σ wᵢ πᵢ(θ), weights summing to 1. */
export type PriorMixture = { family: 'mixture'; components: PriorDistribution[]; weights: number[] }

/** A candidate prior as the sensitivity tools take it: one distribution or a robust mixture. */
export type CandidatePrior = PriorDistribution | PriorMixture

export type FractionalBayesFactor = { logBF: number; b: number }

export type SensitivityDiagnosis = 'none' | 'prior-data-conflict' | 'weak-likelihood' | 'likelihood-dominated'

export type PowerScalingSensitivity = { prior: number; likelihood: number; diagnosis: SensitivityDiagnosis }

/** Kallioinen et al. (2023), §4: a sensitivity of 0.05 or more counts as sensitive. */
export const POWER_SCALING_THRESHOLD = 0.05

/** Kallioinen et al. (2023), §3.3: the derivative is the finite difference between α = 1/1.01 and α = 1.01. */
export const POWER_SCALING_STEP = 1.01

/**
 * Number of posterior draws whose expected extent bounds the cumulative distributions' integrals (Priorsmith's convention
 * for a draw-free computation: 4000 draws, the default of four chains of 1000 in the paper's software).
 */
export const CJS_DRAWS = 4000

const LN_2PI = Math.log(2 * Math.PI)

// ─── Data ────────────────────────────────────────────────────────────────────────────────────────

/** Minimal training sample size m₀ (O'Hagan 1995, §3): 1 for the one-parameter models, 2 for the normal with σ unknown. */
export function minimalTrainingSize(data: PilotData): number {
  return data.model === 'normal' ? 2 : 1
}

/** Number of observations n behind b = m₀/n: values (normal models), trials (binomial), counts (Poisson). */
export function observationCount(data: PilotData): number {
  switch (data.model) {
    case 'normal-known-sigma':
    case 'normal':
      return data.values.length
    case 'binomial':
      return data.trials
    case 'poisson':
      return data.counts.length
  }
}

/** O'Hagan's (1995, §3) default training fraction b = m₀/n; needs more observations than m₀. */
export function defaultTrainingFraction(data: PilotData): number {
  const n = observationCount(data)
  const m0 = minimalTrainingSize(data)
  if (!(n > m0))
    throw new EngineInputError('b', `The default training fraction m₀/n needs more than ${m0} observation${m0 > 1 ? 's' : ''}; give a training fraction between 0 and 1.`)
  return m0 / n
}

function requireTrainingFraction(b: number): void {
  if (typeof b !== 'number' || !Number.isFinite(b)) throw new EngineInputError('b', 'The training fraction b must be a finite number.')
  if (!(b > 0 && b < 1)) throw new EngineInputError('b', 'The training fraction b must be greater than 0 and less than 1.')
}

function requireAlpha(alpha: number): void {
  if (typeof alpha !== 'number' || !Number.isFinite(alpha)) throw new EngineInputError('alpha', 'The power α must be a finite number.')
  if (!(alpha > 0)) throw new EngineInputError('alpha', 'The power α must be greater than 0.')
}

function validateCandidate(prior: CandidatePrior, data: PilotData): void {
  if (prior && prior.family === 'mixture') {
    const { components, weights } = prior
    if (!Array.isArray(components) || components.length < 1 || !Array.isArray(weights) || weights.length !== components.length)
      throw new EngineInputError('prior', 'A mixture needs one weight per component.')
    weights.forEach((w) => {
      if (!(w > 0 && Number.isFinite(w))) throw new EngineInputError('prior', 'Mixture weights must be positive numbers.')
    })
    if (Math.abs(weights.reduce((s, w) => s + w, 0) - 1) > 1e-9) throw new EngineInputError('prior', 'Mixture weights must add up to 1.')
    components.forEach((c) => validateData(c, data))
    return
  }
  validateData(prior, data)
}

// ─── A prior on its unconstrained scale, its density on θ kept apart from the Jacobian ───────────

/** log |dθ/du| of priorScale's transform: 0 (real line), u (θ = eᵘ), ln(U − L) + ln σ(u) + ln σ(−u) (bounded). */
function logJacobian(prior: PriorDistribution): (u: number) => number {
  const s = supportOf(prior)
  if (s.lower === -Infinity) return () => 0
  if (s.upper === Infinity) return (u) => u
  const logWidth = Math.log(s.upper - s.lower)
  return (u) => logWidth - softplus(-u) - softplus(u)
}

type PriorOnU = { scale: PriorScale; logDensity(u: number): number; logJacobian(u: number): number }

function priorOnU(prior: CandidatePrior): PriorOnU {
  if (prior.family !== 'mixture') {
    const scale = priorScale(prior)
    const jac = logJacobian(prior)
    return { scale, logDensity: (u) => scale.logPrior(u) - jac(u), logJacobian: jac }
  }
  // The transform of the component whose support holds every other's.
  const widest = prior.components.find((c) => {
    const s = supportOf(c)
    return prior.components.every((o) => supportOf(o).lower >= s.lower && supportOf(o).upper <= s.upper)
  })
  if (!widest) throw new EngineInputError('prior', 'One mixture component must cover the ranges of all the others.')
  const scale = priorScale(widest)
  const logW = prior.weights.map(Math.log)
  return {
    scale,
    logDensity: (u) => logSumExp(prior.components.map((c, i) => logW[i] + logPdf(c, scale.theta(u)))),
    logJacobian: logJacobian(widest),
  }
}

// ─── Likelihood kernels raised to a power ────────────────────────────────────────────────────────

/** The likelihood raised to α without its θ-free constants, on the prior's u scale, with a hint for the quadrature. */
type Kernel = { logLik(u: number): number; hint: Hint | null }

function kernelFor(data: PilotData, scale: PriorScale, alpha: number): Kernel {
  switch (data.model) {
    case 'normal-known-sigma': {
      const st = normalStats(data.values)
      const c = (alpha * st.n) / (2 * data.sigma * data.sigma)
      return { logLik: (u) => -c * (st.mean - scale.theta(u)) ** 2, hint: hintOnU(scale, st.mean, data.sigma / Math.sqrt(alpha * st.n)) }
    }
    case 'binomial': {
      const { successes: y, trials: n } = data
      const pHat = (y + 0.5) / (n + 1)
      return {
        logLik: (u) => alpha * ((y > 0 ? y * Math.log(scale.theta(u)) : 0) + (n - y > 0 ? (n - y) * Math.log(scale.oneMinusTheta(u)) : 0)),
        hint: hintOnU(scale, pHat, Math.sqrt((pHat * (1 - pHat)) / (alpha * n))),
      }
    }
    case 'poisson': {
      const Y = data.counts.reduce((s, c) => s + c, 0)
      const T = data.exposures.reduce((s, t) => s + t, 0)
      return {
        logLik: (u) => {
          const lam = scale.theta(u)
          return alpha * ((Y > 0 ? Y * Math.log(lam) : 0) - lam * T)
        },
        hint: hintOnU(scale, (Y + 0.5) / T, Math.sqrt(Y + 0.5) / (T * Math.sqrt(alpha))),
      }
    }
    case 'normal': {
      const st = normalStats(data.values)
      // ∫ π(σ) σ^(−nα) exp(−α q / 2σ²) dσ is M for n·α observations at α·q, times (2π)^(nα/2).
      const marginal = sigmaMarginalFor(st, data.sigmaPrior, alpha)
      const constant = ((st.n * alpha) / 2) * LN_2PI
      const sigmaHat = Math.sqrt(st.ss / Math.max(1, st.n - 1))
      return {
        logLik: (u) => marginal.logM(alpha * (st.ss + st.n * (st.mean - scale.theta(u)) ** 2)) + constant,
        hint: hintOnU(scale, st.mean, sigmaHat / Math.sqrt(alpha * st.n)),
      }
    }
  }
}

// ─── The tempered integral Z = ∫ π(θ)^αp f(x | θ)^αl dθ and its normalised density ───────────────

type Tempered = { logZ: number; posterior: () => Posterior }

/**
 * Closed forms of Z and the posterior for the conjugate pairs (BDA3 §2.4–2.6 with the powers carried through: a normal
 * prior to the power α is normal with variance divided by α, a beta or gamma kernel keeps its family); null otherwise.
 */
function temperedClosedForm(prior: PriorDistribution, data: PilotData, ap: number, al: number): Tempered | null {
  if (data.model === 'normal-known-sigma' && (prior.family === 'normal' || prior.family === 'uniform')) {
    const st = normalStats(data.values)
    const v2 = (data.sigma * data.sigma) / (st.n * al)
    if (prior.family === 'normal') {
      const tau2 = prior.sigma * prior.sigma
      const v1 = tau2 / ap
      const v = (v1 * v2) / (v1 + v2)
      const m = v * (prior.mu / v1 + st.mean / v2)
      return {
        logZ: -(ap / 2) * Math.log(2 * Math.PI * tau2) + 0.5 * Math.log(2 * Math.PI * v) - (st.mean - prior.mu) ** 2 / (2 * (v1 + v2)),
        posterior: () => toUnivariate({ family: 'normal', mu: m, sigma: Math.sqrt(v) }),
      }
    }
    const s = Math.sqrt(v2)
    return {
      logZ: -ap * Math.log(prior.upper - prior.lower) + 0.5 * Math.log(2 * Math.PI * v2) + logNormDiff((prior.lower - st.mean) / s, (prior.upper - st.mean) / s),
      posterior: () => truncatedNormal(st.mean, s, prior.lower, prior.upper),
    }
  }
  if (data.model === 'binomial') {
    const beta = asStandardBeta(prior)
    if (!beta) return null
    const A = ap * (beta.a - 1) + 1 + al * data.successes
    const B = ap * (beta.b - 1) + 1 + al * (data.trials - data.successes)
    if (!(A > 0 && B > 0)) throw new EngineInputError('alpha', 'At this power the prior cannot be normalised with these data; choose a power nearer 1.')
    return { logZ: lbeta(A, B) - ap * lbeta(beta.a, beta.b), posterior: () => toUnivariate({ family: 'beta', alpha: A, beta: B }) }
  }
  if (data.model === 'poisson' && prior.family === 'gamma') {
    const Y = data.counts.reduce((s, c) => s + c, 0)
    const T = data.exposures.reduce((s, t) => s + t, 0)
    const A = ap * (prior.shape - 1) + 1 + al * Y
    const R = ap * prior.rate + al * T
    if (!(A > 0)) throw new EngineInputError('alpha', 'At this power the prior cannot be normalised with these data; choose a power nearer 1.')
    return {
      logZ: ap * (prior.shape * Math.log(prior.rate) - lgamma(prior.shape)) + lgamma(A) - A * Math.log(R),
      posterior: () => toUnivariate({ family: 'gamma', shape: A, rate: R }),
    }
  }
  return null
}

/** Z by adaptive Gauss–Kronrod quadrature in log space on the prior's u scale (the engine's LogIntegral). */
function temperedQuadrature(prior: CandidatePrior, data: PilotData, ap: number, al: number): Tempered {
  const p = priorOnU(prior)
  const kernel = kernelFor(data, p.scale, al)
  const h = (u: number): number => ap * p.logDensity(u) + p.logJacobian(u) + kernel.logLik(u)
  const priorHint = { center: p.scale.hint.center, scale: p.scale.hint.scale / Math.sqrt(ap) }
  const li = new LogIntegral(h, [priorHint, ...(kernel.hint ? [kernel.hint] : [])])
  if (!Number.isFinite(li.logValue)) throw new EngineInputError('alpha', 'At this power the prior cannot be normalised with these data; choose a power nearer 1.')
  return { logZ: li.logValue, posterior: () => posteriorFromIntegral(li, p.scale) }
}

function tempered(prior: CandidatePrior, data: PilotData, ap: number, al: number, options: { forceQuadrature?: boolean }): Tempered {
  if (!options.forceQuadrature && prior.family !== 'mixture') {
    const closed = temperedClosedForm(prior, data, ap, al)
    if (closed) return closed
  }
  return temperedQuadrature(prior, data, ap, al)
}

/** ln ∫ π(θ) f(x | θ)^a dθ without the likelihood's θ-free constants; a mixture's is the weighted sum of its components'. */
function logTemperedEvidence(prior: CandidatePrior, data: PilotData, a: number, options: { forceQuadrature?: boolean }): number {
  if (prior.family === 'mixture') return logSumExp(prior.components.map((c, i) => Math.log(prior.weights[i]) + tempered(c, data, 1, a, options).logZ))
  return tempered(prior, data, 1, a, options).logZ
}

// ─── Fractional Bayes factor ─────────────────────────────────────────────────────────────────────

/**
 * O'Hagan's (1995, JRSS B 57:99–138, §3) fractional Bayes factor of prior 1 against prior 2: B = q₁/q₂ with
 * qᵢ = mᵢ(x)/mᵢᵇ(x) and mᵢᵇ = ∫ πᵢ(θ) f(x | θ)ᵇ dθ; b defaults to m₀/n. Closed forms for conjugate pairs, adaptive
 * quadrature otherwise, all in log space (the likelihood's constants cancel between q₁ and q₂).
 */
export function fractionalBayesFactor(
  prior1: CandidatePrior, prior2: CandidatePrior, data: PilotData, b?: number, options: { forceQuadrature?: boolean } = {},
): FractionalBayesFactor {
  return fractionalBayesFactors([prior1], prior2, data, b, options)[0]
}

/** O'Hagan's (1995, §3) fractional Bayes factors of several priors against one reference prior, whose qᵢ is computed once. */
export function fractionalBayesFactors(
  priors: CandidatePrior[], reference: CandidatePrior, data: PilotData, b?: number, options: { forceQuadrature?: boolean } = {},
): FractionalBayesFactor[] {
  priors.forEach((p) => validateCandidate(p, data))
  validateCandidate(reference, data)
  const fraction = b === undefined ? defaultTrainingFraction(data) : b
  requireTrainingFraction(fraction)
  const logQ = (p: CandidatePrior): number => logTemperedEvidence(p, data, 1, options) - logTemperedEvidence(p, data, fraction, options)
  const logQReference = logQ(reference)
  return priors.map((p) => ({ logBF: logQ(p) - logQReference, b: fraction }))
}

// ─── Power scaling ───────────────────────────────────────────────────────────────────────────────

function scaledPosterior(prior: CandidatePrior, data: PilotData, alpha: number, target: 'prior' | 'likelihood', options: { forceQuadrature?: boolean }): Posterior {
  return target === 'prior' ? tempered(prior, data, alpha, 1, options).posterior() : tempered(prior, data, 1, alpha, options).posterior()
}

function requireTarget(target: unknown): asserts target is 'prior' | 'likelihood' {
  if (target !== 'prior' && target !== 'likelihood') throw new EngineInputError('target', 'Power-scale either the prior or the likelihood.')
}

/**
 * The posterior when the prior (π(θ)^α f(x | θ)) or the likelihood (π(θ) f(x | θ)^α) is raised to the power α
 * (Kallioinen et al. 2023, Statistics and Computing 34:57, §3.1); with σ unknown only the prior of the mean is scaled.
 */
export function powerScaledPosterior(
  prior: CandidatePrior, data: PilotData, alpha: number, target: 'prior' | 'likelihood' = 'prior', options: { forceQuadrature?: boolean } = {},
): PosteriorSummary {
  validateCandidate(prior, data)
  requireAlpha(alpha)
  requireTarget(target)
  return summarise(scaledPosterior(prior, data, alpha, target, options))
}

/** One point of the α-curve: the posterior mean and its 90 % interval (5 % and 95 % points) with the prior raised to α. */
export type PowerScaledPoint = { alpha: number; mean: number; q05: number; q95: number }

/** Posterior mean and 90 % interval as the prior is raised to each power α, π(θ)^α f(x | θ) (Kallioinen et al. 2023, §3.1). */
export function priorPowerCurve(prior: CandidatePrior, data: PilotData, alphas: number[], options: { forceQuadrature?: boolean } = {}): PowerScaledPoint[] {
  validateCandidate(prior, data)
  if (!Array.isArray(alphas) || alphas.length === 0) throw new EngineInputError('alpha', 'Give at least one power α.')
  alphas.forEach(requireAlpha)
  return alphas.map((alpha) => {
    const post = scaledPosterior(prior, data, alpha, 'prior', options)
    return { alpha, mean: post.mean(), q05: post.quantile(0.05), q95: post.quantile(0.95) }
  })
}

/** (1+r)ln(1+r) + (1−r)ln(1−r) without cancellation for small r (its series Σ r^2k / k(2k−1)). */
function jsTerm(r: number): number {
  const a = Math.abs(r)
  if (a < 1e-3) {
    const r2 = r * r
    return r2 * (1 + r2 * (1 / 6 + r2 / 15))
  }
  if (a >= 1) return 2 * Math.LN2
  return (1 + r) * Math.log1p(r) + (1 - r) * Math.log1p(-r)
}

/**
 * Cumulative Jensen–Shannon distance between two distributions given by their CDFs (Nguyen & Vreeken 2015, as normalised
 * by Kallioinen et al. 2023, §3.2): √((CJS(P‖Q) + CJS(Q‖P)) / ∫(P + Q)) over [lower, upper], the larger of the value for
 * the variable and for its negative (the latter uses the survival functions).
 */
export function cumulativeJsDistance(P: (x: number) => number, Q: (x: number) => number, lower: number, upper: number, breaks: number[] = []): number {
  const points = [lower, ...breaks.filter((x) => x > lower && x < upper).sort((a, b) => a - b), upper]
  const pAt = memo(P)
  const qAt = memo(Q)
  const distance = (F: (x: number) => number, G: (x: number) => number): number => {
    const bound = integrate((x) => F(x) + G(x), points, { epsrel: BOUND_TOLERANCE }).value
    if (!(bound > 0)) return 0
    const div = integrate((x) => divergenceTerm(F(x), G(x)), points, { epsrel: DIVERGENCE_TOLERANCE, epsabs: divergenceFloor(bound), limit: 400 }).value
    return Math.sqrt(Math.max(0, div / Math.LN2) / bound)
  }
  return Math.max(distance(pAt, qAt), distance((x) => 1 - pAt(x), (x) => 1 - qAt(x)))
}

/** Relative tolerance of the integral of F + G that bounds the distance. */
const BOUND_TOLERANCE = 1e-10
/** Relative tolerance of the divergence integral. */
const DIVERGENCE_TOLERANCE = 1e-9

/** Absolute tolerance 1e-14·bound of the divergence (in nats): D is then known to 1e-7 even when the two CDFs differ only by rounding. */
function divergenceFloor(bound: number): number {
  return 1e-14 * bound * Math.LN2
}

/** The divergence's integrand in nats, (s/2)·J((g − f)/s) with s = f + g, from the two CDFs' values f and g. */
function divergenceTerm(f: number, g: number): number {
  const s = f + g
  return s > 0 ? (s / 2) * jsTerm((g - f) / s) : 0
}

/**
 * cumulativeJsDistance from the two CDFs read at the Kronrod nodes of the panels between the points (kronrod21Rule order,
 * 21 values a panel): the same value when every one of its integrals passes integrate's test on those first panels; null
 * when one would be refined (the caller then takes cumulativeJsDistance).
 */
function jsDistanceOnPanels(p: Float64Array, q: Float64Array, panels: { a: number; b: number }[]): number | null {
  const fv1 = new Float64Array(10)
  const fv2 = new Float64Array(10)
  const integral = (term: (k: number) => number): { value: number; error: number } => {
    let value = 0
    let error = 0
    panels.forEach((panel, i) => {
      const at = 21 * i
      for (let j = 0; j < 10; j++) {
        fv1[j] = term(at + 2 * j + 1)
        fv2[j] = term(at + 2 * j + 2)
      }
      const r = kronrod21FromValues(term(at), fv1, fv2, 0.5 * (panel.b - panel.a))
      value += r.value
      error += r.error
    })
    return { value, error }
  }
  const distance = (f: (k: number) => number, g: (k: number) => number): number | null => {
    const bound = integral((k) => f(k) + g(k))
    if (!(bound.error <= BOUND_TOLERANCE * Math.abs(bound.value))) return null
    if (!(bound.value > 0)) return 0
    const div = integral((k) => divergenceTerm(f(k), g(k)))
    if (!(div.error <= Math.max(divergenceFloor(bound.value), DIVERGENCE_TOLERANCE * Math.abs(div.value)))) return null
    return Math.sqrt(Math.max(0, div.value / Math.LN2) / bound.value)
  }
  const direct = distance((k) => p[k], (k) => q[k])
  const complement = direct === null ? null : distance((k) => 1 - p[k], (k) => 1 - q[k])
  return direct === null || complement === null ? null : Math.max(direct, complement)
}

/** f with its values kept by argument (the CDFs are read at the same points by several integrals). */
function memo(f: (x: number) => number): (x: number) => number {
  const seen = new Map<number, number>()
  return (x) => {
    let v = seen.get(x)
    if (v === undefined) {
      v = f(x)
      seen.set(x, v)
    }
    return v
  }
}

/** The four power-scaled posteriors of the finite difference: the prior or the likelihood raised to 1/1.01 or 1.01. */
const SCALINGS = [
  { target: 'prior', alpha: 1 / POWER_SCALING_STEP },
  { target: 'prior', alpha: POWER_SCALING_STEP },
  { target: 'likelihood', alpha: 1 / POWER_SCALING_STEP },
  { target: 'likelihood', alpha: POWER_SCALING_STEP },
] as const

/**
 * The base posterior and the CDFs of the four power-scaled ones from one quadrature: the scaled integrands differ from the
 * base one by the factor π(θ)^(α−1) or f(x | θ)^(α−1), within 1 % of 1 in the power, so the base posterior's panels resolve
 * them as well (the same G10–K21 panels, each integrand with its own cumulative sums and total). Each CDF value then costs
 * one set of 21 evaluations of the prior and likelihood for all five posteriors.
 */
function scaledFamilyByQuadrature(prior: CandidatePrior, data: PilotData): { base: Posterior; cdfs: ((x: number) => number)[]; prepare(xs: number[]): void } {
  const p = priorOnU(prior)
  const kernel = kernelFor(data, p.scale, 1)
  // The likelihood at a power is its own function for σ unknown (σ is integrated after the power); a plain multiple otherwise.
  const scaledLik = data.model === 'normal' ? [kernelFor(data, p.scale, SCALINGS[2].alpha), kernelFor(data, p.scale, SCALINGS[3].alpha)] : null
  const h = (u: number): number => p.logDensity(u) + p.logJacobian(u) + kernel.logLik(u)
  const li = new LogIntegral(h, [p.scale.hint, ...(kernel.hint ? [kernel.hint] : [])])
  const count = SCALINGS.length + 1
  // The log integrands relative to the base one at its mode, so that each weight is of order 1 where the mass is.
  const terms = (u: number, out: Float64Array): void => {
    const d = p.logDensity(u)
    const base = d + p.logJacobian(u)
    const lik = kernel.logLik(u)
    out[0] = base + lik
    out[1] = out[0] + (SCALINGS[0].alpha - 1) * d
    out[2] = out[0] + (SCALINGS[1].alpha - 1) * d
    out[3] = base + (scaledLik ? scaledLik[0].logLik(u) : SCALINGS[2].alpha * lik)
    out[4] = base + (scaledLik ? scaledLik[1].logLik(u) : SCALINGS[3].alpha * lik)
  }
  const mode = li.panels.reduce((best, panel) => (panel.value > best.value ? panel : best)).a
  const offset = new Float64Array(count)
  terms(mode, offset)
  const logs = new Float64Array(count)
  /** Adds ∫ over [a, b] of each integrand, by the Kronrod rule there, to sums. */
  const addPanel = (a: number, b: number, sums: Float64Array): void => {
    const { x, w } = kronrod21Rule(a, b)
    for (let k = 0; k < 21; k++) {
      terms(x[k], logs)
      for (let i = 0; i < count; i++) {
        const v = Math.exp(logs[i] - offset[i])
        if (v > 0) sums[i] += w[k] * v
      }
    }
  }
  const panels = li.panels
  const cumulative = panels.map(() => new Float64Array(count))
  const totals = new Float64Array(count)
  panels.forEach((panel, k) => {
    cumulative[k].set(totals)
    addPanel(panel.a, panel.b, totals)
  })
  for (let i = 1; i < count; i++) {
    if (!(totals[i] > 0 && Number.isFinite(totals[i]))) throw new EngineInputError('alpha', 'At this power the prior cannot be normalised with these data; choose a power nearer 1.')
  }
  const values = new Map<number, Float64Array>()
  const cdfsAt = (t: number): Float64Array => {
    let v = values.get(t)
    if (v) return v
    v = new Float64Array(count)
    const u = p.scale.toU(t)
    if (Number.isNaN(u)) v.fill(t <= p.scale.theta(li.lower) ? 0 : 1)
    else if (u <= li.lower) v.fill(0)
    else if (u >= li.upper) v.fill(1)
    else {
      let lo = 0
      let hi = panels.length - 1
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1
        if (panels[mid].a <= u) lo = mid
        else hi = mid - 1
      }
      v.set(cumulative[lo])
      if (u > panels[lo].a) addPanel(panels[lo].a, u, v)
      for (let i = 0; i < count; i++) v[i] = Math.min(1, Math.max(0, v[i] / totals[i]))
    }
    values.set(t, v)
    return v
  }
  /** ∫ over [a, b] of each integrand by 5-point Gauss–Legendre (Abramowitz & Stegun 1964, 25.4.30), added to sums. */
  const addGap = (a: number, b: number, sums: Float64Array): void => {
    const centre = 0.5 * (a + b)
    const half = 0.5 * (b - a)
    for (let k = 0; k < 5; k++) {
      terms(centre + half * GAUSS5_X[k], logs)
      for (let i = 0; i < count; i++) {
        const v = Math.exp(logs[i] - offset[i])
        if (v > 0) sums[i] += half * GAUSS5_W[k] * v
      }
    }
  }
  /**
   * The CDFs at many points at once, in ascending order: each from the one before by 5-point Gauss–Legendre over the gap
   * when the gap lies in one panel and spans at most a quarter of it (the panel's own Kronrod rule resolved the integrands
   * across four times that width), otherwise as at a single point.
   */
  const prepare = (xs: number[]): void => {
    const sorted = [...new Set(xs)].filter((x) => !values.has(x)).sort((a, b) => a - b)
    const running = new Float64Array(count)
    let previous = NaN
    let panel = -1
    for (const t of sorted) {
      const u = p.scale.toU(t)
      if (!(u > li.lower && u < li.upper)) {
        cdfsAt(t)
        panel = -1
        continue
      }
      let k = Math.max(0, panel)
      while (k + 1 < panels.length && panels[k + 1].a <= u) k++
      const width = panels[k].b - panels[k].a
      const from = k === panel ? previous : panels[k].a
      if (k !== panel) running.set(cumulative[k])
      if (u - from <= 0.25 * width) addGap(from, u, running)
      else {
        running.set(cumulative[k])
        if (u > panels[k].a) addPanel(panels[k].a, u, running)
      }
      previous = u
      panel = k
      const v = new Float64Array(count)
      for (let i = 0; i < count; i++) v[i] = Math.min(1, Math.max(0, running[i] / totals[i]))
      values.set(t, v)
    }
  }
  return { base: posteriorFromIntegral(li, p.scale), cdfs: Array.from({ length: count }, (_, i) => (x: number) => cdfsAt(x)[i]), prepare }
}

/** Nodes and weights of 5-point Gauss–Legendre on [−1, 1] (Abramowitz & Stegun 1964, 25.4.30). */
const GAUSS5_X = [-0.906179845938664, -0.5384693101056831, 0, 0.5384693101056831, 0.906179845938664]
const GAUSS5_W = [0.2369268850561891, 0.4786286704993665, 0.5688888888888889, 0.4786286704993665, 0.2369268850561891]

/**
 * Power-scaling sensitivity of the posterior (Kallioinen et al. 2023, §3.3): for the prior and for the likelihood, the
 * derivative of the cumulative Jensen–Shannon distance between the base and the power-scaled posterior with respect to
 * log₂ α at α = 1, by the finite difference (D(1/1.01) + D(1.01)) / (2 log₂ 1.01); 0.05 or more counts as sensitive.
 * The diagnosis reads the pair as docs/methods/sensitivity.md explains. Closed forms where the prior is conjugate,
 * otherwise the five posteriors from one quadrature (scaledFamilyByQuadrature).
 */
export function powerScalingSensitivity(prior: CandidatePrior, data: PilotData, options: { forceQuadrature?: boolean } = {}): PowerScalingSensitivity {
  validateCandidate(prior, data)
  if (data.model === 'normal' && data.values.length < 2) throw new EngineInputError('values', 'With σ unknown, power scaling needs at least 2 observations.')
  const closed = !options.forceQuadrature && prior.family !== 'mixture' && temperedClosedForm(prior, data, 1, 1) !== null
  const family = closed ? null : scaledFamilyByQuadrature(prior, data)
  const base = family ? family.base : scaledPosterior(prior, data, 1, 'prior', options)
  const tail = 1 / (CJS_DRAWS + 1)
  const lower = base.quantile(tail)
  const upper = base.quantile(1 - tail)
  const breaks = [0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99].map((p) => base.quantile(p))
  const baseCdf = family ? family.cdfs[0] : memo((x) => base.cdf(x))
  // The distances' first Kronrod panels: their points read all at once, their integrals taken from those values when they
  // converge there (they mostly do), otherwise by cumulativeJsDistance.
  const ends = [lower, ...breaks.filter((x) => x > lower && x < upper).sort((a, b) => a - b), upper]
  const panels = ends.slice(1).map((b, i) => ({ a: ends[i], b })).filter((panel) => panel.b > panel.a)
  const nodes = panels.flatMap((panel) => Array.from(kronrod21Rule(panel.a, panel.b).x))
  family?.prepare(nodes)
  const baseValues = family ? Float64Array.from(nodes, baseCdf) : null
  const distances = SCALINGS.map(({ target, alpha }, i) => {
    const scaled = family ? null : scaledPosterior(prior, data, alpha, target, options)
    const q = family ? family.cdfs[i + 1] : (x: number) => scaled!.cdf(x)
    const onPanels = baseValues ? jsDistanceOnPanels(baseValues, Float64Array.from(nodes, q), panels) : null
    return onPanels ?? cumulativeJsDistance(baseCdf, q, lower, upper, breaks)
  })
  const derivative = (d: number[]): number => (d[0] + d[1]) / (2 * Math.log2(POWER_SCALING_STEP))
  const p = derivative(distances.slice(0, 2))
  const l = derivative(distances.slice(2))
  return { prior: p, likelihood: l, diagnosis: diagnose(p, l) }
}

/** The diagnoses in plain words, for screens and the record (docs/methods/sensitivity.md). */
export const DIAGNOSIS_WORDS: Record<SensitivityDiagnosis, string> = {
  'prior-data-conflict': 'Prior and data pull apart: the result moves when either is given more weight.',
  'weak-likelihood': 'The data say little here: the result follows the prior.',
  'likelihood-dominated': 'The data drive the result; the prior matters little.',
  none: 'The result moves little whichever side is given more weight.',
}

/** Reading of the two sensitivities (Kallioinen et al. 2023, §4): both → prior–data conflict; prior only → weak likelihood. */
export function diagnose(priorSensitivity: number, likelihoodSensitivity: number): SensitivityDiagnosis {
  const p = priorSensitivity >= POWER_SCALING_THRESHOLD
  const l = likelihoodSensitivity >= POWER_SCALING_THRESHOLD
  if (p && l) return 'prior-data-conflict'
  if (p) return 'weak-likelihood'
  if (l) return 'likelihood-dominated'
  return 'none'
}

