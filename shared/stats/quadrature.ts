// Adaptive Gauss–Kronrod quadrature (G10–K21 rule, global bisection of the interval with the largest error
// estimate, QUADPACK's error estimate) after Piessens, de Doncker-Kapenga, Überhuber & Kahaner (1983),
// QUADPACK: A Subroutine Package for Automatic Integration, Springer (routines QK21 and QAG).

import { EngineInputError } from './errors'

const XGK = [
  0.995657163025808080735527280689003, 0.973906528517171720077964012084452, 0.930157491355708226001207180059508,
  0.865063366688984510732096688423493, 0.780817726586416897063717578345042, 0.679409568299024406234327365114874,
  0.562757134668604683339000099272694, 0.433395394129247190799265943165784, 0.294392862701460198131126603103866,
  0.14887433898163121088482600112972, 0,
]
const WGK = [
  0.011694638867371874278064396062192, 0.03255816230796472747881897245939, 0.05475589657435199603138130024458,
  0.07503967481091995276704314091619, 0.093125454583697605535065465083366, 0.109387158802297641899210590325805,
  0.123491976262065851077208067036591, 0.134709217311473325928054001771707, 0.142775938577060080797094273138717,
  0.147739104901338491374841515972068, 0.149445554002916905664936468389821,
]
const WG = [
  0.066671344308688137593568809893332, 0.149451349150580593145776339657697, 0.219086362515982043995534934228163,
  0.269266719309996355091226921569469, 0.295524224714752870173892994651338,
]

const EPMACH = 2.220446049250313e-16
const UFLOW = 2.2250738585072014e-308

export type RuleResult = { value: number; error: number; resabs: number; resasc: number }

/** One G10–K21 panel on [a, b] with QUADPACK's error estimate (Piessens et al. 1983, routine QK21). */
export function gaussKronrod21(f: (x: number) => number, a: number, b: number): RuleResult {
  const centr = 0.5 * (a + b)
  const hlgth = 0.5 * (b - a)
  const fv1 = new Array<number>(10)
  const fv2 = new Array<number>(10)
  const fc = f(centr)
  for (let j = 0; j < 5; j++) {
    const jtw = 2 * j + 1
    const absc = hlgth * XGK[jtw]
    fv1[jtw] = f(centr - absc)
    fv2[jtw] = f(centr + absc)
  }
  for (let j = 0; j < 5; j++) {
    const jtwm1 = 2 * j
    const absc = hlgth * XGK[jtwm1]
    fv1[jtwm1] = f(centr - absc)
    fv2[jtwm1] = f(centr + absc)
  }
  return kronrod21FromValues(fc, fv1, fv2, hlgth)
}

/**
 * QK21's value and error estimate from the integrand at the centre (fc) and at centre ∓ hlgth·XGK[j] (fv1[j], fv2[j]),
 * for integrands already read at those points (Piessens et al. 1983, routine QK21).
 */
export function kronrod21FromValues(fc: number, fv1: ArrayLike<number>, fv2: ArrayLike<number>, hlgth: number): RuleResult {
  const dhlgth = Math.abs(hlgth)
  let resg = 0
  let resk = WGK[10] * fc
  let resabs = Math.abs(resk)
  for (let j = 0; j < 5; j++) {
    const jtw = 2 * j + 1
    const f1 = fv1[jtw]
    const f2 = fv2[jtw]
    resg += WG[j] * (f1 + f2)
    resk += WGK[jtw] * (f1 + f2)
    resabs += WGK[jtw] * (Math.abs(f1) + Math.abs(f2))
  }
  for (let j = 0; j < 5; j++) {
    const jtwm1 = 2 * j
    const f1 = fv1[jtwm1]
    const f2 = fv2[jtwm1]
    resk += WGK[jtwm1] * (f1 + f2)
    resabs += WGK[jtwm1] * (Math.abs(f1) + Math.abs(f2))
  }
  const reskh = resk * 0.5
  let resasc = WGK[10] * Math.abs(fc - reskh)
  for (let j = 0; j < 10; j++) resasc += WGK[j] * (Math.abs(fv1[j] - reskh) + Math.abs(fv2[j] - reskh))
  const value = resk * hlgth
  resabs *= dhlgth
  resasc *= dhlgth
  let error = Math.abs((resk - resg) * hlgth)
  if (resasc !== 0 && error !== 0) error = resasc * Math.min(1, Math.pow((200 * error) / resasc, 1.5))
  if (resabs > UFLOW / (50 * EPMACH)) error = Math.max(EPMACH * 50 * resabs, error)
  return { value, error, resabs, resasc }
}

