import { levenbergMarquardt } from 'ml-levenberg-marquardt'
import { cdf, normalQuantile, studentTCdf, studentTLogPdf, studentTQuantile, validateDistribution } from './distributions'
import { EngineInputError } from './errors'
import { requireInside, supportBounds, validatePoints, validateSupport } from './points'
import { gammaPShapeDerivatives } from './gamma-shape'
import { betaPQ, digamma, gammaPQ, lbeta, lgamma, normCdf, normPdf } from './special'
import type { Distribution, Family, FitResult, Point, Support } from './types'

/**
 * `lower`/`upper`: the ends of a scaled beta, or fixed ends of a uniform; `df`: Student-t degrees of freedom;
 * `weights`: one positive weight per point in the criterion Σ wᵢ (F(xᵢ) − pᵢ)² (all 1 when absent).
 */
export type FitOptions = { lower?: number; upper?: number; df?: number; weights?: readonly number[] }

/** Degrees of freedom used for Student-t fits when none is given. */
export const DEFAULT_T_DF = 3

/** The families fitted by the least-squares search (the uniform is solved exactly). */
type SmoothFamily = Exclude<Family, 'uniform'>

const FAMILIES: readonly Family[] = ['normal', 'student-t', 'lognormal', 'gamma', 'beta', 'scaled-beta', 'uniform']
/**
 * The search box for logarithmic parameters: e^±700 is still a finite double. It only keeps the arithmetic finite; the
 * search runs in standardised units (standardUnit), where no sensible fit comes near it.
 */
const LOG_RANGE = 700
/** Levenberg–Marquardt iterations from each starting point before the Newton polish takes over. */
const LM_ITERATIONS = 4
/** A start through two of the points is added when its SSE is below this fraction of the best regular start's SSE. */
const PAIR_START_GAIN = 1

/**
 * A CDF model on an unconstrained parameter vector θ: normal/t [μ, ln σ], lognormal [meanlog, ln sdlog],
 * gamma [ln shape, ln rate], beta and scaled beta [ln α, ln β].
 */
interface CdfModel {
  readonly nParams: number
  /** Which parameters are logarithms (kept within ±LOG_RANGE during the search). */
  readonly logParams: readonly boolean[]
  /** F(x_i; θ) for every point i, with the θ-dependent constants computed once. */
  at(theta: readonly number[]): (i: number) => number
  /** Analytic F, ∂F/∂θ and ∂²F/∂θ² (packed 00, 01, 11) at point i, where available. */
  analytic?(theta: readonly number[], i: number, out: Float64Array): void
  toDistribution(theta: readonly number[]): Distribution
}

/** Normal distribution through two quantiles: σ = (x₂ − x₁)/(z_{p₂} − z_{p₁}), μ = x₁ − σ z_{p₁} (docs/methods/distributions.md). */
export function normalFromQuantiles(a: Point, b: Point): Distribution {
  const za = normalQuantile(a.prob)
  const zb = normalQuantile(b.prob)
  const sigma = (b.value - a.value) / (zb - za)
  return { family: 'normal', mu: a.value - sigma * za, sigma }
}

/** Lognormal through two quantiles: the normal closed form applied to ln x (docs/methods/distributions.md). */
export function lognormalFromQuantiles(a: Point, b: Point): Distribution {
  const za = normalQuantile(a.prob)
  const zb = normalQuantile(b.prob)
  const la = Math.log(a.value)
  const sdlog = (Math.log(b.value) - la) / (zb - za)
  return { family: 'lognormal', meanlog: la - sdlog * za, sdlog }
}

/** Student-t (fixed df) through two quantiles: the location-scale closed form with t quantiles. */
export function studentTFromQuantiles(a: Point, b: Point, df: number): Distribution {
  const ta = studentTQuantile(a.prob, df)
  const tb = studentTQuantile(b.prob, df)
  const sigma = (b.value - a.value) / (tb - ta)
  return { family: 'student-t', mu: a.value - sigma * ta, sigma, df }
}

/** Sum of squared CDF errors Σ wᵢ (F(xᵢ) − pᵢ)², weights 1 when absent (Priorsmith's fitting criterion, docs/methods/fitting.md; Garthwaite, Kadane & O'Hagan 2005). */
export function sumSquaredError(d: Distribution, points: Point[], weights?: readonly number[]): number {
  let s = 0
  points.forEach((pt, i) => {
    const r = cdf(d, pt.value) - pt.prob
    s += (weights ? weights[i] : 1) * r * r
  })
  return s
}

/**
 * The model on √wᵢ-scaled points: minimising Σ (√wᵢ F(xᵢ) − √wᵢ pᵢ)² is the weighted criterion, so Levenberg–Marquardt
 * and the Newton polish run unchanged on it.
 */
function scaledModel(model: CdfModel, sw: readonly number[]): CdfModel {
  return {
    nParams: model.nParams,
    logParams: model.logParams,
    at: (th) => {
      const F = model.at(th)
      return (i) => sw[i] * F(i)
    },
    analytic: model.analytic
      ? (th, i, out) => {
          model.analytic!(th, i, out)
          for (let k = 0; k < 6; k++) out[k] *= sw[i]
        }
      : undefined,
    toDistribution: model.toDistribution,
  }
}

/** The model and target probabilities the least-squares search runs on (√w-scaled when weights are given). */
function criterionModel(points: Point[], family: SmoothFamily, options: FitOptions): { model: CdfModel; target: number[] } {
  const model = buildModel(points, family, options)
  const w = options.weights
  if (!w) return { model, target: points.map((pt) => pt.prob) }
  const sw = w.map(Math.sqrt)
  return { model: scaledModel(model, sw), target: points.map((pt, i) => sw[i] * pt.prob) }
}

