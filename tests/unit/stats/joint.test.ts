import { describe, expect, it } from 'vitest'
import {
  analyzePrior,
  cdf,
  conditionalFromCopulaCorrelation,
  copulaCorrelationFromConditional,
  dirichletFromMarginals,
  dirichletMarginal,
  dirichletWidthSweep,
  EngineInputError,
  nearestCorrelation,
  poolCorrelations,
  quantile,
  rankCorrelationOfCopula,
  sampleJoint,
  type Distribution,
  type MultinomialData,
} from '../../../shared/stats/index'
import { symmetricEigen } from '../../../shared/stats/matrix'
import { expectAbs, expectRel } from './checks'
import joint from './fixtures/joint-checks.json'

function expectEngineError(f: () => unknown, field: string): void {
  let caught: unknown
  try {
    f()
  } catch (e) {
    caught = e
  }
  expect(caught).toBeInstanceOf(EngineInputError)
  expect((caught as EngineInputError).field).toBe(field)
  expect((caught as EngineInputError).message.length).toBeGreaterThan(10)
}

// Outside check: scipy.stats.dirichlet_multinomial (chained one row at a time), scipy.stats.dirichlet and
// scipy.stats.beta, written by fixtures/generate_joint_checks.py (versions in its meta).
describe('Dirichlet prior with multinomial rows: evidence and posterior against scipy', () => {
  for (const c of joint.multinomial) {
    it(`α = ${c.alpha.join(', ')}, ${c.counts.length} row(s)`, () => {
      const r = analyzePrior({ family: 'dirichlet', alpha: c.alpha }, { model: 'multinomial', counts: c.counts })
      expect(r.method).toBe('closed-form')
      expectRel(r.logEvidence, c.logEvidence, 1e-11, 'log evidence')
      r.posteriorAlpha.forEach((a, j) => expectRel(a, c.posteriorAlpha[j], 1e-14, `posterior α${j + 1}`))
      r.posterior.forEach((s, j) => {
        expectRel(s.mean, c.posteriorMean[j], 1e-12, `mean ${j + 1}`)
        expectRel(s.sd, c.posteriorSd[j], 1e-10, `sd ${j + 1}`)
        expectRel(s.q025, c.posteriorQuantiles[j][0], 1e-8, `q025 ${j + 1}`)
        expectRel(s.q50, c.posteriorQuantiles[j][1], 1e-8, `q50 ${j + 1}`)
        expectRel(s.q975, c.posteriorQuantiles[j][2], 1e-8, `q975 ${j + 1}`)
      })
      expect(r.priorEss).toBeCloseTo(c.alpha.reduce((s, a) => s + a, 0), 12)
      expect(r.observations).toBe(c.counts.flat().reduce((s, x) => s + x, 0))
    })
  }

  // Constructed check of "the data as recorded": one category per row keeps no multinomial coefficient, the same counts
  // as one row carry log(n! / Π x!) more.
  it('one category per row and the aggregated row differ by exactly the multinomial coefficient', () => {
    const prior = { family: 'dirichlet' as const, alpha: [0.5, 0.5, 0.5, 0.5] }
    const oneHot = joint.multinomial[2].counts
    const aggregated = [oneHot.reduce((acc, row) => acc.map((x, j) => x + row[j]), [0, 0, 0, 0])]
    const a = analyzePrior(prior, { model: 'multinomial', counts: oneHot })
    const b = analyzePrior(prior, { model: 'multinomial', counts: aggregated })
    expect(aggregated[0]).toEqual([3, 1, 1, 0])
    expectRel(b.logEvidence - a.logEvidence, Math.log(120 / 6), 1e-12, 'log(5!/(3! 1! 1! 0!))')
    expect(a.posteriorAlpha).toEqual(b.posteriorAlpha)
  })

  it('the width sweep divides the total concentration by k², keeps the means, and is the analysis at each width', () => {
    const prior = { family: 'dirichlet' as const, alpha: [17.2, 9.6, 5.2] }
    const data: MultinomialData = { model: 'multinomial', counts: joint.multinomial[1].counts }
    const points = dirichletWidthSweep(prior, data, [0.5, 1, 2])
    expect(points[1].logEvidence).toBe(analyzePrior(prior, data).logEvidence)
    expectRel(points[0].alpha[0], 17.2 * 4, 1e-14)
    expectRel(points[2].alpha[2], 5.2 / 4, 1e-14)
    expect(points[0].logEvidence).not.toBeCloseTo(points[2].logEvidence, 1)
  })

  it('refuses bad priors and data with the field', () => {
    const data: MultinomialData = { model: 'multinomial', counts: [[1, 2, 3]] }
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1, 0, 2] }, data), 'alpha')
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1] }, { model: 'multinomial', counts: [[1]] }), 'alpha')
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1, 1] }, data), 'counts')
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1, 1, 1] }, { model: 'multinomial', counts: [[1, -1, 2]] }), 'counts')
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1, 1, 1] }, { model: 'multinomial', counts: [[1, 0.5, 2]] }), 'counts')
    expectEngineError(() => analyzePrior({ family: 'dirichlet', alpha: [1, 1, 1] }, { model: 'multinomial', counts: [] }), 'counts')
    expectEngineError(() => analyzePrior({ family: 'beta', alpha: 1, beta: 1 } as never, data as never), 'prior')
  })
})

