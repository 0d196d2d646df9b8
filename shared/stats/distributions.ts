import jStat from 'jstat'
import { EngineInputError, requireFinite, requirePositive } from './errors'
import {
  betaPQ,
  erf,
  erfc,
  gammaPQ,
  lbeta,
  lgammaDiff,
  logBetaPQ,
  logErfcNonNegative,
  logGammaPQ,
  logGammaPrefactor,
  log1mExp,
  logNormCdf,
  logNormPdf,
  normCdf,
  normPdf,
  studentTLogTailLargeDf,
} from './special'
import type { PriorDistribution, Univariate } from './types'

const LN_PI = Math.log(Math.PI)

/**
 * Throws EngineInputError unless d is a distribution one can compute with: every parameter finite and in range, and its
 * 5 % and 95 % points finite and apart in floating point (common practice: a spread lost to rounding, such as
 * Normal(1e308, 1e13) or Lognormal(700, 1e-300), is a point, and every later integral or fit of it fails).
 */
export function validateDistribution(d: PriorDistribution, field = 'distribution'): void {
  validateParameters(d, field)
  const q05 = quantile(d, 0.05)
  const q95 = quantile(d, 0.95)
  if (!Number.isFinite(q05) || !Number.isFinite(q95) || !(q95 > q05)) {
    throw new EngineInputError(field, 'This distribution is too narrow for its location, or too far out, to compute with: its 5 % and 95 % points cannot be told apart or are not finite. Rescale the quantity (for example to thousands) or widen it.')
  }
}

/** Throws EngineInputError unless every parameter of d is finite and in range (every public entry point calls it first). */
export function validateParameters(d: PriorDistribution, field: string): void {
  if (d === null || typeof d !== 'object') throw new EngineInputError(field, 'A distribution is required.')
  switch (d.family) {
    case 'normal':
      requireFinite(d.mu, field, 'The normal mean')
      requirePositive(d.sigma, field, 'The normal sd')
      return
    case 'student-t':
      requireFinite(d.mu, field, 'The t location')
      requirePositive(d.sigma, field, 'The t scale')
      requirePositive(d.df, field, 'The t degrees of freedom')
      return
    case 'lognormal':
      requireFinite(d.meanlog, field, 'The lognormal meanlog')
      requirePositive(d.sdlog, field, 'The lognormal sdlog')
      return
    case 'gamma':
      requirePositive(d.shape, field, 'The gamma shape')
      requirePositive(d.rate, field, 'The gamma rate')
      return
    case 'beta':
      requirePositive(d.alpha, field, 'The beta alpha')
      requirePositive(d.beta, field, 'The beta beta')
      return
    case 'scaled-beta':
      requirePositive(d.alpha, field, 'The beta alpha')
      requirePositive(d.beta, field, 'The beta beta')
      requireFinite(d.lower, field, 'The lower bound')
      requireFinite(d.upper, field, 'The upper bound')
      if (!(d.lower < d.upper)) throw new EngineInputError(field, 'The lower bound must be below the upper bound.')
      return
    case 'uniform':
      requireFinite(d.lower, field, 'The lower bound')
      requireFinite(d.upper, field, 'The upper bound')
      if (!(d.lower < d.upper)) throw new EngineInputError(field, 'The lower bound must be below the upper bound.')
      return
    case 'half-normal':
      requirePositive(d.scale, field, 'The half-normal scale')
      return
    default:
      throw new EngineInputError(field, `Unknown distribution family "${(d as { family: unknown }).family}".`)
  }
}

/** Lower and upper end of the support. */
export function supportOf(d: PriorDistribution): { lower: number; upper: number } {
  switch (d.family) {
    case 'normal':
    case 'student-t':
      return { lower: -Infinity, upper: Infinity }
    case 'lognormal':
    case 'gamma':
    case 'half-normal':
      return { lower: 0, upper: Infinity }
    case 'beta':
      return { lower: 0, upper: 1 }
    case 'scaled-beta':
    case 'uniform':
      return { lower: d.lower, upper: d.upper }
  }
}

/**
 * Student-t CDF of the standardised value t with ν df: ½ I_{ν/(ν+t²)}(ν/2, ½) in the lower tail (Abramowitz & Stegun
 * 26.7.1); from ν = 1e5 on by the normal-integral expansion of studentTLogTailLargeDf, where the continued fraction
 * would need about √ν terms.
 */