function locationScaleModel(
  t: number[],
  G: (z: number) => number,
  g: (z: number) => number,
  gPrime: (z: number, gz: number) => number,
  build: (loc: number, scale: number) => Distribution,
): CdfModel {
  return {
    nParams: 2,
    logParams: [false, true],
    at: (th) => {
      const s = Math.exp(th[1])
      return (i) => G((t[i] - th[0]) / s)
    },
    analytic: (th, i, out) => {
      const s = Math.exp(th[1])
      const z = (t[i] - th[0]) / s
      const gz = g(z)
      const gp = gPrime(z, gz)
      out[0] = G(z)
      out[1] = -gz / s
      out[2] = -gz * z
      out[3] = gp / (s * s)
      out[4] = (gp * z + gz) / s
      out[5] = gp * z * z + gz * z
    },
    toDistribution: (th) => build(th[0], Math.exp(th[1])),
  }
}

/** P(a, y) and its shape derivatives for the gamma model (one buffer: the engine is single-threaded). */
const shapeScratch = new Float64Array(4)

function buildModel(points: Point[], family: SmoothFamily, options: FitOptions): CdfModel {
  const x = points.map((p) => p.value)
  switch (family) {
    case 'normal':
      return locationScaleModel(x, normCdf, normPdf, (z, gz) => -z * gz, (mu, sigma) => ({ family: 'normal', mu, sigma }))
    case 'lognormal':
      return locationScaleModel(
        x.map(Math.log),
        normCdf,
        normPdf,
        (z, gz) => -z * gz,
        (meanlog, sdlog) => ({ family: 'lognormal', meanlog, sdlog }),
      )
    case 'student-t': {
      const df = options.df ?? DEFAULT_T_DF
      const logNorm = studentTLogPdf(0, df)
      return locationScaleModel(
        x,
        (z) => studentTCdf(z, df),
        (z) => Math.exp(logNorm - ((df + 1) / 2) * Math.log1p((z * z) / df)),
        (z, gz) => (-gz * (df + 1) * z) / (df + z * z),
        (mu, sigma) => ({ family: 'student-t', mu, sigma, df }),
      )
    }
    case 'gamma':
      return {
        nParams: 2,
        logParams: [true, true],
        at: (th) => {
          const a = Math.exp(th[0])
          const b = Math.exp(th[1])
          return (i) => gammaPQ(a, b * x[i]).p
        },
        analytic: (th, i, out) => {
          const a = Math.exp(th[0])
          const y = Math.exp(th[1]) * x[i]
          gammaPShapeDerivatives(a, y, shapeScratch)
          const e = shapeScratch[3]
          out[0] = shapeScratch[0]
          out[1] = a * shapeScratch[1]
          out[2] = e
          out[3] = a * shapeScratch[1] + a * a * shapeScratch[2]
          out[4] = e * a * (Math.log(y) - digamma(a))
          out[5] = e * (a - y)
        },
        toDistribution: (th) => ({ family: 'gamma', shape: Math.exp(th[0]), rate: Math.exp(th[1]) }),
      }
    case 'beta':
      return {
        nParams: 2,
        logParams: [true, true],
        at: (th) => {
          const a = Math.exp(th[0])
          const b = Math.exp(th[1])
          const lb = lbeta(a, b)
          return (i) => betaPQ(x[i], a, b, 1 - x[i], lb).p
        },
        toDistribution: (th) => ({ family: 'beta', alpha: Math.exp(th[0]), beta: Math.exp(th[1]) }),
      }
    case 'scaled-beta': {
      const { lower, upper } = options as { lower: number; upper: number }
      const w = upper - lower
      const y = x.map((v) => (v - lower) / w)
      const yc = x.map((v) => (upper - v) / w)
      return {
        nParams: 2,
        logParams: [true, true],
        at: (th) => {
          const a = Math.exp(th[0])
          const b = Math.exp(th[1])
          const lb = lbeta(a, b)
          return (i) => betaPQ(y[i], a, b, yc[i], lb).p
        },
        toDistribution: (th) => ({ family: 'scaled-beta', alpha: Math.exp(th[0]), beta: Math.exp(th[1]), lower, upper }),
      }
    }
  }
}

/** Least-squares line t ≈ a + b·z, weighted when weights are given. */
function regress(t: number[], z: number[], w?: readonly number[]): { a: number; b: number } {
  const n = t.length
  const wt = (i: number) => (w ? w[i] : 1)
  let sw = 0
  let mz = 0
  let mt = 0
  for (let i = 0; i < n; i++) {
    sw += wt(i)
    mz += wt(i) * z[i]
    mt += wt(i) * t[i]
  }
  mz /= sw
  mt /= sw
  let szz = 0
  let szt = 0
  for (let i = 0; i < n; i++) {
    szz += wt(i) * (z[i] - mz) ** 2
    szt += wt(i) * (z[i] - mz) * (t[i] - mt)
  }
  const b = szt / szz
  return { a: mt - b * mz, b }
}

function clampLog(v: number): number {
  return Math.min(LOG_RANGE, Math.max(-LOG_RANGE, v))
}

function betaFromMoments(m: number, s: number): number[] | null {
  if (!(m > 0 && m < 1 && s > 0)) return null
  const nu = (m * (1 - m)) / (s * s) - 1
  if (!(nu > 0)) return null
  return [Math.log(m * nu), Math.log((1 - m) * nu)]
}

