// Derivatives of the regularised incomplete gamma function P(a, x) with respect to the shape a, summed term by term
// alongside the series and the continued fraction that give P itself, so that a gamma fit converges to the true
// stationary point at any shape (a fixed-step difference in the shape is off by its step error, which grows with √a).
import { digamma, gammaPQ, logGammaPrefactor } from './special'

const TINY = 1e-300
const EPS = 2.220446049250313e-16
/** Above this shape the series below the mode needs more than ~10⁴ terms (√a of them); differences of P are used instead. */
const SERIES_MAX_SHAPE = 1e7

/** Trigamma ψ′(a) for a > 0: recurrence ψ′(a) = ψ′(a + 1) + 1/a² up to a ≥ 10, then the asymptotic series (Abramowitz & Stegun 1964, 6.4.12). */
export function trigamma(a: number): number {
  let shift = 0
  while (a < 10) {
    shift += 1 / (a * a)
    a += 1
  }
  const r = 1 / a
  const r2 = r * r
  return shift + r + r2 / 2 + r * r2 * (1 / 6 - r2 * (1 / 30 - r2 * (1 / 42 - r2 * (1 / 30 - (r2 * 5) / 66))))
}

/**
 * P(a, x), ∂P/∂a and ∂²P/∂a² into out[0..2], and the prefactor x^a e^(−x)/Γ(a) = x·f(x) into out[3]. P = prefactor × S
 * with the series S = Σ xⁿ/(a(a+1)…(a+n)) for x < a + 1, and Q = prefactor × C with Lentz's continued fraction C
 * otherwise (Press et al. 2007, Numerical Recipes 3rd ed., §6.2); each term (each convergent) is differentiated
 * exactly in a, and ∂ ln prefactor/∂a = ln x − ψ(a), ∂² ln prefactor/∂a² = −ψ′(a).
 */
export function gammaPShapeDerivatives(a: number, x: number, out: Float64Array): void {
  if (!(x > 0)) {
    out[0] = x === Infinity ? 1 : 0
    out[1] = out[2] = out[3] = 0
    return
  }
  const logPre = logGammaPrefactor(a, x)
  const pre = Math.exp(logPre)
  if (a > SERIES_MAX_SHAPE && x < a + 1) {
    shapeDifferences(a, x, out)
    out[3] = pre
    return
  }
  const l1 = Math.log(x) - digamma(a)
  const l2 = -trigamma(a)
  if (x < a + 1) {
    // t₀ = 1/a, tₙ = tₙ₋₁ x/(a + n); d ln tₙ/da = −Hₙ, d² ln tₙ/da² = Gₙ with Hₙ = Σₖ≤ₙ 1/(a + k), Gₙ = Σₖ≤ₙ 1/(a + k)²
    let t = 1 / a
    let h = 1 / a
    let g = h * h
    let s0 = t
    let s1 = -t * h
    let s2 = t * (h * h + g)
    for (let n = 1; n < 1_000_000; n++) {
      const inv = 1 / (a + n)
      t *= x * inv
      h += inv
      g += inv * inv
      const d1 = -t * h
      const d2 = t * (h * h + g)
      s0 += t
      s1 += d1
      s2 += d2
      if (Math.abs(t) < Math.abs(s0) * 1e-17 && Math.abs(d1) < Math.abs(s1) * 1e-17 && Math.abs(d2) <= Math.abs(s2) * 1e-17) break
    }
    const p = Math.min(1, pre * s0)
    const r1 = s1 / s0
    const dl = l1 + r1
    out[0] = p
    out[1] = pre * s0 * dl
    out[2] = pre * s0 * (dl * dl + l2 + s2 / s0 - r1 * r1)
    out[3] = pre
    return
  }
  // Lentz's method on value, first and second derivative in a together (second-order Taylor arithmetic)
  let b0 = x + 1 - a
  const b1 = -1
  let c0 = 1 / TINY
  let c1 = 0
  let c2 = 0
  // d = 1/b
  let d0 = 1 / b0
  let d1 = -b1 * d0 * d0
  let d2 = 2 * b1 * b1 * d0 * d0 * d0
  let h0 = d0
  let h1 = d1
  let h2 = d2
  for (let i = 1; i < 1_000_000; i++) {
    const an0 = -i * (i - a)
    const an1 = i
    b0 += 2
    // d ← an·d + b
    let e0 = an0 * d0 + b0
    let e1 = an1 * d0 + an0 * d1 + b1
    let e2 = 2 * an1 * d1 + an0 * d2
    if (Math.abs(e0) < TINY) {
      e0 = TINY
      e1 = e2 = 0
    }
    // c ← b + an/c
    const ic0 = 1 / c0
    const ic1 = -c1 * ic0 * ic0
    const ic2 = -c2 * ic0 * ic0 + 2 * c1 * c1 * ic0 * ic0 * ic0
    c0 = b0 + an0 * ic0
    c1 = b1 + an1 * ic0 + an0 * ic1
    c2 = 2 * an1 * ic1 + an0 * ic2
    if (Math.abs(c0) < TINY) {
      c0 = TINY
      c1 = c2 = 0
    }
    // d ← 1/d
    d0 = 1 / e0
    d1 = -e1 * d0 * d0
    d2 = -e2 * d0 * d0 + 2 * e1 * e1 * d0 * d0 * d0
    // del = d·c, h ← h·del
    const del0 = d0 * c0
    const del1 = d1 * c0 + d0 * c1
    const del2 = d2 * c0 + 2 * d1 * c1 + d0 * c2
    const nh0 = h0 * del0
    const nh1 = h1 * del0 + h0 * del1
    const nh2 = h2 * del0 + 2 * h1 * del1 + h0 * del2
    h0 = nh0
    h1 = nh1
    h2 = nh2
    if (Math.abs(del0 - 1) <= EPS && Math.abs(del1) <= EPS * (1 + Math.abs(h1 / h0)) && Math.abs(del2) <= EPS * (1 + Math.abs(h2 / h0))) break
  }
  const q = Math.min(1, pre * h0)
  const r1 = h1 / h0
  const dl = l1 + r1
  out[0] = 1 - q
  out[1] = -pre * h0 * dl
  out[2] = -pre * h0 * (dl * dl + l2 + h2 / h0 - r1 * r1)
  out[3] = pre
}

/**
 * P(a, x) and its shape derivatives at very large shape by Richardson's five-point differences in ln a (Press et al. 2007,
 * Numerical Recipes 3rd ed., §5.7), the step scaled to the distribution's width: P depends on a through (x − a)/√a, so a
 * step of 10⁻²/√a in ln a moves it by about 10⁻² (truncation ~10⁻⁹, rounding ~10⁻¹² in the first derivative).
 */
function shapeDifferences(a: number, x: number, out: Float64Array): void {
  const h = 1e-2 / Math.sqrt(a)
  const f = (k: number): number => gammaPQ(a * Math.exp(k * h), x).p
  const f0 = f(0)
  const p1 = f(1)
  const m1 = f(-1)
  const p2 = f(2)
  const m2 = f(-2)
  const d1 = (8 * (p1 - m1) - (p2 - m2)) / (12 * h)
  const d2 = (-(p2 + m2) + 16 * (p1 + m1) - 30 * f0) / (12 * h * h)
  out[0] = f0
  out[1] = d1 / a
  out[2] = (d2 - d1) / (a * a)
}
