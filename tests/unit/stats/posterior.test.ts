import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import { analyzePrior, posteriorOf, type PilotData, type PriorDistribution } from '@shared/stats'
import { check, expectRel } from './checks'

const require = createRequire(import.meta.url)
const stdlibBetaCdf = require('@stdlib/stats-base-dists-beta-cdf') as (x: number, a: number, b: number) => number
const stdlibGammaCdf = require('@stdlib/stats-base-dists-gamma-cdf') as (x: number, shape: number, rate: number) => number
const stdlibNormalCdf = require('@stdlib/stats-base-dists-normal-cdf') as (x: number, m: number, s: number) => number

const X = [2.2, 3.5, 2.8, 3.9, 2.6]

describe('posteriorOf: conjugate posteriors as distributions', () => {
  // BDA3 §2.4 (Gelman et al. 2013): Beta(2, 3) prior, 7 of 20 → Beta(9, 16) (ML-beta-binomial-y7-n20 of fixtures/checks.json).
  it('beta prior, binomial data: the Beta(9, 16) CDF', () => {
    const post = posteriorOf({ family: 'beta', alpha: 2, beta: 3 }, { model: 'binomial', successes: 7, trials: 20 })
    for (const x of [0.2, 0.36, 0.5]) expect(post.cdf(x)).toBeCloseTo(stdlibBetaCdf(x, 9, 16), 12)
    expect(post.mean()).toBeCloseTo(9 / 25, 12)
  })

  // BDA3 §2.6: Gamma(2, rate 0.5), counts 2,4,3,0,5 with unit exposure → Gamma(16, rate 5.5) (ML-gamma-poisson-1 of fixtures/checks.json).
  it('gamma prior, Poisson data: the Gamma(16, 5.5) CDF', () => {
    const post = posteriorOf({ family: 'gamma', shape: 2, rate: 0.5 }, { model: 'poisson', counts: [2, 4, 3, 0, 5], exposures: [1, 1, 1, 1, 1] })
    for (const x of [2, 2.9, 4]) expect(post.cdf(x)).toBeCloseTo(stdlibGammaCdf(x, 16, 5.5), 12)
  })

  // BDA3 §2.5: normal prior N(0, 10²) on a normal mean with σ = 2, n = 5: precision-weighted normal posterior.
  it('normal prior, normal data with known σ: the closed-form normal posterior', () => {
    const se2 = 4 / 5
    const v = 1 / (1 / 100 + 1 / se2)
    const m = v * (3.0 / se2)
    const post = posteriorOf({ family: 'normal', mu: 0, sigma: 10 }, { model: 'normal-known-sigma', sigma: 2, values: X })
    for (const x of [2, 3, 4]) expect(post.cdf(x)).toBeCloseTo(stdlibNormalCdf(x, m, Math.sqrt(v)), 12)
  })
})

// Outside check of a non-conjugate posterior: QUAD-normal-tprior of fixtures/checks.json, the posterior mean of μ under a
// t₃(0, 5) prior by 40-digit mpmath quadrature (fixtures/generate_checks.py).
describe('posteriorOf against mpmath for a non-conjugate prior', () => {
  it("t₃ prior, normal data with known σ: posterior mean 2.8916 (QUAD-normal-tprior)", () => {
    const c = check('QUAD-normal-tprior')
    const post = posteriorOf({ family: 'student-t', mu: 0, sigma: 5, df: 3 }, { model: 'normal-known-sigma', sigma: 2, values: X })
    expectRel(post.mean(), c.expected.post_mean, 1e-8)
  })
})

// Consistency check (not an outside check): the two routes through the engine to one posterior agree.
describe('posteriorOf agrees with analyzePrior’s summaries (engine consistency: one posterior, two views)', () => {
  const cases: [string, PriorDistribution, PilotData][] = [
    ['lognormal prior, Poisson data (quadrature)', { family: 'lognormal', meanlog: Math.log(3), sdlog: 0.5 }, { model: 'poisson', counts: [2, 4, 3, 0, 5], exposures: [1, 1, 1, 1, 1] }],
    ['t prior, normal data with known σ (quadrature)', { family: 'student-t', mu: 0, sigma: 5, df: 3 }, { model: 'normal-known-sigma', sigma: 2, values: X }],
    ['uniform prior, binomial data (quadrature)', { family: 'uniform', lower: 0, upper: 0.6 }, { model: 'binomial', successes: 7, trials: 20 }],
    ['normal prior, σ unknown with a half-normal prior (2-D)', { family: 'normal', mu: 0, sigma: 10 }, { model: 'normal', values: X, sigmaPrior: { family: 'half-normal', scale: 5 } }],
    ['gamma prior on a normal mean, σ unknown (2-D)', { family: 'gamma', shape: 4, rate: 1.5 }, { model: 'normal', values: X, sigmaPrior: { family: 'gamma', shape: 2, rate: 1 } }],
  ]
  for (const [name, prior, data] of cases) {
    it(name, () => {
      const a = analyzePrior(prior, data, { skipPredictiveCheck: true })
      const post = posteriorOf(prior, data)
      expect(post.mean()).toBeCloseTo(a.posterior.mean, 8)
      expect(post.cdf(a.posterior.q025)).toBeCloseTo(0.025, 7)
      expect(post.cdf(a.posterior.q50)).toBeCloseTo(0.5, 7)
      expect(post.cdf(a.posterior.q975)).toBeCloseTo(0.975, 7)
      expect(post.quantile(0.975)).toBeCloseTo(a.posterior.q975, 6)
    })
  }
})