function betaStarts(y: number[], z: number[]): number[][] {
  const starts: number[][] = []
  const lin = regress(y, z)
  const mom = betaFromMoments(lin.a, lin.b)
  if (mom) starts.push(mom)
  const lg = regress(
    y.map((v) => Math.log(v / (1 - v))),
    z,
  )
  const med = 1 / (1 + Math.exp(-lg.a))
  const nu = 1 / (lg.b * lg.b * med * (1 - med))
  starts.push([Math.log(med * nu), Math.log((1 - med) * nu)])
  return starts
}

function primaryStarts(points: Point[], family: SmoothFamily, options: FitOptions, z: number[], tq: number[]): number[][] {
  const x = points.map((p) => p.value)
  const n = x.length
  const starts: number[][] = []
  switch (family) {
    case 'normal': {
      const r = regress(x, z)
      starts.push([r.a, Math.log(r.b)])
      const two = normalFromQuantiles(points[0], points[n - 1]) as { mu: number; sigma: number }
      starts.push([two.mu, Math.log(two.sigma)])
      break
    }
    case 'lognormal': {
      const r = regress(x.map(Math.log), z)
      starts.push([r.a, Math.log(r.b)])
      const two = lognormalFromQuantiles(points[0], points[n - 1]) as { meanlog: number; sdlog: number }
      starts.push([two.meanlog, Math.log(two.sdlog)])
      break
    }
    case 'student-t': {
      const r = regress(x, tq)
      starts.push([r.a, Math.log(r.b)])
      const rn = regress(x, z)
      starts.push([rn.a, Math.log(rn.b)])
      break
    }
    case 'gamma': {
      const wh = regress(x.map(Math.cbrt), z)
      const ratio = wh.b / wh.a
      if (ratio > 0 && Number.isFinite(ratio)) {
        const s = (-1 + Math.sqrt(1 + 4 * ratio * ratio)) / (2 * ratio)
        const shape = 1 / (9 * s * s)
        const meanCube = wh.a / (1 - s * s)
        const rate = shape / meanCube ** 3
        if (shape > 0 && rate > 0) starts.push([Math.log(shape), Math.log(rate)])
      }
      const ln = regress(x.map(Math.log), z)
      const shapeL = 1 / Math.expm1(ln.b * ln.b)
      const meanL = Math.exp(ln.a + (ln.b * ln.b) / 2)
      starts.push([Math.log(shapeL), Math.log(shapeL / meanL)])
      const nm = regress(x, z)
      if (nm.a > 0) starts.push([Math.log((nm.a * nm.a) / (nm.b * nm.b)), Math.log(nm.a / (nm.b * nm.b))])
      break
    }
    case 'beta':
      starts.push(...betaStarts(x, z))
      break
    case 'scaled-beta': {
      const { lower, upper } = options as { lower: number; upper: number }
      starts.push(
        ...betaStarts(
          x.map((v) => (v - lower) / (upper - lower)),
          z,
        ),
      )
      break
    }
  }
  return starts
}

/** Two-parameter starts through each pair of points: the exact two-point fit (location-scale families) or its moment match. */
function pairStarts(points: Point[], family: SmoothFamily, options: FitOptions, z: number[], tq: number[]): number[][] {
  const out: number[][] = []
  const n = points.length
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) {
      const a = points[i]
      const b = points[j]
      const za = z[i]
      const zb = z[j]
      if (family === 'normal' || family === 'student-t') {
        const qa = family === 'normal' ? za : tq[i]
        const sigma = (b.value - a.value) / ((family === 'normal' ? zb : tq[j]) - qa)
        out.push([a.value - sigma * qa, Math.log(sigma)])
      } else if (family === 'lognormal' || family === 'gamma') {
        const s = (Math.log(b.value) - Math.log(a.value)) / (zb - za)
        const m = Math.log(a.value) - s * za
        if (family === 'lognormal') out.push([m, Math.log(s)])
        else {
          const shape = 1 / Math.expm1(s * s)
          out.push([Math.log(shape), Math.log(shape) - m - (s * s) / 2])
        }
      } else if (family === 'beta' || family === 'scaled-beta') {
        const lower = family === 'beta' ? 0 : (options.lower as number)
        const upper = family === 'beta' ? 1 : (options.upper as number)
        const logit = (v: number): number => Math.log((v - lower) / (upper - v))
        const s = (logit(b.value) - logit(a.value)) / (zb - za)
        const med = 1 / (1 + Math.exp(-(logit(a.value) - s * za)))
        const nu = 1 / (s * s * med * (1 - med))
        out.push([Math.log(med * nu), Math.log((1 - med) * nu)])
      }
    }
  return out
}

function sanitise(starts: number[][], family: SmoothFamily): number[][] {
  return starts
    .filter((s) => s.every(Number.isFinite))
    .map((s) => (isLogFamily(family) ? s.map(clampLog) : [s[0], clampLog(s[1])]))
}

/**
 * Starting points for the least-squares fit on the unconstrained scale of the family (see CdfModel), in the judgement's
 * own units: the starts the search uses in standardised units (standardUnit), carried back. None for the uniform, which
 * is solved exactly (uniformLeastSquares).
 */
export function fittingStarts(points: Point[], family: Family, options: FitOptions = {}): number[][] {
  checkFamilyInput(points, family, options)
  const unit = standardUnit(points, family, options)
  if (unit.family === 'uniform') return []
  return standardStarts(unit.points, unit.family, unit.options).map(unit.thetaBack)
}

