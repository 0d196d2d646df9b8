import { describe, expect, it } from 'vitest'
import { findRoot, gaussKronrod21, integrate, LogIntegral, maximize } from '@shared/stats/quadrature'
import { expectRel } from './checks'

// G10–K21 as in QUADPACK (Piessens et al. 1983): the Kronrod rule is exact for polynomials of degree ≤ 31, the embedded
// Gauss rule for degree ≤ 19, so the error estimate vanishes up to degree 19 and not beyond.
describe('Gauss–Kronrod 21-point rule', () => {
  it('integrates x^30 on [−1, 1] exactly and x^20 with a non-zero error estimate', () => {
    expect(Math.abs(gaussKronrod21((x) => x ** 30, -1, 1).value - 2 / 31)).toBeLessThan(1e-16)
    expect(Math.abs(gaussKronrod21((x) => x ** 18, -1, 1).value - 2 / 19)).toBeLessThan(1e-16)
    expect(gaussKronrod21((x) => x ** 18, -1, 1).error).toBeLessThan(1e-14)
    expect(gaussKronrod21((x) => x ** 20, -1, 1).error).toBeGreaterThan(1e-12)
  })

  it('adaptive integration handles an endpoint singularity and breakpoints', () => {
    expectRel(integrate((x) => 1 / Math.sqrt(x), [0, 1]).value, 2, 1e-10)
    expectRel(integrate((x) => Math.exp(-x * x), [-30, -3, 0, 3, 30]).value, Math.sqrt(Math.PI), 1e-14)
    expectRel(integrate((x) => Math.log(x), [0, 1]).value, -1, 1e-10)
  })
})

describe('log-space integration', () => {
  it('an integrand of size e^(−20000) is integrated without underflow', () => {
    const h = (u: number): number => -20000 - 0.5 * ((u - 7) / 0.003) ** 2
    const li = new LogIntegral(h, [{ center: 0, scale: 1 }])
    expectRel(li.logValue, -20000 + Math.log(0.003 * Math.sqrt(2 * Math.PI)), 1e-14)
    expectRel(li.expect((u) => u), 7, 1e-13)
    expectRel(li.quantile(0.975), 7 + 0.003 * 1.959963984540054, 1e-13)
    expectRel(li.cdf(7), 0.5, 1e-13)
  })

  it('two separated modes are both found and the total mass is right', () => {
    const h = (u: number): number => Math.log(0.3 * Math.exp(-0.5 * (u + 20) ** 2) + 0.7 * Math.exp(-0.5 * ((u - 15) / 0.1) ** 2) / 0.1)
    const li = new LogIntegral(h, [{ center: -20, scale: 1 }, { center: 15, scale: 0.1 }])
    expectRel(Math.exp(li.logValue), Math.sqrt(2 * Math.PI), 1e-12)
    expectRel(li.cdf(0), 0.3, 1e-12)
  })

  it('heavy (polynomial) tails are resolved by geometric breakpoints', () => {
    const cauchy = (u: number): number => -Math.log(Math.PI) - Math.log1p(u * u)
    const li = new LogIntegral(cauchy, [{ center: 0, scale: 1 }])
    expectRel(Math.exp(li.logValue), 1, 1e-9)
    expectRel(li.quantile(0.9), Math.tan(Math.PI * 0.4), 1e-9)
  })
})

describe('one-dimensional search', () => {
  it('maximize finds the mode from far away; findRoot solves a bracketed equation', () => {
    expect(Math.abs(maximize((u) => -((u - 123.4) ** 2), 0, 1).u - 123.4)).toBeLessThan(1e-3)
    expectRel(findRoot((x) => x * x - 2, 0, 2, 1e-15), Math.SQRT2, 1e-15)
  })
})
