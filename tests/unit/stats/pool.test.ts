import { describe, expect, it } from 'vitest'
import { EngineInputError, linearPool, logPool, poolSummary, type Distribution, type Pool } from '@shared/stats'
import { integrate } from '@shared/stats/quadrature'
import { check, expectRel } from './checks'

function toDistribution(e: Record<string, number | string>): Distribution {
  switch (e.family) {
    case 'normal':
      return { family: 'normal', mu: e.mean as number, sigma: e.sd as number }
    case 'gamma':
      return { family: 'gamma', shape: e.shape as number, rate: e.rate as number }
    case 'beta':
      return { family: 'beta', alpha: e.a as number, beta: e.b as number }
  }
  throw new Error(`family ${e.family}`)
}

// Outside check: POOL-linear-* of fixtures/checks.json — Stone (1961); Genest & Zidek (1986) Statistical Science 1:114–148. Quantiles by 40-digit
// mpmath findroot on the mixture CDF, cross-checked with scipy brentq (≤ 5e-16).
describe('linear opinion pool (docs/methods/pooling.md)', () => {
  for (const id of ['POOL-linear-2', 'POOL-linear-3']) {
    it(`${id}: quantiles by root finding, mean and sd`, () => {
      const c = check(id)
      const pool = linearPool(c.inputs.experts.map(toDistribution), c.inputs.weights)
      for (const [p, q] of Object.entries(c.expected.quantiles as Record<string, number>)) expectRel(pool.quantile(Number(p)), q, c.tolerance.rel, `q${p}`)
      expectRel(pool.mean(), c.expected.mean, c.tolerance.rel)
      expectRel(pool.sd(), c.expected.sd, c.tolerance.rel)
      if (c.expected.cdf_at_12 !== undefined) expectRel(pool.cdf(12), c.expected.cdf_at_12, c.tolerance.rel)
    })
  }

  it('POOL-linear-2: the median is exactly 11.6 and is not the average of the experts’ medians (12)', () => {
    const pool = linearPool(
      [
        { family: 'normal', mu: 10, sigma: 2 },
        { family: 'normal', mu: 14, sigma: 3 },
      ],
      [0.5, 0.5],
    )
    expect(Math.abs(pool.quantile(0.5) - 11.6)).toBeLessThan(1e-13)
  })

  it('weights are relative: [1, 1] pools like [0.5, 0.5]; the density integrates to 1', () => {
    const comps: Distribution[] = [
      { family: 'normal', mu: 10, sigma: 2 },
      { family: 'gamma', shape: 9, rate: 0.75 },
    ]
    const a = linearPool(comps, [1, 1])
    const b = linearPool(comps, [0.5, 0.5])
    expect(a.quantile(0.3)).toBe(b.quantile(0.3))
    expectRel(integrate((x) => a.pdf(x), [-10, 0, 10, 20, 60, 120]).value, 1, 1e-10)
  })
})

// Outside check: POOL-log-* of fixtures/checks.json — Genest & Zidek (1986); closed forms cross-checked by normalising Π f_i^{w_i} with scipy quad.
describe('logarithmic opinion pool (docs/methods/pooling.md)', () => {
  for (const id of ['POOL-log-normal-2', 'POOL-log-normal-3', 'POOL-log-gamma-2', 'POOL-log-beta-2']) {
    it(`${id}: closed form, mean and sd`, () => {
      const c = check(id)
      const out = logPool(c.inputs.experts.map(toDistribution), c.inputs.weights)
      expect('family' in out).toBe(true)
      const d = out as Distribution
      expect(d.family).toBe(c.inputs.experts[0].family)
      const { mean, sd } = poolSummary(d)
      expectRel(mean, c.expected.mean, c.tolerance.rel)
      expectRel(sd, c.expected.sd, c.tolerance.rel)
      if (d.family === 'gamma') {
        expectRel(d.shape, c.expected.shape, c.tolerance.rel)
        expectRel(d.rate, c.expected.rate, c.tolerance.rel)
      }
      if (d.family === 'beta') {
        expectRel(d.alpha, c.expected.a, c.tolerance.rel)
        expectRel(d.beta, c.expected.b, c.tolerance.rel)
      }
    })
  }

  it('mixed families are normalised numerically: a normal and a t with df 1e9 pool like two normals', () => {
    const numeric = logPool(
      [
        { family: 'normal', mu: 10, sigma: 2 },
        { family: 'student-t', mu: 14, sigma: 3, df: 1e9 },
      ],
      [0.5, 0.5],
    ) as Pool
    expect(numeric.kind).toBe('log-pool')
    expectRel(numeric.mean(), 146 / 13, 1e-7)
    expectRel(numeric.sd(), Math.sqrt(72 / 13), 1e-7)
    expectRel(numeric.quantile(0.975), 146 / 13 + 1.959963984540054 * Math.sqrt(72 / 13), 1e-7)
    expectRel(numeric.cdf(numeric.quantile(0.2)), 0.2, 1e-10)
    expectRel(integrate((x) => numeric.pdf(x), [-10, 5, 11, 17, 40]).value, 1, 1e-9)
  })

  it('uniforms pool to the uniform on their overlap; disjoint supports are an input error', () => {
    expect(
      logPool(
        [
          { family: 'uniform', lower: 0, upper: 10 },
          { family: 'uniform', lower: 4, upper: 20 },
        ],
        [1, 3],
      ),
    ).toEqual({ family: 'uniform', lower: 4, upper: 10 })
    expect(() =>
      logPool(
        [
          { family: 'beta', alpha: 2, beta: 2 },
          { family: 'scaled-beta', alpha: 2, beta: 2, lower: 3, upper: 4 },
        ],
        [1, 1],
      ),
    ).toThrow(EngineInputError)
  })
})

// The reconciliation view makes the same numeric log pools (the full pool and each leave-one-out pool) on every view and
// save: they are kept by their components and weights, as immutable values.
describe('numeric log pools are made once per components and weights', () => {
  const mixed: Distribution[] = [
    { family: 'lognormal', meanlog: 2.31, sdlog: 0.37 },
    { family: 'gamma', shape: 9.5, rate: 0.73 },
    { family: 'normal', mu: 11.7, sigma: 2.2 },
  ]

  it('gives back the same pool for the same input, and a new one when a weight or a parameter changes', () => {
    const first = logPool(mixed, [1, 2, 3]) as Pool
    expect(logPool(mixed.map((d) => ({ ...d })), [1, 2, 3])).toBe(first)
    expect(Object.isFrozen(first)).toBe(true)
    const reweighted = logPool(mixed, [1, 2, 4]) as Pool
    expect(reweighted).not.toBe(first)
    expect(reweighted.quantile(0.5)).not.toBe(first.quantile(0.5))
    const moved = logPool([mixed[0], mixed[1], { family: 'normal', mu: 11.8, sigma: 2.2 }], [1, 2, 3]) as Pool
    expect(moved.quantile(0.5)).toBeGreaterThan(first.quantile(0.5))
  })

  it('answers a repeated quantile with the value it computed (its CDF at that value is the probability)', () => {
    const pool = logPool(mixed, [2, 1, 1]) as Pool
    for (const p of [0.05, 0.5, 0.95]) {
      const q = pool.quantile(p)
      expect(pool.quantile(p)).toBe(q)
      expectRel(pool.cdf(q), p, 1e-10, `F(Q(${p}))`)
    }
  })
})