/**
 * Starting points in standardised units: quantile-scale regressions (x on the family's standard quantiles), the two
 * outermost points, moment matches from normal, lognormal and Wilson–Hilferty (cube-root) regressions for the gamma;
 * and, when it beats all of these at the outset, the best of the exact fits through each pair of points (which rescues
 * strongly inconsistent judgements from a poor basin).
 */
function standardStarts(points: Point[], family: SmoothFamily, options: FitOptions): number[][] {
  const z = points.map((pt) => normalQuantile(pt.prob))
  const tq = family === 'student-t' ? points.map((pt) => studentTQuantile(pt.prob, options.df ?? DEFAULT_T_DF)) : z
  const primary = sanitise(primaryStarts(points, family, options, z, tq), family)
  if (points.length > 2) {
    const { model, target: p } = criterionModel(points, family, options)
    const bestPrimary = Math.min(...primary.map((st) => sseOf(model, st, p)))
    let best: { start: number[]; sse: number } | null = null
    for (const st of sanitise(pairStarts(points, family, options, z, tq), family)) {
      const sse = sseOf(model, st, p)
      if (sse < PAIR_START_GAIN * bestPrimary && (!best || sse < best.sse)) best = { start: st, sse }
    }
    if (best) primary.push(best.start)
    if (family === 'gamma') {
      const grid = gammaShapeGridStart(points, z, model, p)
      if (grid && grid.sse < Math.min(bestPrimary, best?.sse ?? Infinity)) primary.push(grid.start)
    }
  }
  const unique: number[][] = []
  for (const st of primary) {
    if (!unique.some((u) => u.every((v, k) => Math.abs(v - st[k]) <= 1e-3 * (1 + Math.abs(v))))) unique.push(st)
  }
  if (unique.length === 0) unique.push(isLogFamily(family) ? [0, 0] : [points[0].value, 0])
  return unique
}

/** Shapes screened by the gamma's multistart: ln a = −5, −4, …, 10. */
const GAMMA_SHAPE_GRID = Array.from({ length: 16 }, (_, k) => Math.exp(k - 5))

/**
 * Approximate median of Gamma(a, 1) for a start: Wilson–Hilferty a(1 − 1/(9a))³ from a = 1 up (Wilson & Hilferty 1931),
 * below it (Γ(a + 1)/2)^(1/a), from the leading term P(a, x) ≈ x^a/Γ(a + 1) of the series (Abramowitz & Stegun 1964, 6.5.29).
 */
function gammaMedianApprox(a: number): number {
  return a >= 1 ? a * (1 - 1 / (9 * a)) ** 3 : Math.exp((lgamma(a + 1) - Math.LN2) / a)
}

/** ln of the judgement's median: ln x interpolated linearly in z = Φ⁻¹(p) at z = 0 (the two outer points beyond). */
function logMedian(points: Point[], z: number[]): number {
  const n = points.length
  let i = 0
  while (i < n - 2 && z[i + 1] < 0) i++
  const la = Math.log(points[i].value)
  const lb = Math.log(points[i + 1].value)
  return la + ((lb - la) * (0 - z[i])) / (z[i + 1] - z[i])
}

/**
 * Multistart screen for the gamma, whose criterion has several local minima when the values span orders of magnitude
 * (a small shape fits the lower values, a large one the upper): for each shape on the grid, the rate that puts the
 * median of the gamma on the judgement's median; the best of these by the criterion.
 */
function gammaShapeGridStart(points: Point[], z: number[], model: CdfModel, p: number[]): { start: number[]; sse: number } | null {
  const lm = logMedian(points, z)
  let best: { start: number[]; sse: number } | null = null
  for (const a of GAMMA_SHAPE_GRID) {
    const start = [Math.log(a), Math.log(gammaMedianApprox(a)) - lm]
    const sse = sseOf(model, start, p)
    if (Number.isFinite(sse) && (!best || sse < best.sse)) best = { start, sse }
  }
  return best
}

function isLogFamily(family: Family): boolean {
  return family === 'gamma' || family === 'beta' || family === 'scaled-beta'
}

function sseOf(model: CdfModel, theta: readonly number[], p: readonly number[]): number {
  const F = model.at(theta)
  let s = 0
  for (let i = 0; i < p.length; i++) {
    const r = F(i) - p[i]
    s += r * r
  }
  return s
}