/** The 21 Kronrod abscissae and weights of QK21 mapped to [a, b] (Piessens et al. 1983), for integrating several functions at the same points. */
export function kronrod21Rule(a: number, b: number): { x: Float64Array; w: Float64Array } {
  const centr = 0.5 * (a + b)
  const hlgth = 0.5 * (b - a)
  const x = new Float64Array(21)
  const w = new Float64Array(21)
  x[0] = centr
  w[0] = WGK[10] * hlgth
  for (let j = 0; j < 10; j++) {
    x[2 * j + 1] = centr - hlgth * XGK[j]
    x[2 * j + 2] = centr + hlgth * XGK[j]
    w[2 * j + 1] = w[2 * j + 2] = WGK[j] * hlgth
  }
  return { x, w }
}

export type Panel = { a: number; b: number; value: number; error: number; resabs: number }

export type AdaptiveOptions = {
  /** Relative tolerance on the integral (default 1e-12). */
  epsrel?: number
  /** Absolute tolerance (default 0). */
  epsabs?: number
  /** Tolerance relative to ∫|f| (for integrands that change sign; default 0). */
  epsRelAbs?: number
  /** Maximum number of panels (default 2000). */
  limit?: number
}

export type AdaptiveResult = { value: number; error: number; panels: Panel[]; converged: boolean; evaluations: number }

/** Globally adaptive G10–K21 integration over [points[0], points[last]] with the given breakpoints (QUADPACK QAG/QAGP strategy). */
export function integrate(f: (x: number) => number, points: number[], options: AdaptiveOptions = {}): AdaptiveResult {
  const epsrel = options.epsrel ?? 1e-12
  const epsabs = options.epsabs ?? 0
  const epsRelAbs = options.epsRelAbs ?? 0
  const limit = options.limit ?? 2000
  let panels: Panel[] = []
  let evaluations = 0
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i]
    const b = points[i + 1]
    if (!(b > a)) continue
    const r = gaussKronrod21(f, a, b)
    evaluations += 21
    panels.push({ a, b, value: r.value, error: r.error, resabs: r.resabs })
  }
  let value = 0
  let error = 0
  let resabs = 0
  const total = (): void => {
    value = 0
    error = 0
    resabs = 0
    for (const p of panels) {
      value += p.value
      error += p.error
      resabs += p.resabs
    }
  }
  total()
  let converged = false
  while (true) {
    const tol = Math.max(epsabs, epsrel * Math.abs(value), epsRelAbs * resabs)
    if (error <= tol) {
      converged = true
      break
    }
    if (panels.length >= limit) break
    let worst = 0
    for (let i = 1; i < panels.length; i++) if (panels[i].error > panels[worst].error) worst = i
    const p = panels[worst]
    const mid = 0.5 * (p.a + p.b)
    if (!(mid > p.a && mid < p.b)) break
    const left = gaussKronrod21(f, p.a, mid)
    const right = gaussKronrod21(f, mid, p.b)
    evaluations += 42
    const replaced = [
      { a: p.a, b: mid, value: left.value, error: left.error, resabs: left.resabs },
      { a: mid, b: p.b, value: right.value, error: right.error, resabs: right.resabs },
    ]
    panels.splice(worst, 1, ...replaced)
    value += left.value + right.value - p.value
    error += left.error + right.error - p.error
    resabs += left.resabs + right.resabs - p.resabs
    if (panels.length % 64 === 0) total()
  }
  total()
  panels = panels.sort((x, y) => x.a - y.a)
  return { value, error, panels, converged, evaluations }
}