export function studentTCdf(t: number, df: number): number {
  if (Number.isNaN(t)) return NaN
  if (t === -Infinity) return 0
  if (t === Infinity) return 1
  if (df >= LARGE_DF && Math.abs(t) <= FAR_T) {
    const tail = Math.exp(studentTLogTailLargeDf(Math.abs(t), df))
    return t < 0 ? tail : 1 - tail
  }
  if (Math.abs(t) > FAR_T) {
    const tail = Math.exp(studentTLogFarTail(Math.abs(t), df))
    return t < 0 ? tail : 1 - tail
  }
  const t2 = t * t
  const tail = 0.5 * betaPQ(df / (df + t2), df / 2, 0.5, t2 / (df + t2)).p
  return t < 0 ? tail : 1 - tail
}

/** From this df on the Student-t tails use the large-df expansion (studentTLogTailLargeDf). */
const LARGE_DF = 1e5

/** Beyond |t| = 1e150, t² overflows for small df: the tails and density use ln|t| instead. */
const FAR_T = 1e150

/**
 * ln P(T > q) for q > FAR_T: ½ I_x(ν/2, ½) with x = ν/(ν + q²) below 1e-300 is ½ x^(ν/2) / ((ν/2) B(ν/2, ½)) to double
 * precision (the leading term of the incomplete beta series, Abramowitz & Stegun 26.5.4), with ln x = ln ν − 2 ln q.
 */
function studentTLogFarTail(q: number, df: number): number {
  const a = df / 2
  return -Math.LN2 + a * (Math.log(df) - 2 * Math.log(q)) - Math.log(a) - lbeta(a, 0.5)
}

/**
 * ln of the Student-t density of the standardised value t (Johnson, Kotz & Balakrishnan 1995, ch. 28); ln(1 + t²/ν) through
 * ln|t| when t² would overflow, and ln Γ((ν+1)/2) − ln Γ(ν/2) through lgammaDiff so that it does not cancel at large ν.
 */
export function studentTLogPdf(t: number, df: number): number {
  const at = Math.abs(t)
  const log1pT2 = at > FAR_T ? 2 * Math.log(at) - Math.log(df) : Math.log1p((t * t) / df)
  return lgammaDiff(df / 2, 0.5) - 0.5 * (Math.log(df) + LN_PI) - ((df + 1) / 2) * log1pT2
}

type Tails = { lower: (x: number) => number; upper: (x: number) => number; density: (x: number) => number }
type SolveScale = 'linear' | 'log' | 'logit'

const sigmoid = (v: number): number => 1 / (1 + Math.exp(-v))

/**
 * Refines a starting value x0 to the p-quantile by safeguarded Newton steps on ln(tail) (the lower tail for p ≤ ½,
 * the upper tail otherwise, so 1 − p is never formed), taken on a log or logit scale for bounded supports.
 */
export function refineQuantile(p: number, x0: number, tails: Tails, scale: SolveScale): number {
  const useUpper = p > 0.5
  const logTarget = useUpper ? Math.log1p(-p) : Math.log(p)
  const toX = scale === 'log' ? Math.exp : scale === 'logit' ? sigmoid : (v: number) => v
  let v: number
  if (scale === 'log') v = x0 > 0 && Number.isFinite(x0) ? Math.log(x0) : 0
  else if (scale === 'logit') v = x0 > 0 && x0 < 1 ? Math.log(x0 / (1 - x0)) : 0
  else v = Number.isFinite(x0) ? x0 : 0
  let a = -Infinity
  let b = Infinity
  let x = toX(v)
  for (let iter = 0; iter < 300; iter++) {
    x = toX(v)
    const t = useUpper ? tails.upper(x) : tails.lower(x)
    const f = useUpper ? logTarget - Math.log(t) : Math.log(t) - logTarget
    if (f === 0) return x
    if (f < 0) a = v
    else b = v
    const dxdv = scale === 'log' ? x : scale === 'logit' ? x * (1 - x) : 1
    let next = v - (f * t) / (tails.density(x) * dxdv)
    const tol = scale === 'linear' ? 4e-16 * Math.abs(v) : 4e-16
    if (Math.abs(next - v) <= tol) return toX(next)
    if (!(next > a && next < b) || !Number.isFinite(next)) {
      if (Number.isFinite(a) && Number.isFinite(b)) next = 0.5 * (a + b)
      else if (Number.isFinite(a)) next = a + Math.max(1, 2 * Math.abs(a))
      else next = b - Math.max(1, 2 * Math.abs(b))
    }
    if (next === a || next === b) return toX(next)
    v = next
  }
  return x
}