// Outside check: the total concentration that minimises the squared distance between the elicited variances
// (scipy.stats.beta.var) and the Dirichlet's (scipy.stats.dirichlet.var), found numerically by scipy.optimize.
describe('Dirichlet from the shares’ marginals', () => {
  for (const c of joint.dirichletFromMarginals) {
    it(`${c.marginals.length} shares: least-squares concentration as scipy finds it`, () => {
      const fit = dirichletFromMarginals(c.marginals as Distribution[])
      expect(fit.family).toBe('dirichlet')
      expectRel(fit.totalConcentration, c.totalConcentration, 1e-7, 'α₀')
      fit.alpha.forEach((a, i) => expectRel(a, c.alpha[i], 1e-7, `α${i + 1}`))
    })
  }

  it('mismatch is the largest probability gap at each share’s own quartiles and 5/95 % points', () => {
    const marginals = joint.dirichletFromMarginals[0].marginals as Distribution[]
    const fit = dirichletFromMarginals(marginals)
    marginals.forEach((d, i) => {
      const gaps = [0.05, 0.25, 0.5, 0.75, 0.95].map((p) => Math.abs(cdf(dirichletMarginal(fit.alpha, i), quantile(d, p)) - p))
      expect(fit.mismatch[i]).toBe(Math.max(...gaps))
    })
    // Means 0.556, 0.310, 0.167 (sum 1.03): scaled to add up to 1, and the shares' certainties are alike, so no warning.
    expectRel(fit.meanSum, 20 / 36 + 9 / 29 + 5 / 30, 1e-12)
    expect(fit.warnings).toEqual([])
    expect(fit.mismatch.every((m) => m > 0 && m < 0.1)).toBe(true)
  })

  it('warns, with a reason, when the shares are held with very different certainty', () => {
    const fit = dirichletFromMarginals(joint.dirichletFromMarginals[2].marginals as Distribution[])
    expect(fit.impliedConcentration.map((x) => Math.round(x))).toEqual([6, 80])
    expect(fit.warnings.map((w) => w.code)).toEqual(['unequal-certainty'])
    expect(fit.warnings[0].message).toMatch(/generalised Dirichlet/)
    expect(Math.max(...fit.mismatch)).toBeGreaterThan(0.1)
  })

  it('warns when the means add up to far from one, and gives an "other" share the rest', () => {
    const high = dirichletFromMarginals([
      { family: 'beta', alpha: 12, beta: 8 },
      { family: 'beta', alpha: 10, beta: 10 },
    ])
    expect(high.meanSum).toBeCloseTo(1.1, 12)
    expect(high.warnings.map((w) => w.code)).toEqual(['mean-sum'])
    expectRel(high.alpha[0] / high.totalConcentration, 0.6 / 1.1, 1e-12)
    const withOther = dirichletFromMarginals([{ family: 'beta', alpha: 6, beta: 14 }, { family: 'beta', alpha: 9, beta: 21 }], { residual: true })
    expect(withOther.alpha).toHaveLength(3)
    expect(withOther.mismatch).toHaveLength(2)
    expectRel(withOther.alpha[2] / withOther.totalConcentration, 1 - 0.3 - 0.3, 1e-12)
  })

  it('refuses shares that are not proportions, too few or too many shares, and impossible spreads', () => {
    expectEngineError(() => dirichletFromMarginals([{ family: 'normal', mu: 0.3, sigma: 0.1 }, { family: 'beta', alpha: 2, beta: 2 }]), 'marginals[0]')
    expectEngineError(() => dirichletFromMarginals([{ family: 'beta', alpha: 2, beta: 2 }, { family: 'gamma', shape: 2, rate: 9 }]), 'marginals[1]')
    expectEngineError(() => dirichletFromMarginals([{ family: 'beta', alpha: 2, beta: 2 }]), 'marginals')
    expectEngineError(() => dirichletFromMarginals(Array.from({ length: 11 }, () => ({ family: 'beta' as const, alpha: 1, beta: 10 }))), 'marginals')
    expectEngineError(() => dirichletFromMarginals([{ family: 'beta', alpha: 2, beta: -1 }, { family: 'beta', alpha: 2, beta: 2 }]), 'marginals[0]')
    // Three shares each near 0 or 1 with even odds (Beta(0.01, 0.01)): variances near 0.25, more than any Dirichlet with
    // means 1/3 allows (at most 2/9).
    expectEngineError(() => dirichletFromMarginals(Array.from({ length: 3 }, () => ({ family: 'beta' as const, alpha: 0.01, beta: 0.01 }))), 'marginals')
    expectEngineError(() => dirichletFromMarginals([{ family: 'beta', alpha: 6, beta: 4 }, { family: 'beta', alpha: 6, beta: 4 }], { residual: true }), 'marginals')
  })
})

