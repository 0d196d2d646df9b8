import { describe, expect, it } from 'vitest'
import { correlationWithEigenvalueFloor, EngineInputError, nearestCorrelation, sampleJoint } from '../../../shared/stats/index'
import { choleskyLower, symmetricEigen } from '../../../shared/stats/matrix'

// Constructed: [[1, ½, −½], [½, 1, ½], [−½, ½, 1]] = 1.5 I − ½ vvᵀ with v = (1, −1, 1) has eigenvalues 0, 1.5, 1.5 — the
// nearest correlation matrix of [[1, 0.9, −0.9], [0.9, 1, 0.9], [−0.9, 0.9, 1]], singular as such repairs are.
const SINGULAR = [[1, 0.5, -0.5], [0.5, 1, 0.5], [-0.5, 0.5, 1]]

describe('correlationWithEigenvalueFloor', () => {
  it('lifts a singular correlation matrix to the floor, keeps a unit diagonal and moves entries by about the floor', () => {
    const floored = correlationWithEigenvalueFloor(SINGULAR, 1e-6)
    expect(floored.map((row, i) => row[i])).toEqual([1, 1, 1])
    expect(floored.every((row, i) => row.every((x, j) => x === floored[j][i]))).toBe(true)
    const low = Math.min(...symmetricEigen(floored).values)
    expect(low).toBeGreaterThan(0.99e-6)
    expect(low).toBeLessThan(1.01e-6)
    floored.forEach((row, i) => row.forEach((x, j) => expect(Math.abs(x - SINGULAR[i][j])).toBeLessThan(2e-6)))
    // The multivariate normal's Cholesky factor now has a positive diagonal; the singular matrix's has a zero.
    expect(choleskyLower(SINGULAR, 1e-12)!.some((row, i) => row[i] === 0)).toBe(true)
    expect(choleskyLower(floored, 1e-12)!.every((row, i) => row[i] > 0)).toBe(true)
  })

  it('is what the repair of a matrix that cannot hold together needs: Higham’s answer is singular', () => {
    const nearest = nearestCorrelation([[1, 0.9, -0.9], [0.9, 1, 0.9], [-0.9, 0.9, 1]])
    nearest.matrix.forEach((row, i) => row.forEach((x, j) => expect(x).toBeCloseTo(SINGULAR[i][j], 10)))
    expect(Math.min(...symmetricEigen(nearest.matrix).values)).toBeLessThan(1e-12)
    expect(sampleJoint([{ family: 'normal', mu: 0, sigma: 1 }, { family: 'normal', mu: 0, sigma: 1 }, { family: 'normal', mu: 0, sigma: 1 }], correlationWithEigenvalueFloor(nearest.matrix, 1e-6), 5, 1)).toHaveLength(5)
  })

  it('returns a matrix above the floor unchanged, and refuses a floor outside (0, 1)', () => {
    const fine = [[1, 0.3], [0.3, 1]]
    expect(correlationWithEigenvalueFloor(fine, 1e-6)).toEqual(fine)
    for (const floor of [0, 1, Number.NaN]) {
      let caught: unknown
      try {
        correlationWithEigenvalueFloor(fine, floor)
      } catch (error) {
        caught = error
      }
      expect(caught).toBeInstanceOf(EngineInputError)
      expect((caught as EngineInputError).field).toBe('floor')
    }
  })
})