/** Levenberg–Marquardt (ml-levenberg-marquardt) in rounds of a few iterations until the parameters stop moving. */
function levenbergMarquardtFit(model: CdfModel, p: number[], start: number[], iterations: number, rounds: number): { theta: number[]; sse: number } {
  const n = p.length
  const k = model.nParams
  const index = Array.from({ length: n }, (_, i) => i)
  const paramFn = (th: number[]) => model.at(th)
  const scratch = new Float64Array(6)
  const jacobianFunction = model.analytic
    ? (th: number[]) => (i: number) => {
        model.analytic!(th, i, scratch)
        return [scratch[1], scratch[2]]
      }
    : (th: number[]) => {
        const cols: Float64Array[] = []
        const base = new Float64Array(n)
        const F = model.at(th)
        for (let i = 0; i < n; i++) base[i] = F(i)
        for (let j = 0; j < k; j++) {
          const hstep = 1e-7 * Math.max(1, Math.abs(th[j]))
          const shifted = th.slice()
          shifted[j] += hstep
          const col = new Float64Array(n)
          const Fs = model.at(shifted)
          for (let i = 0; i < n; i++) col[i] = (Fs(i) - base[i]) / hstep
          cols.push(col)
        }
        return (i: number) => cols.map((c) => c[i])
      }
  const minValues = model.logParams.map((isLog) => (isLog ? -LOG_RANGE : -Number.MAX_VALUE))
  const maxValues = model.logParams.map((isLog) => (isLog ? LOG_RANGE : Number.MAX_VALUE))
  let theta = start.slice()
  let sse = sseOf(model, theta, p)
  for (let round = 0; round < rounds; round++) {
    const res = levenbergMarquardt({ x: index, y: p }, paramFn, {
      initialValues: theta,
      maxIterations: iterations,
      errorTolerance: 1e-32,
      damping: 1e-3,
      jacobianFunction,
      minValues,
      maxValues,
    })
    const moved = res.parameterValues.reduce((m, v, j) => Math.max(m, Math.abs(v - theta[j]) / (1 + Math.abs(v))), 0)
    if (res.parameterError <= sse) {
      theta = res.parameterValues.slice()
      sse = res.parameterError
    }
    if (moved < 1e-7 || sse < 1e-30) break
  }
  return { theta, sse }
}

/** F, ∂F/∂θ and ∂²F/∂θ² at every point: analytic where the model has them, otherwise difference stencils. */
function derivatives(model: CdfModel, theta: readonly number[], n: number): { F: number[]; J: number[][]; H: number[][] } {
  const k = model.nParams
  const F: number[] = []
  const J: number[][] = []
  const H: number[][] = []
  if (model.analytic) {
    const out = new Float64Array(6)
    for (let i = 0; i < n; i++) {
      model.analytic(theta, i, out)
      F.push(out[0])
      J.push([out[1], out[2]])
      H.push([out[3], out[4], out[5]])
    }
    return { F, J, H }
  }
  const at = (shift: number[]): number[] => {
    const th = theta.map((v, j) => v + shift[j])
    const Fth = model.at(th)
    return Array.from({ length: n }, (_, i) => Fth(i))
  }
  const h = theta.map((v) => 1e-4 * Math.max(1, Math.abs(v)))
  const unit = (j: number, sgn: number): number[] => theta.map((_, m) => (m === j ? sgn * h[j] : 0))
  const f0 = at(new Array(k).fill(0))
  const plus = h.map((_, j) => at(unit(j, 1)))
  const minus = h.map((_, j) => at(unit(j, -1)))
  const plus2 = h.map((_, j) => at(unit(j, 2)))
  const minus2 = h.map((_, j) => at(unit(j, -2)))
  const both = at([h[0], h[1]])
  for (let i = 0; i < n; i++) {
    F.push(f0[i])
    // Richardson's five-point derivative (error O(h⁴)): the gradient it gives decides where the polish stops
    J.push(h.map((hj, j) => (8 * (plus[j][i] - minus[j][i]) - (plus2[j][i] - minus2[j][i])) / (12 * hj)))
    const d2 = h.map((hj, j) => (plus[j][i] - 2 * f0[i] + minus[j][i]) / (hj * hj))
    H.push([d2[0], (both[i] - plus[0][i] - plus[1][i] + f0[i]) / (h[0] * h[1]), d2[1]])
  }
  return { F, J, H }
}

/** Newton's method on SSE(θ) from a converged LM point, with Gauss–Newton fallback and step halving; solves ∇SSE = 0 to ~1e-10. */
function newtonPolish(model: CdfModel, p: number[], start: number[]): { theta: number[]; sse: number; converged: boolean } {
  const n = p.length
  const k = model.nParams
  let theta = start.slice()
  let sse = sseOf(model, theta, p)
  for (let iter = 0; iter < 12 && sse > 0; iter++) {
    const { F, J, H } = derivatives(model, theta, n)
    const g = new Array<number>(k).fill(0)
    const full = new Array<number>(k * k).fill(0)
    const gn = new Array<number>(k * k).fill(0)
    for (let i = 0; i < n; i++) {
      const r = F[i] - p[i]
      for (let a = 0; a < k; a++) {
        g[a] += r * J[i][a]
        for (let b = 0; b < k; b++) {
          const second = H[i][a + b]
          gn[a * k + b] += J[i][a] * J[i][b]
          full[a * k + b] += J[i][a] * J[i][b] + r * second
        }
      }
    }
    let step = solve(full, g)
    if (!step) step = solve(gn, g, 1e-12)
    if (!step) break
    let accepted = false
    let lambda = 1
    for (let tries = 0; tries < 30; tries++) {
      const trial = theta.map((v, j) => v - lambda * step![j])
      const s = sseOf(model, trial, p)
      if (s <= sse * (1 + 1e-13) + 1e-300) {
        const small = step.every((d, j) => Math.abs(lambda * d) <= 1e-10 * Math.max(1, Math.abs(theta[j])))
        theta = trial
        sse = s
        accepted = true
        if (small) return { theta, sse, converged: true }
        break
      }
      lambda /= 2
    }
    if (!accepted) return { theta, sse, converged: true }
  }
  return { theta, sse, converged: sse === 0 }
}

/** Solves a 2×2 symmetric system; null unless positive definite. */
function solve(A: number[], g: number[], ridge = 0): number[] | null {
  const a = A[0] * (1 + ridge)
  const d = A[3] * (1 + ridge)
  const b = A[1]
  const det = a * d - b * b
  if (!(a > 0) || !(det > 0)) return null
  return [(d * g[0] - b * g[1]) / det, (a * g[1] - b * g[0]) / det]
}

