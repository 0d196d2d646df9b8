import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { analyzePrior, mean, PRIOR_DRIVEN_CONVENTION, PRIOR_DRIVEN_RULE, quantile, scaleSpread, sd, widthSweep, type PilotData, type PriorDistribution } from '@shared/stats'
import { check, expectAbs, expectRel } from './checks'

const X = [2.2, 3.5, 2.8, 3.9, 2.6]
const data: PilotData = { model: 'normal-known-sigma', sigma: 2, values: X }

// Outside check: WIDTH-uniform of fixtures/checks.json — U(0, A) prior on a normal mean, closed form via normal CDFs at
// 40 digits (mpmath) with scipy quad beside it (fixtures/generate_checks.py; docs/methods/width-sweep.md).
describe('width sweep of a uniform prior whose lower end sits on the support boundary (docs/methods/width-sweep.md)', () => {
  it('U(0, 10) on a positive quantity: factors 1, 2, 4, 8 give A = 10, 20, 40, 80 and the tabulated evidence', () => {
    const c = check('WIDTH-uniform')
    const sweep = widthSweep({ family: 'uniform', lower: 0, upper: 10 }, data, [1, 2, 4, 8], { kind: 'positive' })
    const table = c.expected.table as Record<string, { log_ml: number; post_mean: number }>
    sweep.points.forEach((pt) => {
      const A = 10 * pt.factor
      expect(pt.prior).toEqual({ family: 'uniform', lower: 0, upper: A })
      expectAbs(pt.logEvidence, table[String(A)].log_ml, 1e-10, `A=${A}`)
      expectRel(pt.posteriorMean, table[String(A)].post_mean, c.tolerance.rel)
    })
  })

  it('the evidence ratio over k ∈ [0.5, 2] exceeds 3 while the posterior mean barely moves: flagged prior-driven', () => {
    const sweep = widthSweep({ family: 'uniform', lower: 0, upper: 10 }, data, [0.5, 0.75, 1, 1.5, 2, 4], { kind: 'positive' })
    const k05 = analyzePrior({ family: 'uniform', lower: 0, upper: 5 }, data)
    const k2 = analyzePrior({ family: 'uniform', lower: 0, upper: 20 }, data)
    expectRel(sweep.evidenceRatio, Math.exp(k05.logEvidence - k2.logEvidence), 1e-12)
    expect(sweep.evidenceRatio).toBeGreaterThan(3)
    expect(sweep.priorDriven).toBe(true)
  })

  it('an informative normal prior is not flagged: the posterior mean moves with the width', () => {
    const sweep = widthSweep({ family: 'normal', mu: 6, sigma: 0.5 }, data, [0.5, 1, 2])
    const means = sweep.points.map((p) => p.posteriorMean)
    expect(Math.abs(means[2] - means[0])).toBeGreaterThan(0.5)
    expect(sweep.priorDriven).toBe(false)
  })

  it('the k = 1 reference is computed even when 1 is not among the factors', () => {
    const sweep = widthSweep({ family: 'uniform', lower: 0, upper: 10 }, data, [2], { kind: 'positive' })
    const k1 = analyzePrior({ family: 'uniform', lower: 0, upper: 10 }, data).logEvidence
    const k2 = analyzePrior({ family: 'uniform', lower: 0, upper: 20 }, data).logEvidence
    expectRel(sweep.evidenceRatio, Math.exp(k1 - k2), 1e-12)
  })

  it('the flag switches where Priorsmith’s convention says: evidence ratio 3 inside factors 0.5–2, factors outside ignored', () => {
    expect(PRIOR_DRIVEN_CONVENTION).toEqual({ fromFactor: 0.5, toFactor: 2, evidenceRatio: 3, meanShiftSds: 0.1 })
    const uniform: PriorDistribution = { family: 'uniform', lower: 0, upper: 10 }
    // Evidence of U(0, 10k) is about 1/(10k) here, so factors 0.5 and c give a ratio close to 2c.
    const below = widthSweep(uniform, data, [0.5, 1, 1.4], { kind: 'positive' })
    const above = widthSweep(uniform, data, [0.5, 1, 1.6], { kind: 'positive' })
    expect(below.evidenceRatio).toBeGreaterThan(2.5)
    expect(below.evidenceRatio).toBeLessThan(3)
    expect(below.priorDriven).toBe(false)
    expect(above.evidenceRatio).toBeGreaterThan(3)
    expect(above.evidenceRatio).toBeLessThan(3.5)
    expect(above.priorDriven).toBe(true)
    // A fourfold width (outside 0.5–2) changes the evidence about 4× but does not count.
    const outside = widthSweep(uniform, data, [1, 4], { kind: 'positive' })
    expect(outside.points[1].logEvidence - outside.points[0].logEvidence).toBeCloseTo(-Math.log(4), 2)
    expect(outside.evidenceRatio).toBe(1)
    expect(outside.priorDriven).toBe(false)
  })

  it('PRIOR_DRIVEN_RULE is labelled as Priorsmith’s convention and states the numbers the code applies', () => {
    const c = PRIOR_DRIVEN_CONVENTION
    expect(PRIOR_DRIVEN_RULE.startsWith('Priorsmith’s rule of thumb (a convention of this tool, not a published test)')).toBe(true)
    expect(PRIOR_DRIVEN_RULE).toContain(`any factor between ${c.fromFactor} and ${c.toFactor} changes the evidence by more than ${c.evidenceRatio} times`)
    expect(PRIOR_DRIVEN_RULE).toContain(`within ${c.meanShiftSds} posterior standard deviations`)
    expect(PRIOR_DRIVEN_RULE).toContain('Why these numbers')
  })
})