/** Standard normal quantile: jstat's erfcinv start, refined by Newton on ln Φ (accurate to ~1e-16 relative). */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return NaN
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  if (p === 0.5) return 0
  if (p > 0.5) return -normalQuantile(1 - p)
  const x0 = jStat.normal.inv(p, 0, 1)
  let x = Number.isFinite(x0) ? x0 : -Math.sqrt(-2 * Math.log(p))
  for (let i = 0; i < 8; i++) {
    const lc = logNormCdf(x)
    const step = (lc - Math.log(p)) * Math.exp(lc - logNormPdf(x))
    x -= step
    if (Math.abs(step) <= 1e-16 * Math.abs(x)) break
  }
  return x
}

/** Student-t standardised quantile: jstat's start (≈1e-8 off) refined on the accurate CDF. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p >= 0 && p <= 1)) return NaN
  if (p === 0) return -Infinity
  if (p === 1) return Infinity
  if (p === 0.5) return 0
  if (p > 0.5) return -studentTQuantile(1 - p, df)
  // Deep in a heavy tail the quantile is far out (about 1e200 at p = 1e-10 for ν = 0.05): solve for w = −1/t on a log
  // scale, starting from the leading term of the tail (see studentTLogFarTail).
  const a = df / 2
  const logQ0 = (a * Math.log(df) - Math.LN2 - Math.log(a) - lbeta(a, 0.5) - Math.log(p)) / df
  if (logQ0 > Math.log(1e4)) {
    const far: Tails = {
      lower: (w) => studentTCdf(-1 / w, df),
      upper: (w) => studentTCdf(1 / w, df),
      density: (w) => Math.exp(studentTLogPdf(1 / w, df) - 2 * Math.log(w)),
    }
    return -1 / refineQuantile(p, Math.exp(-logQ0), far, 'log')
  }
  // at large df the start inverts z² = ν ln(1 + t²/ν) for the normal quantile z (the leading term of studentTLogTailLargeDf)
  const z = normalQuantile(p)
  const x0 = df >= LARGE_DF ? -Math.sqrt(df * Math.expm1((z * z) / df)) : jStat.studentt.inv(p, df)
  const tails: Tails = {
    lower: (t) => studentTCdf(t, df),
    upper: (t) => studentTCdf(-t, df),
    density: (t) => Math.exp(studentTLogPdf(t, df)),
  }
  return refineQuantile(p, x0, tails, 'linear')
}

/** Natural-log density; −Infinity outside the support. */
export function logPdf(d: PriorDistribution, x: number): number {
  return logDensityFunction(d)(x)
}

/**
 * The natural-log density of d as a function of x, with the parameters validated and the per-family constants computed
 * once, for callers that evaluate one distribution many times (pools, quadrature); the same arithmetic as logPdf.
 */
export function logDensityFunction(d: PriorDistribution): (x: number) => number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal': {
      const { mu, sigma } = d
      const logSigma = Math.log(sigma)
      return (x) => logNormPdf((x - mu) / sigma) - logSigma
    }
    case 'student-t': {
      const { mu, sigma, df } = d
      const logSigma = Math.log(sigma)
      return (x) => studentTLogPdf((x - mu) / sigma, df) - logSigma
    }
    case 'lognormal': {
      const { meanlog, sdlog } = d
      const logSd = Math.log(sdlog)
      return (x) => (x > 0 ? logNormPdf((Math.log(x) - meanlog) / sdlog) - logSd - Math.log(x) : -Infinity)
    }
    case 'gamma': {
      const { shape, rate } = d
      const atZero = shape === 1 ? Math.log(rate) : -Infinity
      return (x) => (x > 0 ? logGammaPrefactor(shape, rate * x) - Math.log(x) : x === 0 ? atZero : -Infinity)
    }
    case 'beta': {
      const { alpha, beta } = d
      const lb = lbeta(alpha, beta)
      return (x) => betaLogKernel(x, 1 - x, alpha, beta) - lb
    }
    case 'scaled-beta': {
      const { alpha, beta, lower, upper } = d
      const w = upper - lower
      const lb = lbeta(alpha, beta)
      const logW = Math.log(w)
      return (x) => betaLogKernel((x - lower) / w, (upper - x) / w, alpha, beta) - lb - logW
    }
    case 'uniform': {
      const { lower, upper } = d
      const logDensity = -Math.log(upper - lower)
      return (x) => (x >= lower && x <= upper ? logDensity : -Infinity)
    }
    case 'half-normal': {
      const scale = d.scale
      const logScale = Math.log(scale)
      return (x) => (x >= 0 ? Math.LN2 + logNormPdf(x / scale) - logScale : -Infinity)
    }
  }
}