/** Weighted criterion of a uniform on [lower, upper]: Σ wᵢ (clamp((xᵢ − L)/(U − L)) − pᵢ)². */
function uniformCriterion(x: number[], p: number[], w: readonly number[] | undefined, lower: number, upper: number): number {
  let s = 0
  for (let i = 0; i < x.length; i++) {
    const f = Math.min(1, Math.max(0, (x[i] - lower) / (upper - lower)))
    s += (w ? w[i] : 1) * (f - p[i]) ** 2
  }
  return s
}

/**
 * Width of the best uniform with one end fixed, measured from that end: dᵢ ≥ 0 are the distances of the points on the
 * open side (in increasing order), tᵢ their targets (p, or 1 − p measured from a fixed upper end). With the width W
 * between dₖ and dₖ₊₁ the first k points lie inside (F = dᵢ/W) and the rest at F = 1, so the criterion is a quadratic
 * in c = 1/W on that interval, minimised at Σ w d t / Σ w d² clamped to it; every interval is tried (the criterion has
 * one local minimum per interval, and the first consistent one need not be the best).
 */
function uniformWidth(d: number[], t: number[], w: number[]): number {
  let best = { width: d[d.length - 1], sse: Infinity }
  let num = 0
  let den = 0
  for (let k = 1; k <= d.length; k++) {
    num += w[k - 1] * d[k - 1] * t[k - 1]
    den += w[k - 1] * d[k - 1] * d[k - 1]
    const cMin = k < d.length ? 1 / d[k] : 0
    const cMax = 1 / d[k - 1]
    const c = Math.min(cMax, Math.max(cMin, num / den))
    if (!(c > 0) || !Number.isFinite(c)) continue
    let sse = 0
    for (let i = 0; i < d.length; i++) sse += w[i] * (Math.min(1, d[i] * c) - t[i]) ** 2
    if (sse < best.sse) best = { width: 1 / c, sse }
  }
  return best.width
}

/** The best uniform with its lower (or upper) end fixed at `anchor`, by uniformWidth on the points beyond it. */
function uniformFromEnd(x: number[], p: number[], w: readonly number[] | undefined, anchor: number, fixedLower: boolean): { lower: number; upper: number } {
  const d: number[] = []
  const t: number[] = []
  const wt: number[] = []
  const order = fixedLower ? x.map((_, i) => i) : x.map((_, i) => x.length - 1 - i)
  for (const i of order) {
    const dist = fixedLower ? x[i] - anchor : anchor - x[i]
    if (!(dist > 0)) continue
    d.push(dist)
    t.push(fixedLower ? p[i] : 1 - p[i])
    wt.push(w ? w[i] : 1)
  }
  if (d.length === 0) return fixedLower ? { lower: anchor, upper: anchor + 1 } : { lower: anchor - 1, upper: anchor }
  const width = uniformWidth(d, t, wt)
  return fixedLower ? { lower: anchor, upper: anchor + width } : { lower: anchor - width, upper: anchor }
}

/**
 * Exact global (weighted) least squares for a uniform CDF. The criterion is piecewise quadratic: on each region where
 * the same points lie below, inside and above [L, U] it is a least-squares line through the inside points, and its
 * minimum lies either inside a region (the unconstrained line through a run of two or more consecutive points) or on a
 * region's edge, where a point sits exactly at L or at U — which is the best uniform with that end fixed. All of these
 * are tried and the lowest criterion kept.
 */
function uniformLeastSquares(points: Point[], options: FitOptions): { lower: number; upper: number } {
  const x = points.map((pt) => pt.value)
  const p = points.map((pt) => pt.prob)
  const w = options.weights
  if (options.lower !== undefined && options.upper !== undefined) return { lower: options.lower, upper: options.upper }
  if (options.lower !== undefined) return uniformFromEnd(x, p, w, options.lower, true)
  if (options.upper !== undefined) return uniformFromEnd(x, p, w, options.upper, false)
  const n = x.length
  let best = { lower: x[0], upper: x[n - 1], sse: Infinity }
  const consider = (lower: number, upper: number): void => {
    if (!(upper > lower) || !Number.isFinite(lower) || !Number.isFinite(upper)) return
    const sse = uniformCriterion(x, p, w, lower, upper)
    if (sse < best.sse) best = { lower, upper, sse }
  }
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const run = x.slice(i, j + 1)
      const r = regress(p.slice(i, j + 1), run, w && w.slice(i, j + 1))
      if (r.b > 0) consider(-r.a / r.b, (1 - r.a) / r.b)
    }
    const fromLower = uniformFromEnd(x, p, w, x[i], true)
    consider(fromLower.lower, fromLower.upper)
    const fromUpper = uniformFromEnd(x, p, w, x[i], false)
    consider(fromUpper.lower, fromUpper.upper)
  }
  return { lower: best.lower, upper: best.upper }
}

