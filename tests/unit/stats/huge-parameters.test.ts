import { describe, expect, it } from 'vitest'
import { cdf, pdf, quantile, sf, type PriorDistribution } from '@shared/stats'
import { logBetaPQ, logGammaPQ } from '@shared/stats/special'
import fx from './fixtures/huge-parameters.json'

const rel = (got: number, want: number) => (want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want))

type Row = { x: number; lowerTail: boolean; logSmallTail: number; cdf: number; sf: number }

/**
 * The computed tails at x against the reference row: both probabilities, and the small tail's logarithm to tol in
 * absolute terms (the tail to tol relative) while the tail is a double; past that (logs down to −1e13) to 1e-12 relative.
 */
function expectTails(d: PriorDistribution, r: Row, logSmall: number | null, tol: number): void {
  const label = `x = ${r.x}`
  if (r.cdf > 1e-306) expect(rel(cdf(d, r.x), r.cdf), `cdf at ${label}`).toBeLessThan(tol)
  if (r.sf > 1e-306) expect(rel(sf(d, r.x), r.sf), `sf at ${label}`).toBeLessThan(tol)
  if (logSmall === null) return
  if (r.logSmallTail > -708) expect(Math.abs(logSmall - r.logSmallTail), `ln tail at ${label}`).toBeLessThan(tol)
  else expect(rel(logSmall, r.logSmallTail), `ln tail at ${label}`).toBeLessThan(1e-12)
}

/**
 * quantile(cdf(x)) returns x to 1e-12 relative. quantile takes a lower-tail probability, so an upper tail goes through
 * 1 − p, which is representable only to 1e-16 absolute: there the check starts at p = 1e-6 and allows that rounding
 * divided by the density.
 */
function expectRoundTrip(d: PriorDistribution, r: Row): void {
  const p = r.lowerTail ? cdf(d, r.x) : sf(d, r.x)
  if (!(p > 1e-300) || (!r.lowerTail && p < 1e-6)) return
  const back = r.lowerTail ? quantile(d, p) : quantile(d, 1 - p)
  const slack = r.lowerTail ? 0 : Number.EPSILON / pdf(d, r.x)
  expect(Math.abs(back - r.x), `round trip at x = ${r.x}, p = ${p}`).toBeLessThanOrEqual(1e-12 * Math.abs(r.x) + slack)
}

// Outside check: fixtures/huge-parameters.json, written by generate_huge_parameters.py (mpmath quadrature of each density at
// 50 digits; each case checked to integrate to 1). Constructed cases: points mean + z·sd for z from −37 to 37.
// One parameter huge and the other 20 is the case where the fraction of Press et al. lost digits (1 − (a + b)x/(a + 1) with x
// near 1); DiDonato & Morris's fraction in λ keeps them.
describe('beta at huge α and β (DiDonato & Morris 1992: expansion near the mean, fraction in λ elsewhere)', () => {
  for (const c of fx.betas) {
    it(`α = ${c.alpha}, β = ${c.beta}: both tails, their logs and the round trip`, () => {
      const d: PriorDistribution = { family: 'beta', alpha: c.alpha, beta: c.beta }
      for (const r of c.points) {
        const logs = logBetaPQ(r.x, c.alpha, c.beta)
        expectTails(d, r, r.lowerTail ? logs.logP : logs.logQ, 1e-10)
        expectRoundTrip(d, r)
      }
    })
  }
})

describe('gamma at huge shape (Temme 1979 uniform expansion near the mode)', () => {
  for (const c of fx.gammas) {
    it(`shape ${c.shape}: both tails, their logs and the round trip`, () => {
      const d: PriorDistribution = { family: 'gamma', shape: c.shape, rate: 1 }
      for (const r of c.points) {
        const logs = logGammaPQ(c.shape, r.x)
        expectTails(d, r, r.lowerTail ? logs.logP : logs.logQ, 1e-10)
        expectRoundTrip(d, r)
      }
    })
  }
})

describe('Student t at huge df (normal-integral expansion from df 1e5)', () => {
  for (const c of fx.studentTs) {
    it(`df ${c.df}: both tails and the round trip`, () => {
      const d: PriorDistribution = { family: 'student-t', mu: 0, sigma: 1, df: c.df }
      for (const r of c.points) {
        expectTails(d, r, null, 1e-10)
        if (r.x !== 0) expectRoundTrip(d, r)
      }
    })
  }
})

describe('quantiles at huge parameters against the reference', () => {
  for (const c of fx.quantiles) {
    const { family, p, lowerTail, q } = c
    const d = (family === 'beta'
      ? { family, alpha: c.alpha, beta: c.beta }
      : family === 'gamma'
        ? { family, shape: c.shape, rate: 1 }
        : { family, mu: 0, sigma: 1, df: c.df }) as PriorDistribution
    it(`${JSON.stringify(d)} at ${lowerTail ? 'lower' : 'upper'} tail ${p}`, () => {
      if (lowerTail) {
        expect(rel(quantile(d, p), q)).toBeLessThan(1e-12)
      } else if (p >= 1e-12) {
        // 1 − p is rounded to 1e-16 absolute: allow that, divided by the density
        expect(Math.abs(quantile(d, 1 - p) - q)).toBeLessThan(1e-12 * Math.abs(q) + Number.EPSILON / pdf(d, q))
      } else {
        // no lower-tail probability reaches it: the tail at the reference (itself rounded to a double, so allow that
        // rounding times the condition number q f(q)/p) must equal p
        const condition = (Math.abs(q) * pdf(d, q)) / p
        expect(rel(sf(d, q), p)).toBeLessThan(1e-10 + 2 * Number.EPSILON * condition)
      }
    })
  }
})
