import { quantileFunction, validateDistribution } from './distributions'
import { EngineInputError, requireFinite } from './errors'
import { choleskyLower, requireSymmetric, symmetricEigen } from './matrix'
import { seededUniform } from './random'
import { normCdf } from './special'
import type { NearestCorrelation, PriorDistribution } from './types'

function requireProbability(p: number, field: string, label: string): void {
  requireFinite(p, field, label)
  if (!(p > 0 && p < 1)) throw new EngineInputError(field, `${label} must be strictly between 0 and 1.`)
}

/**
 * Gaussian-copula correlation from P(Y above its median | X above its median) = p, by the orthant probability of the
 * bivariate normal, P(both above) = 1/4 + arcsin(ρ)/(2π) (Sheppard 1899, Phil. Trans. R. Soc. A 192; Kendall & Stuart,
 * The Advanced Theory of Statistics, vol. 1, bivariate normal orthant probabilities), so p = 1/2 + arcsin(ρ)/π.
 */
export function copulaCorrelationFromConditional(p: number): number {
  requireProbability(p, 'p', 'The probability')
  return Math.sin(Math.PI * (p - 0.5))
}

/** The conditional probability p = 1/2 + arcsin(ρ)/π that a Gaussian-copula correlation ρ implies (Sheppard 1899). */
export function conditionalFromCopulaCorrelation(rho: number): number {
  requireFinite(rho, 'rho', 'The correlation')
  if (!(rho >= -1 && rho <= 1)) throw new EngineInputError('rho', 'The correlation must be between −1 and 1.')
  return 0.5 + Math.asin(rho) / Math.PI
}

/** Spearman's rank correlation of a Gaussian copula with correlation ρ: (6/π) arcsin(ρ/2) (Pearson 1907; Kruskal 1958, JASA 53, §4). */
export function rankCorrelationOfCopula(rho: number): number {
  requireFinite(rho, 'rho', 'The correlation')
  if (!(rho >= -1 && rho <= 1)) throw new EngineInputError('rho', 'The correlation must be between −1 and 1.')
  return (6 / Math.PI) * Math.asin(rho / 2)
}

/** Weighted pool of correlations on Fisher's z scale, tanh(Σ wᵢ atanh ρᵢ / Σ wᵢ) (Fisher 1921, Metron 1, "On the probable error of a coefficient of correlation"). */
export function poolCorrelations(rhos: number[], weights: number[]): number {
  if (!Array.isArray(rhos) || rhos.length === 0) throw new EngineInputError('rhos', 'Give at least one correlation to pool.')
  if (!Array.isArray(weights) || weights.length !== rhos.length) throw new EngineInputError('weights', 'Give one weight per correlation.')
  let total = 0
  let z = 0
  rhos.forEach((r, i) => {
    requireFinite(r, 'rhos', `Correlation ${i + 1}`)
    if (!(r > -1 && r < 1)) throw new EngineInputError('rhos', `Correlation ${i + 1} must be strictly between −1 and 1.`)
    const w = weights[i]
    requireFinite(w, 'weights', `Weight ${i + 1}`)
    if (w < 0) throw new EngineInputError('weights', `Weight ${i + 1} must not be negative.`)
    total += w
    z += w * Math.atanh(r)
  })
  if (!(total > 0)) throw new EngineInputError('weights', 'At least one weight must be greater than 0.')
  return Math.tanh(z / total)
}

function frobenius(A: number[][]): number {
  return Math.sqrt(A.reduce((s, row) => s + row.reduce((t, x) => t + x * x, 0), 0))
}