/** ln of the beta density's kernel y^(a−1) (1−y)^(b−1), given y and 1 − y; −Infinity outside [0, 1]. */
function betaLogKernel(y: number, ycomp: number, a: number, b: number): number {
  if (!(y >= 0 && ycomp >= 0)) return -Infinity
  const la = a === 1 ? 0 : (a - 1) * Math.log(y)
  const lb = b === 1 ? 0 : (b - 1) * Math.log(ycomp)
  return la + lb
}

/** Density f(x) (Johnson, Kotz & Balakrishnan 1994–95, the family's chapter). */
export function pdf(d: PriorDistribution, x: number): number {
  validateParameters(d, 'distribution')
  return Math.exp(logPdf(d, x))
}

/** Lower-tail probability P(X ≤ x). */
export function cdf(d: PriorDistribution, x: number): number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal':
      return normCdf((x - d.mu) / d.sigma)
    case 'student-t':
      return studentTCdf((x - d.mu) / d.sigma, d.df)
    case 'lognormal':
      return x > 0 ? normCdf((Math.log(x) - d.meanlog) / d.sdlog) : 0
    case 'gamma':
      return x > 0 ? gammaPQ(d.shape, d.rate * x).p : 0
    case 'beta':
      return betaPQ(clamp01(x), d.alpha, d.beta, clamp01(1 - x)).p
    case 'scaled-beta': {
      const w = d.upper - d.lower
      return betaPQ(clamp01((x - d.lower) / w), d.alpha, d.beta, clamp01((d.upper - x) / w)).p
    }
    case 'uniform':
      return x <= d.lower ? 0 : x >= d.upper ? 1 : (x - d.lower) / (d.upper - d.lower)
    case 'half-normal':
      return x > 0 ? erf(x / (d.scale * Math.SQRT2)) : 0
  }
}

/** Upper-tail probability P(X > x), computed directly (not as 1 − cdf). */
export function sf(d: PriorDistribution, x: number): number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal':
      return normCdf((d.mu - x) / d.sigma)
    case 'student-t':
      return studentTCdf((d.mu - x) / d.sigma, d.df)
    case 'lognormal':
      return x > 0 ? normCdf((d.meanlog - Math.log(x)) / d.sdlog) : 1
    case 'gamma':
      return x > 0 ? gammaPQ(d.shape, d.rate * x).q : 1
    case 'beta':
      return betaPQ(clamp01(x), d.alpha, d.beta, clamp01(1 - x)).q
    case 'scaled-beta': {
      const w = d.upper - d.lower
      return betaPQ(clamp01((x - d.lower) / w), d.alpha, d.beta, clamp01((d.upper - x) / w)).q
    }
    case 'uniform':
      return x <= d.lower ? 1 : x >= d.upper ? 0 : (d.upper - x) / (d.upper - d.lower)
    case 'half-normal':
      return x > 0 ? erfc(x / (d.scale * Math.SQRT2)) : 1
  }
}

/**
 * ln P(X ≤ x) and ln P(X > x), each finite where the probability underflows (the smaller tail is computed in logs and the
 * other as ln(1 − e^tail)): the same special functions as cdf and sf.
 */
