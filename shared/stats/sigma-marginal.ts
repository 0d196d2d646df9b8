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

const POINTS = 18
/** Chebyshev points of the first kind on [−1, 1] (Trefethen 2013, Approximation Theory and Approximation Practice, ch. 2–3). */
const NODES = Float64Array.from({ length: POINTS }, (_, k) => Math.cos((Math.PI * (2 * k + 1)) / (2 * POINTS)))
/** Checks between the nodes that a piece must pass, as fractions of the piece. */
const CHECKS = [0.03, 0.21, 0.5, 0.77, 0.96]
/** Agreement asked of a piece with the direct value at the checks: 2e-13 relative to max(1, |f|). */
const PIECE_TOLERANCE = 2e-13
const MAX_DEPTH = 5

type Piece = { a: number; b: number; coef: Float64Array } | { a: number; b: number; direct: true } | { a: number; b: number; left: Piece; right: Piece; mid: number }

/** Chebyshev coefficients of the interpolant through values at NODES (the discrete cosine transform; Trefethen 2013, ch. 3). */
function chebyshevCoefficients(values: Float64Array): Float64Array {
  const coef = new Float64Array(POINTS)
  for (let j = 0; j < POINTS; j++) {
    let s = 0
    for (let k = 0; k < POINTS; k++) s += values[k] * Math.cos((Math.PI * j * (2 * k + 1)) / (2 * POINTS))
    coef[j] = ((j === 0 ? 1 : 2) / POINTS) * s
  }
  return coef
}

/** Σ c_j T_j(x) by Clenshaw's recurrence (Clenshaw 1955; Trefethen 2013, ch. 3). */
function clenshaw(coef: Float64Array, x: number): number {
  let b1 = 0
  let b2 = 0
  for (let j = POINTS - 1; j >= 1; j--) {
    const b0 = 2 * x * b1 - b2 + coef[j]
    b2 = b1
    b1 = b0
  }
  return x * b1 - b2 + coef[0]
}

/**
 * A smooth function f(t) kept as piecewise Chebyshev interpolants (18 points a piece), built lazily as they are read: pieces
 * of a fixed width from an origin, each checked against f at five points between its nodes to 2e-13 of max(1, |f|) and
 * halved until it passes (a piece that never passes, or where f is not finite, is read by f itself).
 */
export class CheckedTable {
  private readonly pieces = new Map<number, Piece>()

  constructor(
    private readonly f: (t: number) => number,
    private readonly origin: number,
    private readonly width: number,
    private readonly tolerance = PIECE_TOLERANCE,
  ) {}

  at(t: number): number {
    const index = Math.floor((t - this.origin) / this.width)
    let piece = this.pieces.get(index)
    if (!piece) {
      const a = this.origin + index * this.width
      piece = this.build(a, a + this.width, 0)
      this.pieces.set(index, piece)
    }
    while ('left' in piece) piece = t < piece.mid ? piece.left : piece.right
    if ('direct' in piece) return this.f(t)
    return clenshaw(piece.coef, (2 * t - piece.a - piece.b) / (piece.b - piece.a))
  }

  private build(a: number, b: number, depth: number): Piece {
    const values = new Float64Array(POINTS)
    for (let k = 0; k < POINTS; k++) values[k] = this.f(0.5 * (a + b) + 0.5 * (b - a) * NODES[k])
    const finite = values.every((v) => Number.isFinite(v))
    const coef = finite ? chebyshevCoefficients(values) : null
    const passes =
      coef !== null &&
      CHECKS.every((fraction) => {
        const exact = this.f(a + fraction * (b - a))
        return Math.abs(clenshaw(coef, 2 * fraction - 1) - exact) <= this.tolerance * Math.max(1, Math.abs(exact))
      })
    if (passes) return { a, b, coef: coef! }
    if (depth >= MAX_DEPTH || !finite) return { a, b, direct: true }
    const mid = 0.5 * (a + b)
    return { a, b, mid, left: this.build(a, mid, depth + 1), right: this.build(mid, b, depth + 1) }
  }
}

const PIECE_WIDTH = 4

/**
 * log M(q), M(q) = ∫ p(σ) (2πσ²)^(−n/2) exp(−q / 2σ²) dσ, by adaptive Gauss–Kronrod quadrature on v (the direct value), and
 * a CheckedTable in t = log(q + q0) (pieces 4 wide) for reading it many times. n need not be whole: the likelihood raised
 * to a power α is M with n·α observations read at α·q (power scaling and the fractional Bayes factor).
 */
export class SigmaMarginal {
  private readonly q0: number
  private readonly table: CheckedTable

  constructor(
    private readonly scale: SigmaScale,
    private readonly n: number,
    private readonly ss: number,
    typicalSigma: number,
  ) {
    this.q0 = ss > 0 ? 0 : (typicalSigma * typicalSigma) / 100
    this.table = new CheckedTable((t) => this.direct(Math.max(this.ss, Math.exp(t) - this.q0)), Math.log(ss + this.q0), PIECE_WIDTH)
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

  /** log M(q) for q ≥ S from the table (q is S + n(x̄ − μ)²). */
  logM(q: number): number {
    const t = Math.log(Math.max(q, this.ss) + this.q0)
    if (!Number.isFinite(t)) return q === Infinity ? -Infinity : NaN
    return this.table.at(t)
  }
}