/** Maximises h near u0 (initial step s): bracket by doubling steps uphill, then Brent's parabolic/golden search (Brent 1973, ch. 5). */
export function maximize(h: (u: number) => number, u0: number, s: number): { u: number; h: number } {
  const H = (u: number): number => {
    const v = h(u)
    return Number.isNaN(v) ? -Infinity : v
  }
  const f0 = H(u0)
  let dir = 1
  let fcur = H(u0 + s)
  if (!(fcur > f0)) {
    const fm = H(u0 - s)
    if (!(fm > f0)) return brentMax(H, u0 - s, u0, u0 + s, f0, s)
    dir = -1
    fcur = fm
  }
  let prev = u0
  let cur = u0 + dir * s
  let step = s
  for (let i = 0; i < 300; i++) {
    step *= 2
    const next = cur + dir * step
    const fnext = H(next)
    if (!(fnext > fcur)) return brentMax(H, Math.min(prev, next), cur, Math.max(prev, next), fcur, s)
    prev = cur
    cur = next
    fcur = fnext
  }
  return { u: cur, h: fcur }
}

function brentMax(H: (u: number) => number, lo: number, mid: number, hi: number, fmid: number, s: number): { u: number; h: number } {
  const C = 0.381966011250105
  let a = lo
  let b = hi
  let x = mid
  let w = mid
  let v = mid
  let fx = -fmid
  let fw = fx
  let fv = fx
  let d = 0
  let e = 0
  const tolAbs = 1e-4 * Math.abs(s) + 1e-300
  for (let iter = 0; iter < 200; iter++) {
    const m = 0.5 * (a + b)
    const tol1 = 1e-8 * Math.abs(x) + tolAbs
    const tol2 = 2 * tol1
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) break
    let useGolden = true
    if (Math.abs(e) > tol1) {
      let r = (x - w) * (fx - fv)
      let q = (x - v) * (fx - fw)
      let p = (x - v) * q - (x - w) * r
      q = 2 * (q - r)
      if (q > 0) p = -p
      else q = -q
      r = e
      e = d
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q
        const u = x + d
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1
        useGolden = false
      }
    }
    if (useGolden) {
      e = x < m ? b - x : a - x
      d = C * e
    }
    const u = Math.abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1)
    const fu = -H(u)
    if (fu <= fx) {
      if (u < x) b = x
      else a = x
      v = w
      fv = fw
      w = x
      fw = fx
      x = u
      fx = fu
    } else {
      if (u < x) a = u
      else b = u
      if (fu <= fw || w === x) {
        v = w
        fv = fw
        w = u
        fw = fu
      } else if (fu <= fv || v === x || v === w) {
        v = u
        fv = fu
      }
    }
  }
  return { u: x, h: -fx }
}

/** Root of a monotone function g on a bracket [a, b] with g(a), g(b) of opposite sign (Brent 1973 zero, via bisection/secant/inverse-quadratic). */
export function findRoot(g: (x: number) => number, a: number, b: number, tol = 1e-14): number {
  let fa = g(a)
  let fb = g(b)
  if (fa === 0) return a
  if (fb === 0) return b
  if (fa * fb > 0) return NaN
  let c = a
  let fc = fa
  let d = b - a
  let e = d
  for (let iter = 0; iter < 300; iter++) {
    if (fb * fc > 0) {
      c = a
      fc = fa
      d = b - a
      e = d
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b
      b = c
      c = a
      fa = fb
      fb = fc
      fc = fa
    }
    const tol1 = 2 * EPMACH * Math.abs(b) + 0.5 * tol * Math.max(1e-300, Math.abs(b))
    const xm = 0.5 * (c - b)
    if (Math.abs(xm) <= tol1 || fb === 0) return b
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa
      let p: number
      let q: number
      if (a === c) {
        p = 2 * xm * s
        q = 1 - s
      } else {
        const qq = fa / fc
        const r = fb / fc
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1))
        q = (qq - 1) * (r - 1) * (s - 1)
      }
      if (p > 0) q = -q
      p = Math.abs(p)
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) {
        e = d
        d = p / q
      } else {
        d = xm
        e = d
      }
    } else {
      d = xm
      e = d
    }
    a = b
    fa = fb
    b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1
    fb = g(b)
  }
  return b
}