// Property from the issue: widening the upper bound of U(0, A) 4× lowers the evidence by close to 4× while the posterior
// mean moves by under 1 % (the likelihood sits well inside [0, A]).
describe('prior-width property (fast-check)', () => {
  it('U(0, A) → U(0, 4A): evidence ratio within 1 % of 4, posterior mean within 1 %', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 2, max: 50, noNaN: true }),
        fc.double({ min: 0.1, max: 3, noNaN: true }),
        fc.integer({ min: 3, max: 60 }),
        fc.double({ min: 1.5, max: 4, noNaN: true }),
        (centre, sigma, n, stretch) => {
          const se = sigma / Math.sqrt(n)
          const values = Array.from({ length: n }, (_, i) => centre + sigma * Math.sin(1.3 * i + 0.4))
          const xbar = values.reduce((s, v) => s + v, 0) / n
          fc.pre(xbar > 8 * se)
          const A = stretch * xbar
          const d: PilotData = { model: 'normal-known-sigma', sigma, values }
          const narrow = analyzePrior({ family: 'uniform', lower: 0, upper: A }, d)
          const wide = analyzePrior(scaleSpread({ family: 'uniform', lower: 0, upper: A }, 4, { kind: 'positive' }), d)
          expect(Math.abs(Math.exp(narrow.logEvidence - wide.logEvidence) / 4 - 1)).toBeLessThan(0.01)
          expect(Math.abs(wide.posterior.mean / narrow.posterior.mean - 1)).toBeLessThan(0.01)
        },
      ),
      { numRuns: 200, seed: 7 },
    )
  })
})

describe('scaleSpread', () => {
  it('location-scale families scale σ; the lognormal keeps its median and scales sdlog', () => {
    expect(scaleSpread({ family: 'normal', mu: 3, sigma: 2 }, 1.5)).toEqual({ family: 'normal', mu: 3, sigma: 3 })
    expect(scaleSpread({ family: 'student-t', mu: 3, sigma: 2, df: 4 }, 0.5)).toEqual({ family: 'student-t', mu: 3, sigma: 1, df: 4 })
    expect(scaleSpread({ family: 'lognormal', meanlog: 1, sdlog: 0.4 }, 2)).toEqual({ family: 'lognormal', meanlog: 1, sdlog: 0.8 })
  })

  it('gamma: median kept, coefficient of variation × k exactly', () => {
    const g: PriorDistribution = { family: 'gamma', shape: 6, rate: 3 }
    for (const k of [0.25, 0.5, 2, 8]) {
      const s = scaleSpread(g, k)
      expectRel(quantile(s, 0.5), quantile(g, 0.5), 1e-13)
      expectRel(sd(s) / mean(s), (k * sd(g)) / mean(g), 1e-13)
    }
  })

  it('beta and scaled beta: median kept, concentration α + β divided by k², range unchanged', () => {
    const b: PriorDistribution = { family: 'scaled-beta', alpha: 2.5, beta: 7.5, lower: 10, upper: 30 }
    for (const k of [0.5, 2, 4]) {
      const s = scaleSpread(b, k) as { alpha: number; beta: number; lower: number; upper: number }
      expectRel(quantile(s as PriorDistribution, 0.5), quantile(b, 0.5), 1e-12)
      expectRel(s.alpha + s.beta, 10 / (k * k), 1e-13)
      expect([s.lower, s.upper]).toEqual([10, 30])
    }
  })

  it('uniform: centred scaling; an end on the support boundary stays; ends are clipped to the support', () => {
    expect(scaleSpread({ family: 'uniform', lower: 2, upper: 6 }, 2)).toEqual({ family: 'uniform', lower: 0, upper: 8 })
    expect(scaleSpread({ family: 'uniform', lower: 0.2, upper: 1 }, 2, { kind: 'proportion' })).toEqual({ family: 'uniform', lower: 0, upper: 1 })
    expect(scaleSpread({ family: 'uniform', lower: 1, upper: 3 }, 4, { kind: 'positive' })).toEqual({ family: 'uniform', lower: 0, upper: 6 })
    expect(scaleSpread({ family: 'uniform', lower: 0, upper: 3 }, 4, { kind: 'positive' })).toEqual({ family: 'uniform', lower: 0, upper: 12 })
  })
})