/** The projection onto the positive semi-definite matrices in the Frobenius norm: negative eigenvalues set to 0 (Higham 2002, Theorem 3.2 with W = I). */
function projectPsd(S: number[][]): number[][] {
  const { values, vectors } = symmetricEigen(S)
  const n = S.length
  const out = Array.from({ length: n }, () => new Array<number>(n).fill(0))
  for (let k = 0; k < n; k++) {
    const lam = Math.max(values[k], 0)
    if (lam === 0) continue
    for (let i = 0; i < n; i++) {
      const vi = vectors[i][k] * lam
      for (let j = 0; j < n; j++) out[i][j] += vi * vectors[j][k]
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) out[i][j] = out[j][i] = (out[i][j] + out[j][i]) / 2
  return out
}

/**
 * The correlation matrix nearest to a symmetric matrix in the Frobenius norm, by alternating projections with Dykstra's
 * correction (Higham 2002, "Computing the nearest correlation matrix — a problem from finance", IMA J. Numer. Anal. 22,
 * Algorithm 3.3, W = I), with how far each entry moved. A matrix that is already a correlation matrix comes back unchanged.
 */
export function nearestCorrelation(R: number[][], tolerance = 1e-12): NearestCorrelation {
  requireSymmetric(R, 'R')
  const minEigenvalue = Math.min(...symmetricEigen(R).values)
  const unitDiagonal = R.every((row, i) => row[i] === 1)
  if (unitDiagonal && minEigenvalue >= -1e-14) {
    return { matrix: R.map((row) => [...row]), maxChange: 0, changes: R.map((row) => row.map(() => 0)), minEigenvalue, iterations: 0 }
  }
  let Y = R.map((row) => [...row])
  let dS = R.map((row) => row.map(() => 0))
  let X = Y
  let iterations = 0
  // Convergence is linear; the cap bounds the time, and the scaled positive semi-definite iterate is a valid answer either way.
  for (; iterations < 5000; iterations++) {
    const Rk = Y.map((row, i) => row.map((y, j) => y - dS[i][j]))
    X = projectPsd(Rk)
    dS = X.map((row, i) => row.map((x, j) => x - Rk[i][j]))
    const Ynext = X.map((row, i) => row.map((x, j) => (i === j ? 1 : x)))
    const gap = frobenius(X.map((row, i) => row.map((x, j) => x - Ynext[i][j]))) / frobenius(Ynext)
    const step = frobenius(Ynext.map((row, i) => row.map((y, j) => y - Y[i][j]))) / frobenius(Ynext)
    Y = Ynext
    if (gap <= tolerance && step <= tolerance) break
  }
  // X is positive semi-definite; scaling it to a unit diagonal keeps it so (the change is of the order of the tolerance).
  const d = X.map((row, i) => Math.sqrt(Math.max(row[i], 1e-300)))
  const matrix = X.map((row, i) => row.map((x, j) => (i === j ? 1 : Math.max(-1, Math.min(1, x / (d[i] * d[j]))))))
  const changes = matrix.map((row, i) => row.map((x, j) => x - R[i][j]))
  const maxChange = Math.max(...changes.map((row) => Math.max(...row.map(Math.abs))))
  return { matrix, maxChange, changes, minEigenvalue, iterations: iterations + 1 }
}

/**
 * A correlation matrix whose eigenvalues are raised to at least `floor`, rebuilt from its eigenvectors and rescaled to a
 * unit diagonal (the spectral method of Rebonato & Jäckel 2000, "The most general methodology to create a valid
 * correlation matrix for risk management and option pricing purposes", J. Risk 2, from memory). The nearest correlation
 * matrix of a matrix that was not one is singular, which the Cholesky factorisation of a multivariate normal refuses;
 * a floor of 10⁻⁶ moves its entries by about that much. A matrix already above the floor comes back unchanged.
 */
export function correlationWithEigenvalueFloor(R: number[][], floor: number): number[][] {
  requireSymmetric(R, 'R')
  requireFinite(floor, 'floor', 'The eigenvalue floor')
  if (!(floor > 0 && floor < 1)) throw new EngineInputError('floor', 'The eigenvalue floor must be strictly between 0 and 1.')
  const { values, vectors } = symmetricEigen(R)
  if (Math.min(...values) >= floor) return R.map((row) => [...row])
  const n = R.length
  const S = Array.from({ length: n }, () => new Array<number>(n).fill(0))
  for (let k = 0; k < n; k++) {
    const lam = Math.max(values[k], floor)
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) S[i][j] += vectors[i][k] * lam * vectors[j][k]
  }
  const d = S.map((row, i) => Math.sqrt(row[i]))
  return S.map((row, i) => row.map((x, j) => (i === j ? 1 : (x / (d[i] * d[j]) + S[j][i] / (d[i] * d[j])) / 2)))
}