export type Hint = { center: number; scale: number }

/**
 * ∫ exp(h(u)) du over the real line, computed as exp(hmax)·∫ exp(h − hmax) so that very peaked or very small
 * integrands neither underflow nor overflow. Modes are located from the hints, the range is cut where h falls
 * 80 below its maximum (neglected mass < 1e-30 relative), breakpoints are placed at mode ± scale·3^j so that
 * long tails are resolved, and the panels are kept for moments and quantiles.
 */
export class LogIntegral {
  readonly logMax: number
  readonly integral: number
  readonly logValue: number
  readonly panels: Panel[]
  readonly lower: number
  readonly upper: number
  private readonly h: (u: number) => number
  private cumulative: number[] | null = null

  constructor(h: (u: number) => number, hints: Hint[], options: { epsrel?: number } = {}) {
    this.h = h
    const modes = findModes(h, hints)
    let logMax = Math.max(...modes.map((m) => m.h))
    // Zero everywhere: the prior puts no mass where the data have any likelihood (or the reverse), in floating point.
    if (!Number.isFinite(logMax)) throw new EngineInputError('prior', 'The prior and the data do not overlap anywhere that can be computed: the prior puts no probability where the data lie.')
    const { lower, upper } = cutRange(h, modes, logMax)
    const points = [lower, upper]
    for (const m of modes) {
      points.push(m.u)
      for (let k = 1; m.u - k * m.scale > lower || m.u + k * m.scale < upper; k *= 3) points.push(m.u - k * m.scale, m.u + k * m.scale)
    }
    const breaks = [...new Set(points.filter((p) => p >= lower && p <= upper))].sort((x, y) => x - y)
    const epsrel = options.epsrel ?? 1e-12
    let seen = logMax
    let result = integrate(
      (u) => {
        const v = h(u)
        if (v > seen) seen = v
        return Number.isNaN(v) ? 0 : Math.exp(v - logMax)
      },
      breaks,
      { epsrel },
    )
    if (seen > logMax + 1) {
      logMax = seen
      result = integrate((u) => Math.exp(h(u) - logMax), breaks, { epsrel })
    }
    this.logMax = logMax
    this.integral = result.value
    this.logValue = logMax + Math.log(result.value)
    this.panels = result.panels
    this.lower = lower
    this.upper = upper
  }

  /** The G–K 21 nodes of the final panels with weights summing to ≈ 1: a quadrature rule for the normalised density. */
  nodes(): { u: number; weight: number }[] {
    const out: { u: number; weight: number }[] = []
    for (const p of this.panels) {
      const centr = 0.5 * (p.a + p.b)
      const hlgth = 0.5 * (p.b - p.a)
      out.push({ u: centr, weight: (WGK[10] * hlgth * this.weight(centr)) / this.integral })
      for (let j = 0; j < 10; j++) {
        const absc = hlgth * XGK[j]
        out.push({ u: centr - absc, weight: (WGK[j] * hlgth * this.weight(centr - absc)) / this.integral })
        out.push({ u: centr + absc, weight: (WGK[j] * hlgth * this.weight(centr + absc)) / this.integral })
      }
    }
    return out
  }

  /** exp(h(u) − logMax). */
  weight(u: number): number {
    const v = this.h(u)
    return Number.isNaN(v) ? 0 : Math.exp(v - this.logMax)
  }

  /** E[g(u)] under the normalised density exp(h)/∫exp(h), by adaptive integration refining the stored panels. */
  expect(g: (u: number) => number, epsrel = 1e-12): number {
    const points = [this.panels[0].a, ...this.panels.map((p) => p.b)]
    const r = integrate((u) => g(u) * this.weight(u), points, { epsrel, epsRelAbs: 1e-14 })
    return r.value / this.integral
  }

