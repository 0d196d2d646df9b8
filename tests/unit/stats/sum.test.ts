import { describe, expect, it } from 'vitest'
import { decimalSum } from '../../../shared/stats/index'

// Expected values are the exact decimal sums of the terms as written (constructed by hand).
describe('decimalSum: sums of numbers read from decimal text', () => {
  it('gives the decimal total where the floating-point sum misses it', () => {
    const exposures = [1.1, 0.85, 1.4, 0.95, 1.25, 0.6, 1.05, 0.8]
    expect(exposures.reduce((s, x) => s + x, 0)).toBe(7.999999999999999)
    expect(decimalSum(exposures)).toBe(8)
    expect(decimalSum([0.1, 0.2])).toBe(0.3)
    expect(decimalSum(Array(10).fill(0.1))).toBe(1)
    expect(decimalSum([1.005, 2.1, -0.105])).toBe(3)
    expect(decimalSum([2.5e-7, 1e-7])).toBe(3.5e-7)
    expect(decimalSum([3, 4, 5])).toBe(12)
    expect(decimalSum([])).toBe(0)
  })

  it('leaves terms with more decimals than a double holds as they are', () => {
    expect(decimalSum([1 / 3, 1 / 3])).toBe(1 / 3 + 1 / 3)
  })
})