function checkFamilyInput(points: Point[], family: Family, options: FitOptions): void {
  if (!FAMILIES.includes(family)) throw new EngineInputError('family', `Unknown family "${family}".`)
  validatePoints(points)
  const needs = family === 'uniform' ? (options.lower !== undefined ? 0 : 1) + (options.upper !== undefined ? 0 : 1) : 2
  if (points.length < Math.max(1, needs))
    throw new EngineInputError('points', `A ${family} fit needs at least ${Math.max(1, needs)} points; ${points.length} given.`)
  if (family === 'lognormal' || family === 'gamma') requireInside(points, 0, Infinity, 'points', `the ${family} support`)
  if (family === 'beta') requireInside(points, 0, 1, 'points', 'the beta support')
  if (options.weights !== undefined && (options.weights.length !== points.length || !options.weights.every((v) => v > 0 && Number.isFinite(v))))
    throw new EngineInputError('weights', 'Give one positive, finite weight per point.')
  if (family === 'student-t' && options.df !== undefined && !(options.df > 0 && Number.isFinite(options.df)))
    throw new EngineInputError('df', 'The degrees of freedom must be a positive number.')
  if (family === 'scaled-beta') {
    if (options.lower === undefined || options.upper === undefined || !Number.isFinite(options.lower) || !Number.isFinite(options.upper))
      throw new EngineInputError('lower', 'A scaled beta needs finite lower and upper bounds.')
    if (!(options.lower < options.upper)) throw new EngineInputError('upper', 'The upper bound must be above the lower bound.')
    requireInside(points, options.lower, options.upper, 'points', 'the scaled-beta range')
  }
  if (family === 'uniform') {
    for (const key of ['lower', 'upper'] as const) {
      const v = options[key]
      if (v !== undefined && !Number.isFinite(v)) throw new EngineInputError(key, `The ${key} bound must be a finite number.`)
    }
    if (options.lower !== undefined && options.upper !== undefined && !(options.lower < options.upper))
      throw new EngineInputError('upper', 'The upper bound must be above the lower bound.')
  }
}

/**
 * A change of unit u = (g(x) − centre)/scale under which the family keeps its form (g = ln for the lognormal, which is
 * then fitted as a normal to the standardised logarithms): location-scale families are centred on the midrange and
 * scaled by the half-range, the gamma is scaled by the geometric midrange, a uniform with a fixed end is measured from
 * that end; the beta families are already on (0, 1). Fitting in these units makes a fit the same whatever the unit the
 * values are given in (Priorsmith's own convention, docs/methods/fitting.md).
 */
interface StandardUnit {
  points: Point[]
  family: Family
  options: FitOptions
  /** The fitted distribution in the judgement's own units. */
  back(d: Distribution): Distribution
  /** A parameter vector θ (see CdfModel) in the judgement's own units. */
  thetaBack(theta: number[]): number[]
}

/** Midpoint and half-width of the values, computed so that neither overflows for values near ±1.8e308. */
function midrange(v: number[]): { centre: number; scale: number } {
  const lo = v[0]
  const hi = v[v.length - 1]
  const scale = hi / 2 - lo / 2
  return { centre: lo / 2 + hi / 2, scale: scale > 0 && Number.isFinite(scale) ? scale : 1 }
}

function standardUnit(points: Point[], family: Family, options: FitOptions): StandardUnit {
  const x = points.map((pt) => pt.value)
  const to = (g: (v: number) => number, centre: number, scale: number): Point[] =>
    points.map((pt) => ({ value: (g(pt.value) - centre) / scale, prob: pt.prob }))
  const same = (v: number): number => v
  switch (family) {
    case 'normal':
    case 'student-t': {
      const { centre, scale } = midrange(x)
      return {
        points: to(same, centre, scale),
        family,
        options,
        back: (d) => ({ ...d, mu: centre + scale * (d as { mu: number }).mu, sigma: scale * (d as { sigma: number }).sigma }) as Distribution,
        thetaBack: (th) => [centre + scale * th[0], th[1] + Math.log(scale)],
      }
    }
    case 'lognormal': {
      const { centre, scale } = midrange(x.map(Math.log))
      return {
        points: to(Math.log, centre, scale),
        family: 'normal',
        options,
        back: (d) => {
          const n = d as { mu: number; sigma: number }
          return { family: 'lognormal', meanlog: centre + scale * n.mu, sdlog: scale * n.sigma }
        },
        thetaBack: (th) => [centre + scale * th[0], th[1] + Math.log(scale)],
      }
    }
    case 'gamma': {
      const g = Math.sqrt(x[0]) * Math.sqrt(x[x.length - 1])
      const scale = g > 0 && Number.isFinite(g) ? g : 1
      return {
        points: to(same, 0, scale),
        family,
        options,
        back: (d) => {
          const gd = d as { shape: number; rate: number }
          return { family: 'gamma', shape: gd.shape, rate: gd.rate / scale }
        },
        thetaBack: (th) => [th[0], th[1] - Math.log(scale)],
      }
    }
    case 'uniform': {
      const { lower, upper } = options
      if (lower !== undefined && upper !== undefined) break
      if (lower !== undefined || upper !== undefined) {
        const anchor = (lower ?? upper) as number
        const far = Math.max(...x.map((v) => Math.abs(v / 2 - anchor / 2)))
        const scale = far > 0 && Number.isFinite(far) ? 2 * far : 1
        const fixedLower = lower !== undefined
        return {
          points: to(same, anchor, scale),
          family,
          options: { ...options, lower: fixedLower ? 0 : undefined, upper: fixedLower ? undefined : 0 },
          back: (d) => {
            const ud = d as { lower: number; upper: number }
            return fixedLower ? { family: 'uniform', lower: anchor, upper: anchor + scale * ud.upper } : { family: 'uniform', lower: anchor + scale * ud.lower, upper: anchor }
          },
          thetaBack: (th) => [th[0] + Math.log(scale)],
        }
      }
      const { centre, scale } = midrange(x)
      return {
        points: to(same, centre, scale),
        family,
        options,
        back: (d) => {
          const ud = d as { lower: number; upper: number }
          return { family: 'uniform', lower: centre + scale * ud.lower, upper: centre + scale * ud.upper }
        },
        thetaBack: (th) => [centre + scale * th[0], th[1] + Math.log(scale)],
      }
    }
  }
  return { points, family, options, back: (d) => d, thetaBack: (th) => th }
}