// Outside check: P(Y > 0 | X > 0) = 2 Φ₂(0, 0; ρ) and Spearman's ρ from scipy.stats.multivariate_normal.cdf.
describe('conditional probability ↔ Gaussian-copula correlation (orthant probabilities)', () => {
  for (const o of joint.orthant) {
    it(`ρ = ${o.rho}`, () => {
      expectAbs(copulaCorrelationFromConditional(o.conditional), o.rho, 1e-8, 'ρ from p')
      expectAbs(conditionalFromCopulaCorrelation(o.rho), o.conditional, 1e-8, 'p from ρ')
      expectAbs(rankCorrelationOfCopula(o.rho), o.spearman, 1e-8, 'Spearman')
    })
  }
  it('50 % means unrelated; p outside (0, 1) is refused with its field', () => {
    expect(copulaCorrelationFromConditional(0.5)).toBe(0)
    for (const p of [0, 1, -0.2, 1.5, Number.NaN]) expectEngineError(() => copulaCorrelationFromConditional(p), 'p')
  })
  it('pools on Fisher’s z scale with the given weights', () => {
    // Constructed: two experts at ρ = 0.5 and 0.8 with weights 1 and 3.
    expectRel(poolCorrelations([0.5, 0.8], [1, 3]), Math.tanh((Math.atanh(0.5) + 3 * Math.atanh(0.8)) / 4), 1e-14)
    expect(poolCorrelations([0.3, 0.3], [0.2, 0.8])).toBeCloseTo(0.3, 14)
    expectEngineError(() => poolCorrelations([0.3, 1], [1, 1]), 'rhos')
    expectEngineError(() => poolCorrelations([0.3, 0.2], [1]), 'weights')
  })
})