export function logCdfSf(d: PriorDistribution, x: number): { logCdf: number; logSf: number } {
  validateParameters(d, 'distribution')
  const fromLower = (logLower: number) => ({ logCdf: logLower, logSf: log1mExp(logLower) })
  const fromUpper = (logUpper: number) => ({ logCdf: log1mExp(logUpper), logSf: logUpper })
  const normal = (z: number) => (z <= 0 ? fromLower(logNormCdf(z)) : fromUpper(logNormCdf(-z)))
  const unit = (u: number, uc: number, a: number, b: number) => {
    if (!(u > 0)) return { logCdf: -Infinity, logSf: 0 }
    if (!(uc > 0)) return { logCdf: 0, logSf: -Infinity }
    const r = logBetaPQ(u, a, b, uc)
    return { logCdf: r.logP, logSf: r.logQ }
  }
  switch (d.family) {
    case 'normal':
      return normal((x - d.mu) / d.sigma)
    case 'student-t': {
      const t = (x - d.mu) / d.sigma
      const logTail = studentTLogTail(Math.abs(t), d.df)
      return t <= 0 ? fromLower(logTail) : fromUpper(logTail)
    }
    case 'lognormal':
      return x > 0 ? normal((Math.log(x) - d.meanlog) / d.sdlog) : { logCdf: -Infinity, logSf: 0 }
    case 'gamma': {
      if (!(x > 0)) return { logCdf: -Infinity, logSf: 0 }
      const r = logGammaPQ(d.shape, d.rate * x)
      return { logCdf: r.logP, logSf: r.logQ }
    }
    case 'beta':
      return unit(x, 1 - x, d.alpha, d.beta)
    case 'scaled-beta': {
      const w = d.upper - d.lower
      return unit((x - d.lower) / w, (d.upper - x) / w, d.alpha, d.beta)
    }
    case 'uniform': {
      const w = d.upper - d.lower
      return unit((x - d.lower) / w, (d.upper - x) / w, 1, 1)
    }
    case 'half-normal':
      return x > 0 ? fromUpper(logErfcNonNegative(x / (d.scale * Math.SQRT2))) : { logCdf: -Infinity, logSf: 0 }
  }
}

/** ln P(T > t) for t ≥ 0 with ν df: the large-df expansion, the far-tail term past 1e150, else ln(½ I_{ν/(ν+t²)}(ν/2, ½)). */
function studentTLogTail(t: number, df: number): number {
  if (t > FAR_T) return studentTLogFarTail(t, df)
  if (df >= LARGE_DF) return studentTLogTailLargeDf(t, df)
  const t2 = t * t
  return -Math.LN2 + logBetaPQ(df / (df + t2), df / 2, 0.5, t2 / (df + t2)).logP
}

function clamp01(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v
}

/** Quantile F⁻¹(p): closed forms where they exist, otherwise jstat's inverse refined by Newton steps on the accurate CDF. */
export function quantile(d: PriorDistribution, p: number): number {
  return quantileFunction(d)(p)
}

/**
 * The quantile function of d (as quantile), with the parameters validated and the per-family constants and tail functions
 * made once, for callers that invert one distribution many times (joint draws, pools): the same arithmetic as quantile.
 */
export function quantileFunction(d: PriorDistribution): (p: number) => number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal': {
      const { mu, sigma } = d
      return (p) => (p >= 0 && p <= 1 ? mu + sigma * normalQuantile(p) : NaN)
    }
    case 'student-t': {
      const { mu, sigma, df } = d
      return (p) => (p >= 0 && p <= 1 ? mu + sigma * studentTQuantile(p, df) : NaN)
    }
    case 'lognormal': {
      const { meanlog, sdlog } = d
      return (p) => (p >= 0 && p <= 1 ? Math.exp(meanlog + sdlog * normalQuantile(p)) : NaN)
    }
    case 'uniform': {
      const { lower, upper } = d
      return (p) => (p >= 0 && p <= 1 ? lower + p * (upper - lower) : NaN)
    }
    case 'gamma': {
      const { shape: a, rate } = d
      const tails: Tails = {
        lower: (y) => gammaPQ(a, y).p,
        upper: (y) => gammaPQ(a, y).q,
        density: (y) => Math.exp(logGammaPrefactor(a, y) - Math.log(y)),
      }
      return (p) => (!(p >= 0 && p <= 1) ? NaN : p === 0 ? 0 : p === 1 ? Infinity : refineQuantile(p, gammaQuantileStart(p, a), tails, 'log') / rate)
    }
    case 'beta': {
      const unit = betaQuantileFunction(d.alpha, d.beta)
      return (p) => (p >= 0 && p <= 1 ? unit(p) : NaN)
    }
    case 'scaled-beta': {
      const { lower, upper } = d
      const unit = betaQuantileFunction(d.alpha, d.beta)
      return (p) => (p >= 0 && p <= 1 ? lower + (upper - lower) * unit(p) : NaN)
    }
    case 'half-normal': {
      const s = d.scale
      const tails: Tails = {
        lower: (x) => erf(x / (s * Math.SQRT2)),
        upper: (x) => erfc(x / (s * Math.SQRT2)),
        density: (x) => (2 * normPdf(x / s)) / s,
      }
      return (p) => (!(p >= 0 && p <= 1) ? NaN : p === 0 ? 0 : p === 1 ? Infinity : refineQuantile(p, -s * normalQuantile((1 - p) / 2), tails, 'log'))
    }
  }
}