  private cumulativeValues(): number[] {
    if (!this.cumulative) {
      const c = [0]
      for (const p of this.panels) c.push(c[c.length - 1] + p.value)
      this.cumulative = c
    }
    return this.cumulative
  }

  /** P(U ≤ u) under the normalised density. */
  cdf(u: number): number {
    if (u <= this.lower) return 0
    if (u >= this.upper) return 1
    const cum = this.cumulativeValues()
    const k = this.panelIndex(u)
    const p = this.panels[k]
    const part = u > p.a ? gaussKronrod21((v) => this.weight(v), p.a, u).value : 0
    return Math.min(1, Math.max(0, (cum[k] + part) / this.integral))
  }

  private panelIndex(u: number): number {
    let lo = 0
    let hi = this.panels.length - 1
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1
      if (this.panels[mid].a <= u) lo = mid
      else hi = mid - 1
    }
    return lo
  }

  /** The p-quantile of U: locate the panel by cumulative sums, then Newton steps safeguarded by bisection. */
  quantile(p: number): number {
    const cum = this.cumulativeValues()
    const target = p * this.integral
    let k = 0
    while (k < this.panels.length - 1 && cum[k + 1] < target) k++
    const panel = this.panels[k]
    const need = target - cum[k]
    let a = panel.a
    let b = panel.b
    let u = panel.a + (panel.b - panel.a) * Math.min(1, Math.max(0, need / panel.value))
    for (let iter = 0; iter < 100; iter++) {
      const f = (u > panel.a ? gaussKronrod21((v) => this.weight(v), panel.a, u).value : 0) - need
      if (f === 0) return u
      if (f < 0) a = u
      else b = u
      let next = u - f / this.weight(u)
      if (Math.abs(next - u) <= 1e-15 * Math.max(Math.abs(u), panel.b - panel.a)) return next
      if (!(next > a && next < b) || !Number.isFinite(next)) next = 0.5 * (a + b)
      if (b - a <= 4e-16 * Math.abs(u)) return next
      u = next
    }
    return u
  }
}

function findModes(h: (u: number) => number, hints: Hint[]): { u: number; h: number; scale: number }[] {
  const found: { u: number; h: number; scale: number }[] = []
  for (const hint of hints) {
    if (!Number.isFinite(hint.center) || !(hint.scale > 0) || !Number.isFinite(hint.scale)) continue
    const m = maximize(h, hint.center, hint.scale)
    if (!Number.isFinite(m.h)) continue
    const scale = curvatureScale(h, m.u, m.h, hint.scale)
    if (found.some((f) => Math.abs(f.u - m.u) < 0.5 * Math.min(f.scale, scale))) continue
    found.push({ u: m.u, h: m.h, scale })
  }
  return found.length ? found : [{ u: hints[0]?.center ?? 0, h: h(hints[0]?.center ?? 0), scale: hints[0]?.scale ?? 1 }]
}

function curvatureScale(h: (u: number) => number, u: number, hu: number, guess: number): number {
  let delta = 0.1 * guess
  for (let i = 0; i < 4; i++) {
    const second = (h(u + delta) - 2 * hu + h(u - delta)) / (delta * delta)
    if (second < 0 && Number.isFinite(second)) {
      const s = 1 / Math.sqrt(-second)
      if (s > 0.2 * delta || i === 3) return s
      delta = s
    } else {
      break
    }
  }
  return guess
}

function cutRange(h: (u: number) => number, modes: { u: number; scale: number }[], logMax: number): { lower: number; upper: number } {
  const floor = logMax - 80
  const left = modes.reduce((m, x) => (x.u < m.u ? x : m))
  const right = modes.reduce((m, x) => (x.u > m.u ? x : m))
  const walk = (start: number, scale: number, dir: 1 | -1): number => {
    let k = 4
    let u = start + dir * k * scale
    for (let i = 0; i < 80; i++) {
      const v = h(u)
      if (!(v > floor)) return u
      k *= 2
      u = start + dir * k * scale
    }
    return u
  }
  return { lower: walk(left.u, left.scale, -1), upper: walk(right.u, right.scale, 1) }
}
