import { EngineInputError } from './errors'

/** A square matrix given as rows; throws EngineInputError (field) unless it is square, finite and symmetric to 1e-12. */
export function requireSymmetric(R: number[][], field: string): void {
  if (!Array.isArray(R) || R.length === 0) throw new EngineInputError(field, 'The matrix has no rows.')
  const k = R.length
  R.forEach((row, i) => {
    if (!Array.isArray(row) || row.length !== k) throw new EngineInputError(field, `The matrix must be square: row ${i + 1} has ${Array.isArray(row) ? row.length : 0} entries, not ${k}.`)
    row.forEach((x, j) => {
      if (typeof x !== 'number' || !Number.isFinite(x)) throw new EngineInputError(field, `Entry (${i + 1}, ${j + 1}) is not a finite number.`)
    })
  })
  for (let i = 0; i < k; i++)
    for (let j = 0; j < i; j++)
      if (Math.abs(R[i][j] - R[j][i]) > 1e-12 * Math.max(1, Math.abs(R[i][j])))
        throw new EngineInputError(field, `The matrix must be symmetric: entries (${i + 1}, ${j + 1}) and (${j + 1}, ${i + 1}) differ.`)
}

/** Eigenvalues and eigenvectors (columns of `vectors`) of a symmetric matrix by the cyclic Jacobi method (Golub & Van Loan 2013, Matrix Computations, 4th ed., §8.5). */
export function symmetricEigen(S: number[][]): { values: number[]; vectors: number[][] } {
  const n = S.length
  const a = S.map((row) => [...row])
  const v: number[][] = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)))
  const scale = Math.max(1e-300, Math.sqrt(a.reduce((s, row) => s + row.reduce((t, x) => t + x * x, 0), 0)))
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0
    for (let p = 0; p < n; p++) for (let q = p + 1; q < n; q++) off += a[p][q] * a[p][q]
    if (Math.sqrt(off) <= 1e-15 * scale) break
    for (let p = 0; p < n; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = a[p][q]
        if (apq === 0) continue
        const theta = (a[q][q] - a[p][p]) / (2 * apq)
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1))
        const c = 1 / Math.sqrt(t * t + 1)
        const s = t * c
        for (let k = 0; k < n; k++) {
          const akp = a[k][p]
          const akq = a[k][q]
          a[k][p] = c * akp - s * akq
          a[k][q] = s * akp + c * akq
        }
        for (let k = 0; k < n; k++) {
          const apk = a[p][k]
          const aqk = a[q][k]
          a[p][k] = c * apk - s * aqk
          a[q][k] = s * apk + c * aqk
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k][p]
          const vkq = v[k][q]
          v[k][p] = c * vkp - s * vkq
          v[k][q] = s * vkp + c * vkq
        }
      }
    }
  }
  return { values: a.map((row, i) => row[i]), vectors: v }
}

/**
 * Lower-triangular L with L·Lᵀ = S for a positive semi-definite S (Cholesky–Banachiewicz, Golub & Van Loan 2013, §4.2);
 * a pivot within `tol` of zero gives a zero column (semi-definite), a clearly negative one returns null.
 */
export function choleskyLower(S: number[][], tol = 1e-10): number[][] | null {
  const n = S.length
  const L = Array.from({ length: n }, () => new Array<number>(n).fill(0))
  for (let j = 0; j < n; j++) {
    let d = S[j][j]
    for (let k = 0; k < j; k++) d -= L[j][k] * L[j][k]
    if (d < -tol * Math.max(1, Math.abs(S[j][j]))) return null
    const ljj = d > tol * Math.max(1, Math.abs(S[j][j])) ? Math.sqrt(d) : 0
    L[j][j] = ljj
    for (let i = j + 1; i < n; i++) {
      let s = S[i][j]
      for (let k = 0; k < j; k++) s -= L[i][k] * L[j][k]
      L[i][j] = ljj > 0 ? s / ljj : 0
    }
  }
  return L
}

/** Inverse of a symmetric positive-definite matrix through its Cholesky factor (Golub & Van Loan 2013, §4.2); null when it is singular. */
export function inverseSpd(S: number[][]): number[][] | null {
  const n = S.length
  const L = choleskyLower(S, 1e-12)
  if (!L || L.some((row, i) => !(row[i] > 0))) return null
  // Solve L Lᵀ X = I column by column.
  const X = Array.from({ length: n }, () => new Array<number>(n).fill(0))
  for (let c = 0; c < n; c++) {
    const y = new Array<number>(n).fill(0)
    for (let i = 0; i < n; i++) {
      let s = i === c ? 1 : 0
      for (let k = 0; k < i; k++) s -= L[i][k] * y[k]
      y[i] = s / L[i][i]
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i]
      for (let k = i + 1; k < n; k++) s -= L[k][i] * X[k][c]
      X[i][c] = s / L[i][i]
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) X[i][j] = X[j][i] = (X[i][j] + X[j][i]) / 2
  return X
}
