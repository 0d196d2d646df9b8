import { describe, expect, it } from 'vitest'
import { cdf, EngineInputError, logPdf, mean, pdf, quantile, sd, sf, toUnivariate, type PriorDistribution } from '@shared/stats'
import { lbeta } from '@shared/stats/special'
import fx from './fixtures/far-tails.json'

const rel = (got: number, want: number) => Math.abs(got - want) / Math.abs(want)

// Outside check: fixtures/far-tails.json, written by generate_far_tails.py (mpmath at 60 digits; Student-t through the
// regularised incomplete beta, Abramowitz & Stegun 26.7.1; gamma density in closed form). Constructed cases past 1e154.
describe('Student t with heavy tails (df ≤ 2) far out', () => {
  for (const c of fx.tQuantiles) {
    it(`quantile at p = ${c.p}, df ${c.df}`, () => {
      const q = quantile({ family: 'student-t', mu: 0, sigma: 1, df: c.df }, c.p)
      // the quantile's relative error is the CDF's divided by df (q ∝ p^(−1/df) far out)
      expect(rel(q, c.q)).toBeLessThan(4e-14 / Math.min(1, c.df))
    })
  }
  for (const c of fx.tCdfs) {
    it(`cdf at t = ${c.t}, df ${c.df}, and the upper tail by symmetry`, () => {
      const d: PriorDistribution = { family: 'student-t', mu: 0, sigma: 1, df: c.df }
      const tol = c.cdf < 1e-307 ? 1e-3 : 1e-13 // 5e-309 is subnormal: 15 significant bits only
      expect(rel(cdf(d, c.t), c.cdf)).toBeLessThan(tol)
      expect(rel(sf(d, -c.t), c.cdf)).toBeLessThan(tol)
    })
  }
  for (const c of fx.tLogPdfs) {
    it(`log density at t = ${c.t}, df ${c.df}`, () => {
      expect(rel(logPdf({ family: 'student-t', mu: 0, sigma: 1, df: c.df }, c.t), c.logpdf)).toBeLessThan(1e-14)
    })
  }
})

describe('gamma log density far from the mode at large shape', () => {
  for (const c of fx.gammaLogPdfs) {
    it(`shape ${c.shape}, rate ${c.rate} at x = ${c.x}`, () => {
      expect(rel(logPdf({ family: 'gamma', shape: c.shape, rate: c.rate }, c.x), c.logpdf)).toBeLessThan(1e-13)
    })
  }
})

// Constructed: each invalid parameter set at every public entry point.
describe('invalid parameters throw EngineInputError naming the field', () => {
  const invalid: [string, PriorDistribution][] = [
    ['σ < 0', { family: 'normal', mu: 0, sigma: -1 }],
    ['σ = 0', { family: 'student-t', mu: 0, sigma: 0, df: 3 }],
    ['df = 0', { family: 'student-t', mu: 0, sigma: 1, df: 0 }],
    ['shape 0', { family: 'gamma', shape: 0, rate: 1 }],
    ['rate NaN', { family: 'gamma', shape: 2, rate: Number.NaN }],
    ['α < 0', { family: 'beta', alpha: -1, beta: 2 }],
    ['lower > upper', { family: 'uniform', lower: 2, upper: 1 }],
    ['scaled beta lower = upper', { family: 'scaled-beta', alpha: 2, beta: 2, lower: 1, upper: 1 }],
    ['sdlog infinite', { family: 'lognormal', meanlog: 0, sdlog: Infinity }],
    ['half-normal scale −2', { family: 'half-normal', scale: -2 }],
  ]
  const entries: [string, (d: PriorDistribution) => unknown][] = [
    ['pdf', (d) => pdf(d, 0.5)], ['logPdf', (d) => logPdf(d, 0.5)], ['cdf', (d) => cdf(d, 0.5)], ['sf', (d) => sf(d, 0.5)],
    ['quantile', (d) => quantile(d, 0.5)], ['mean', (d) => mean(d)], ['sd', (d) => sd(d)], ['toUnivariate', (d) => toUnivariate(d)],
  ]
  for (const [what, d] of invalid) {
    it(what, () => {
      for (const [name, call] of entries) {
        let err: unknown = null
        try {
          call(d)
        } catch (e) {
          err = e
        }
        expect(err, name).toBeInstanceOf(EngineInputError)
        expect((err as EngineInputError).field, name).toBe('distribution')
      }
    })
  }
})

describe('ln B(a, b) at large arguments (DiDonato & Morris 1992, BETALN form)', () => {
  for (const c of fx.lbetas) {
    it(`a = ${c.a}, b = ${c.b}`, () => {
      // a few units in the last place of a number near 1e12
      expect(Math.abs(lbeta(c.a, c.b) - c.lbeta)).toBeLessThan(4 * Number.EPSILON * Math.max(1, Math.abs(c.lbeta)))
    })
  }
})

// Convention (docs/methods/distributions.md): a t with df ≤ 1 has no mean and df ≤ 2 no finite sd; NaN means "does not
// exist", Infinity "exists and is infinite". Constructed values on both sides of each boundary.
describe('Student t moments at the df boundaries', () => {
  const t = (df: number): PriorDistribution => ({ family: 'student-t', mu: 3, sigma: 2, df })
  it('mean: NaN for df ≤ 1, the location above', () => {
    expect(mean(t(0.5))).toBeNaN()
    expect(mean(t(1))).toBeNaN()
    expect(mean(t(1 + 1e-9))).toBe(3)
  })
  it('sd: NaN for df ≤ 1, Infinity for 1 < df ≤ 2, σ√(ν/(ν − 2)) above', () => {
    expect(sd(t(1))).toBeNaN()
    expect(sd(t(1.5))).toBe(Infinity)
    expect(sd(t(2))).toBe(Infinity)
    expect(sd(t(4))).toBeCloseTo(2 * Math.SQRT2, 14)
  })
})