function minEigenvalue(R: number[][]): number {
  return Math.min(...symmetricEigen(R).values)
}

describe('nearest correlation matrix (Higham 2002, alternating projections with Dykstra’s correction)', () => {
  // Higham (2002), IMA J. Numer. Anal. 22, the 3 × 3 example A = [1 1 0; 1 1 1; 0 1 1], nearest correlation matrix with
  // off-diagonals 0.7607, 0.1573 (values as printed there, quoted from memory; the scipy fixture confirms them).
  it('Higham’s 3 × 3 example', () => {
    const r = nearestCorrelation([[1, 1, 0], [1, 1, 1], [0, 1, 1]])
    expectAbs(r.matrix[0][1], 0.7607, 5e-5, 'x12')
    expectAbs(r.matrix[1][2], 0.7607, 5e-5, 'x23')
    expectAbs(r.matrix[0][2], 0.1573, 5e-5, 'x13')
    expectAbs(r.maxChange, 1 - 0.7607, 5e-5, 'largest change')
    expectAbs(r.minEigenvalue, 1 - Math.SQRT2, 1e-12, 'input’s smallest eigenvalue')
  })
  // NAG Library Manual Mark 26.2, g02aac (nag_nearest_correlation) example: G tridiagonal (2, −1), published result.
  it('NAG g02aac example', () => {
    const r = nearestCorrelation(joint.nearestCorrelation['nag-g02aa-4x4'].input)
    const published = [
      [1, -0.80841, 0.19159, 0.10678],
      [-0.80841, 1, -0.65623, 0.19159],
      [0.19159, -0.65623, 1, -0.80841],
      [0.10678, 0.19159, -0.80841, 1],
    ]
    r.matrix.forEach((row, i) => row.forEach((x, j) => expectAbs(x, published[i][j], 5e-6, `x${i + 1}${j + 1}`)))
  })
  for (const [name, c] of Object.entries(joint.nearestCorrelation)) {
    it(`${name}: same matrix as scipy’s direct minimisation, a correlation matrix, changes reported entry by entry`, () => {
      const r = nearestCorrelation(c.input)
      r.matrix.forEach((row, i) => {
        expect(row[i]).toBe(1)
        row.forEach((x, j) => {
          expectAbs(x, c.nearest[i][j], 1e-6, `x${i + 1}${j + 1}`)
          expect(r.changes[i][j]).toBe(x - c.input[i][j])
        })
      })
      expect(minEigenvalue(r.matrix)).toBeGreaterThan(-1e-12)
      expect(r.maxChange).toBe(Math.max(...r.changes.flat().map(Math.abs)))
      expect(r.maxChange).toBeGreaterThan(0.05)
    })
  }
  it('leaves a correlation matrix unchanged and refuses a matrix that is not square or not symmetric', () => {
    const ok = [[1, 0.4, 0.2], [0.4, 1, 0.5], [0.2, 0.5, 1]]
    const r = nearestCorrelation(ok)
    expect(r.matrix).toEqual(ok)
    expect(r.maxChange).toBe(0)
    expectEngineError(() => nearestCorrelation([[1, 0.2], [0.2, 1], [0, 0]]), 'R')
    expectEngineError(() => nearestCorrelation([[1, 0.2, 0], [0.2, 1]]), 'R')
    expectEngineError(() => nearestCorrelation([[1, 0.2], [0.3, 1]]), 'R')
    expectEngineError(() => nearestCorrelation([]), 'R')
  })
})

function ranks(xs: number[]): number[] {
  const order = xs.map((x, i) => [x, i] as const).sort((a, b) => a[0] - b[0])
  const r = new Array<number>(xs.length)
  order.forEach(([, i], k) => (r[i] = k))
  return r
}