/**
 * Least-squares fit of a family to elicited CDF points: argmin Σ wᵢ (F(xᵢ; θ) − pᵢ)² (Garthwaite, Kadane & O'Hagan 2005,
 * weights 1 unless given), in standardised units (standardUnit), by Levenberg–Marquardt from several starting points
 * and a final Newton polish.
 */
export function fitDistribution(points: Point[], family: Family, options: FitOptions = {}): FitResult {
  checkFamilyInput(points, family, options)
  const w = options.weights
  if (points.length === 2 && (family === 'normal' || family === 'lognormal' || family === 'student-t')) {
    const d =
      family === 'normal'
        ? normalFromQuantiles(points[0], points[1])
        : family === 'lognormal'
          ? lognormalFromQuantiles(points[0], points[1])
          : studentTFromQuantiles(points[0], points[1], options.df ?? DEFAULT_T_DF)
    return { distribution: d, sse: sumSquaredError(d, points, w) }
  }
  const unit = standardUnit(points, family, options)
  const distribution = unit.back(fitStandardised(unit.points, unit.family, unit.options))
  return { distribution, sse: sumSquaredError(distribution, points, w) }
}

/** The least-squares search itself, on standardised points. */
function fitStandardised(points: Point[], family: Family, options: FitOptions): Distribution {
  if (family === 'uniform') return { family: 'uniform', ...uniformLeastSquares(points, options) }
  const { model, target } = criterionModel(points, family, options)
  let best: { theta: number[]; sse: number } | null = null
  for (const start of standardStarts(points, family, options)) {
    const r = levenbergMarquardtFit(model, target, start, LM_ITERATIONS, 1)
    if (!best || r.sse < best.sse) best = r
  }
  let polished = newtonPolish(model, target, best!.theta)
  if (!polished.converged) polished = newtonPolish(model, target, levenbergMarquardtFit(model, target, polished.theta, LM_ITERATIONS, 8).theta)
  return model.toDistribution(polished.theta)
}

/** Families fitted for a quantity's support (Student-t with df = DEFAULT_T_DF). */
export function familiesFor(support: Support): Family[] {
  switch (support.kind) {
    case 'real':
      return ['normal', 'student-t', 'uniform']
    case 'positive':
      return ['lognormal', 'gamma', 'uniform']
    case 'proportion':
      return ['beta', 'uniform']
    case 'bounded':
      return ['scaled-beta', 'uniform']
  }
}

function fitUniformInside(points: Point[], lower: number, upper: number, weights?: readonly number[]): FitResult {
  let fit = fitDistribution(points, 'uniform', { weights })
  const d = fit.distribution as { lower: number; upper: number }
  const fixLower = d.lower < lower
  const fixUpper = d.upper > upper
  if (fixLower || fixUpper) {
    fit = fitDistribution(points, 'uniform', { lower: fixLower ? lower : undefined, upper: fixUpper ? upper : undefined, weights })
    const e = fit.distribution as { lower: number; upper: number }
    if (e.lower < lower || e.upper > upper)
      fit = fitDistribution(points, 'uniform', { lower: Math.max(lower, Math.min(e.lower, upper)), upper: Math.min(upper, e.upper), weights })
  }
  return fit
}

/**
 * Fits every family valid for the support by the (weighted) least-squares criterion and returns them lowest criterion
 * first; which one is shown as the default is product logic (shared/elicitation/fits.ts).
 */
export function fitAll(points: Point[], support: Support, weights?: readonly number[]): FitResult[] {
  validateSupport(support)
  validatePoints(points)
  const { lower, upper } = supportBounds(support)
  requireInside(points, lower, upper, 'points', 'the quantity’s support')
  if (points.length < 2) throw new EngineInputError('points', 'At least two points are needed to fit a distribution.')
  if (!Number.isFinite(points[points.length - 1].value - points[0].value)) throw new EngineInputError('points', UNFITTABLE)
  const results: FitResult[] = []
  for (const family of familiesFor(support)) {
    try {
      if (family === 'uniform') results.push(fitUniformInside(points, lower, upper, weights))
      else if (family === 'scaled-beta') results.push(fitDistribution(points, family, { lower, upper, weights }))
      else results.push(fitDistribution(points, family, { weights }))
    } catch (err) {
      // a fit that collapsed to parameters out of range (values near ±1e308) is not offered; the others still are
      if (!(err instanceof EngineInputError && err.field === 'distribution')) throw err
    }
  }
  // Values far out (near ±1e308) can make a least-squares fit collapse to a point: such a "fit" is never offered or stored.
  const proper = results.filter((r) => Number.isFinite(r.sse) && isComputable(r.distribution))
  if (proper.length === 0) {
    throw new EngineInputError('points', UNFITTABLE)
  }
  return proper.map((r, i) => ({ r, i })).sort((a, b) => a.r.sse - b.r.sse || a.i - b.i).map(({ r }) => r)
}

const UNFITTABLE = 'No distribution can be fitted to values this large or this close together. Give the values in a larger unit (for example thousands or millions) and try again.'

function isComputable(d: Distribution): boolean {
  try {
    validateDistribution(d)
    return true
  } catch (err) {
    if (err instanceof EngineInputError) return false
    throw err
  }
}