/** Throws EngineInputError('R') unless R is a k × k correlation matrix (unit diagonal, entries in [−1, 1], positive semi-definite); returns its Cholesky factor. */
function correlationFactor(R: number[][], k: number): number[][] {
  requireSymmetric(R, 'R')
  if (R.length !== k) throw new EngineInputError('R', `The correlation matrix must have one row per quantity (${k}), not ${R.length}.`)
  R.forEach((row, i) => {
    if (row[i] !== 1) throw new EngineInputError('R', `A correlation matrix has 1 on its diagonal; entry (${i + 1}, ${i + 1}) is ${row[i]}.`)
    row.forEach((x, j) => {
      if (x < -1 || x > 1) throw new EngineInputError('R', `Entry (${i + 1}, ${j + 1}) is outside [−1, 1].`)
    })
  })
  const L = choleskyLower(R)
  if (!L) throw new EngineInputError('R', 'These correlations cannot hold together (the matrix is not positive semi-definite); repair it with the nearest correlation matrix first.')
  return L
}

/**
 * n joint draws (rows) of the quantities with the given marginals, bound by a Gaussian copula with correlation matrix R:
 * independent normals from a seeded generator (Box–Muller), correlated by the Cholesky factor of R, taken through the normal CDF and
 * each marginal's quantile function (Nelsen 2006, An Introduction to Copulas, 2nd ed., §2.3 Sklar's theorem; §2.9 simulation).
 */
export function sampleJoint(marginals: PriorDistribution[], R: number[][], n: number, seed: number): number[][] {
  if (!Array.isArray(marginals) || marginals.length === 0) throw new EngineInputError('marginals', 'Give at least one marginal distribution.')
  marginals.forEach((d, i) => validateDistribution(d, `marginals[${i}]`))
  const k = marginals.length
  const L = correlationFactor(R, k)
  if (!Number.isInteger(n) || n < 1 || n > 1_000_000) throw new EngineInputError('n', 'The number of draws must be a whole number from 1 to 1,000,000.')
  if (!Number.isInteger(seed)) throw new EngineInputError('seed', 'The seed must be a whole number.')
  const uniform = seededUniform(seed)
  let spare = NaN
  // Box & Muller (1958, Ann. Math. Statist. 29): two uniforms give two independent standard normals.
  const standardNormal = (): number => {
    if (!Number.isNaN(spare)) {
      const z = spare
      spare = NaN
      return z
    }
    const r = Math.sqrt(-2 * Math.log(uniform()))
    const angle = 2 * Math.PI * uniform()
    spare = r * Math.sin(angle)
    return r * Math.cos(angle)
  }
  // Each marginal's quantile function is made once (parameters checked, constants computed), not once per draw.
  const quantiles = marginals.map(quantileFunction)
  const z = new Float64Array(k)
  const out: number[][] = new Array(n)
  for (let draw = 0; draw < n; draw++) {
    for (let i = 0; i < k; i++) z[i] = standardNormal()
    const row = new Array<number>(k)
    for (let i = 0; i < k; i++) {
      const Li = L[i]
      let s = 0
      for (let j = 0; j <= i; j++) s += Li[j] * z[j]
      // The clamp keeps an unbounded marginal's quantile finite for the (rare) draws beyond 8 standard deviations.
      row[i] = quantiles[i](Math.min(1 - 2 ** -53, Math.max(2 ** -60, normCdf(s))))
    }
    out[draw] = row
  }
  return out
}