function spearman(xs: number[], ys: number[]): number {
  const rx = ranks(xs)
  const ry = ranks(ys)
  const n = xs.length
  const m = (n - 1) / 2
  let sxy = 0
  let sxx = 0
  for (let i = 0; i < n; i++) {
    sxy += (rx[i] - m) * (ry[i] - m)
    sxx += (rx[i] - m) ** 2
  }
  return sxy / sxx
}

describe('seeded joint draws through a Gaussian copula', () => {
  const marginals: Distribution[] = [
    { family: 'gamma', shape: 4, rate: 0.5 },
    { family: 'lognormal', meanlog: 1.2, sdlog: 0.4 },
    { family: 'beta', alpha: 6, beta: 14 },
  ]
  const r12 = copulaCorrelationFromConditional(0.75)
  const r13 = copulaCorrelationFromConditional(0.4)
  const R = [
    [1, r12, r13],
    [r12, 1, 0],
    [r13, 0, 1],
  ]
  const n = 20000
  const draws = sampleJoint(marginals, R, n, 20261203)
  const column = (j: number): number[] => draws.map((row) => row[j])

  it('is reproducible for a seed and changes with the seed', () => {
    expect(sampleJoint(marginals, R, 5, 20261203)).toEqual(draws.slice(0, 5))
    expect(sampleJoint(marginals, R, 5, 20261204)[0]).not.toEqual(draws[0])
  })

  // Sampling error: the share of draws below the marginal's p-quantile is binomial, sd √(p(1 − p)/n); 4 sd allowed.
  it('reproduces each marginal’s 5, 25, 50, 75 and 95 % quantiles', () => {
    marginals.forEach((d, j) => {
      const xs = column(j)
      for (const p of [0.05, 0.25, 0.5, 0.75, 0.95]) {
        const q = quantile(d, p)
        const below = xs.filter((x) => x <= q).length / n
        expectAbs(below, p, 4 * Math.sqrt((p * (1 - p)) / n), `${d.family} at ${p}`)
      }
    })
  })

  // Spearman's ρ of a Gaussian copula is (6/π) arcsin(ρ/2) whatever the marginals; its sampling sd is below 1/√n.
  it('reproduces the copula’s rank correlations and the conditional probability the expert gave', () => {
    expectAbs(spearman(column(0), column(1)), rankCorrelationOfCopula(r12), 4 / Math.sqrt(n), 'rank correlation 1–2')
    expectAbs(spearman(column(0), column(2)), rankCorrelationOfCopula(r13), 4 / Math.sqrt(n), 'rank correlation 1–3')
    expectAbs(spearman(column(1), column(2)), 0, 4 / Math.sqrt(n), 'rank correlation 2–3')
    const med0 = quantile(marginals[0], 0.5)
    const med1 = quantile(marginals[1], 0.5)
    const above = draws.filter((row) => row[0] > med0)
    const both = above.filter((row) => row[1] > med1).length / above.length
    expectAbs(both, 0.75, 4 * Math.sqrt((0.75 * 0.25) / above.length), 'P(2 above | 1 above)')
  })

  it('refuses a matrix that cannot hold together, of the wrong size or without a unit diagonal', () => {
    const impossible = [[1, 0.9, -0.9], [0.9, 1, 0.9], [-0.9, 0.9, 1]]
    expectEngineError(() => sampleJoint(marginals, impossible, 10, 1), 'R')
    expect(sampleJoint(marginals, nearestCorrelation(impossible).matrix, 10, 1)).toHaveLength(10)
    expectEngineError(() => sampleJoint(marginals, [[1, 0], [0, 1]], 10, 1), 'R')
    expectEngineError(() => sampleJoint(marginals, [[2, 0, 0], [0, 1, 0], [0, 0, 1]], 10, 1), 'R')
    expectEngineError(() => sampleJoint(marginals, R, 0, 1), 'n')
    expectEngineError(() => sampleJoint(marginals, R, 10, 1.5), 'seed')
    expectEngineError(() => sampleJoint([{ family: 'beta', alpha: -1, beta: 2 }, marginals[1], marginals[2]], R, 10, 1), 'marginals[0]')
  })
})