/**
 * Starting value for the gamma quantile: at shape ≥ 100 the Wilson–Hilferty cube a(1 − 1/(9a) + z/(3√a))³ (Johnson, Kotz &
 * Balakrishnan 1994, ch. 17/18), which jstat's own search takes seconds to reach at shape 1e12; otherwise jstat's inverse.
 */
function gammaQuantileStart(p: number, a: number): number {
  if (a >= 100) {
    const base = 1 - 1 / (9 * a) + normalQuantile(p) / (3 * Math.sqrt(a))
    if (base > 0) return a * base * base * base
  }
  return jStat.gamma.inv(p, a, 1)
}

/** The Beta(a, b) quantile for p in [0, 1]: jstat's inverse refined on the logit scale, with ln B(a, b) computed once. */
function betaQuantileFunction(a: number, b: number): (p: number) => number {
  const lb = lbeta(a, b)
  const tails: Tails = {
    lower: (y) => betaPQ(y, a, b).p,
    upper: (y) => betaPQ(y, a, b).q,
    density: (y) => Math.exp(betaLogKernel(y, 1 - y, a, b) - lb),
  }
  return (p) => (p === 0 ? 0 : p === 1 ? 1 : refineQuantile(p, jStat.beta.inv(p, a, b), tails, 'logit'))
}

/** Mean (NaN where it does not exist, e.g. Student-t with df ≤ 1). */
export function mean(d: PriorDistribution): number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal':
      return d.mu
    case 'student-t':
      return d.df > 1 ? d.mu : NaN
    case 'lognormal':
      return Math.exp(d.meanlog + (d.sdlog * d.sdlog) / 2)
    case 'gamma':
      return d.shape / d.rate
    case 'beta':
      return d.alpha / (d.alpha + d.beta)
    case 'scaled-beta':
      return d.lower + ((d.upper - d.lower) * d.alpha) / (d.alpha + d.beta)
    case 'uniform':
      return (d.lower + d.upper) / 2
    case 'half-normal':
      return d.scale * Math.sqrt(2 / Math.PI)
  }
}

/** Standard deviation (Infinity for Student-t with 1 < df ≤ 2, NaN for df ≤ 1). */
export function sd(d: PriorDistribution): number {
  validateParameters(d, 'distribution')
  switch (d.family) {
    case 'normal':
      return d.sigma
    case 'student-t':
      return d.df > 2 ? d.sigma * Math.sqrt(d.df / (d.df - 2)) : d.df > 1 ? Infinity : NaN
    case 'lognormal': {
      const s2 = d.sdlog * d.sdlog
      return Math.exp(d.meanlog + s2 / 2) * Math.sqrt(Math.expm1(s2))
    }
    case 'gamma':
      return Math.sqrt(d.shape) / d.rate
    case 'beta':
    case 'scaled-beta': {
      const { alpha: a, beta: b } = d
      const w = d.family === 'beta' ? 1 : d.upper - d.lower
      return (w * Math.sqrt((a * b) / (a + b + 1))) / (a + b)
    }
    case 'uniform':
      return (d.upper - d.lower) / Math.sqrt(12)
    case 'half-normal':
      return d.scale * Math.sqrt(1 - 2 / Math.PI)
  }
}

/** Median, i.e. quantile(d, ½). */
export function median(d: PriorDistribution): number {
  return quantile(d, 0.5)
}

/** Wraps a distribution as a Univariate (function-valued) object. */
export function toUnivariate(d: PriorDistribution): Univariate {
  validateParameters(d, 'distribution')
  return {
    pdf: (x) => pdf(d, x),
    cdf: (x) => cdf(d, x),
    quantile: (p) => quantile(d, p),
    mean: () => mean(d),
    sd: () => sd(d),
  }
}
