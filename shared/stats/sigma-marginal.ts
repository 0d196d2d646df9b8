// The likelihood of a normal mean μ with σ integrated out over its prior, for the normal data model with unknown σ.
// It depends on μ only through q = S + n(x̄ − μ)², and not on the prior of μ, so one table serves every candidate prior,
// every width of the sweep and every step of the tipping point.

import { LogIntegral, type Hint } from './quadrature'

const LN_2PI = Math.log(2 * Math.PI)

/** The σ prior on an unconstrained scale v: σ = theta(v), logPrior(v) the log density of v (Jacobian included). */
export interface SigmaScale {
  theta(v: number): number
  logPrior(v: number): number
  /** Hints (centre and scale on v) for the σ prior, and for a likelihood peak at σ. */
  hints(sigma: number | null, spread: number | null): Hint[]
}

/** Chebyshev points of the first kind on [−1, 1] and their barycentric weights (Berrut & Trefethen 2004, SIAM Review 46, §5). */
function chebyshevRule(count: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(count)
  const w = new Float64Array(count)
  for (let k = 0; k < count; k++) {
    const angle = (Math.PI * (2 * k + 1)) / (2 * count)
    x[k] = Math.cos(angle)
    w[k] = (k % 2 === 0 ? 1 : -1) * Math.sin(angle)
  }
  return { x, w }
}

const POINTS = 18
const RULE = chebyshevRule(POINTS)
/** Checks between the nodes that a piece must pass, as fractions of the piece. */
const CHECKS = [0.03, 0.21, 0.5, 0.77, 0.96]
/** Agreement asked of a piece with the direct integral at the checks: 2e-13 relative to max(1, |log M|). */
const PIECE_TOLERANCE = 2e-13
const PIECE_WIDTH = 4
const MAX_DEPTH = 5

type Piece = { a: number; b: number; values: Float64Array } | { a: number; b: number; direct: true } | { a: number; b: number; left: Piece; right: Piece; mid: number }

function barycentric(values: Float64Array, a: number, b: number, t: number): number {
  const s = (2 * t - a - b) / (b - a)
  let num = 0
  let den = 0
  for (let k = 0; k < POINTS; k++) {
    const d = s - RULE.x[k]
    if (d === 0) return values[k]
    const c = RULE.w[k] / d
    num += c * values[k]
    den += c
  }
  return num / den
}

/**
 * log M(q), M(q) = ∫ p(σ) (2πσ²)^(−n/2) exp(−q / 2σ²) dσ, by adaptive Gauss–Kronrod quadrature on v (the direct value), and
 * a lazily built piecewise Chebyshev interpolant in t = log(q + q0) whose every piece is checked against the direct value
 * between its nodes (pieces that do not reach the tolerance after halving are evaluated directly).
 */
export class SigmaMarginal {
  private readonly q0: number
  private readonly t0: number
  private readonly pieces = new Map<number, Piece>()

  constructor(
    private readonly scale: SigmaScale,
    private readonly n: number,
    private readonly ss: number,
    typicalSigma: number,
  ) {
    this.q0 = ss > 0 ? 0 : (typicalSigma * typicalSigma) / 100
    this.t0 = Math.log(ss + this.q0)
  }

  /** log M(q) by adaptive quadrature over v = the σ prior's unconstrained scale. */
  direct(q: number): number {
    const { n } = this
    const { theta, logPrior } = this.scale
    const h = (v: number): number => {
      const sigma = theta(v)
      if (!(sigma > 0) || !Number.isFinite(sigma)) return -Infinity
      return logPrior(v) - n * Math.log(sigma) - (n / 2) * LN_2PI - q / (2 * sigma * sigma)
    }
    const peak = q > 0 ? Math.sqrt(q / n) : null
    const hints = this.scale.hints(peak, peak === null ? null : peak / Math.sqrt(2 * n))
    // h is known to about 1e-16 of its size only, so the integral cannot be asked for more than that relative to |log M|.
    const size = Math.max(1, ...hints.map((hint) => Math.abs(h(hint.center))).filter(Number.isFinite))
    return new LogIntegral(h, hints, { epsrel: 1e-13 * size }).logValue
  }

  /** log M(q) for q ≥ S from the interpolant (q is S + n(x̄ − μ)²). */
  logM(q: number): number {
    const t = Math.log(Math.max(q, this.ss) + this.q0)
    if (!Number.isFinite(t)) return q === Infinity ? -Infinity : NaN
    const index = Math.floor((t - this.t0) / PIECE_WIDTH)
    let piece = this.pieces.get(index)
    if (!piece) {
      const a = this.t0 + index * PIECE_WIDTH
      piece = this.build(a, a + PIECE_WIDTH, 0)
      this.pieces.set(index, piece)
    }
    while ('left' in piece) piece = t < piece.mid ? piece.left : piece.right
    if ('direct' in piece) return this.direct(Math.exp(t) - this.q0)
    return barycentric(piece.values, piece.a, piece.b, t)
  }

  private atT(t: number): number {
    return this.direct(Math.max(this.ss, Math.exp(t) - this.q0))
  }

  private build(a: number, b: number, depth: number): Piece {
    const values = new Float64Array(POINTS)
    for (let k = 0; k < POINTS; k++) values[k] = this.atT(0.5 * (a + b) + 0.5 * (b - a) * RULE.x[k])
    const finite = values.every((v) => Number.isFinite(v))
    const passes =
      finite &&
      CHECKS.every((f) => {
        const t = a + f * (b - a)
        const exact = this.atT(t)
        return Math.abs(barycentric(values, a, b, t) - exact) <= PIECE_TOLERANCE * Math.max(1, Math.abs(exact))
      })
    if (passes) return { a, b, values }
    if (depth >= MAX_DEPTH || !finite) return { a, b, direct: true }
    const mid = 0.5 * (a + b)
    return { a, b, mid, left: this.build(a, mid, depth + 1), right: this.build(mid, b, depth + 1) }
  }
}
