// The per-distribution closures that joint draws and pools use in their inner loops (quantileFunction,
// logDensityFunction): parameters checked once, and the same doubles as quantile and logPdf, bit for bit.
import { describe, expect, it } from 'vitest'
import { cdf, logPdf, pdf, quantile, sampleJoint, sf, type PriorDistribution } from '@shared/stats'
import { logDensityFunction, quantileFunction } from '@shared/stats/distributions'
import { EngineInputError } from '@shared/stats/errors'
import pinned from './fixtures/pinned-joint-draws.json'

const everyFamily: PriorDistribution[] = [
  { family: 'normal', mu: -3, sigma: 0.2 },
  { family: 'student-t', mu: 1, sigma: 2, df: 3.5 },
  { family: 'student-t', mu: 0, sigma: 1, df: 0.3 },
  { family: 'lognormal', meanlog: 0.5, sdlog: 1.1 },
  { family: 'gamma', shape: 0.2, rate: 3 },
  { family: 'gamma', shape: 1, rate: 2 },
  { family: 'gamma', shape: 250, rate: 0.1 },
  { family: 'beta', alpha: 0.3, beta: 0.6 },
  { family: 'beta', alpha: 12, beta: 3 },
  { family: 'scaled-beta', alpha: 2, beta: 7, lower: -5, upper: 45 },
  { family: 'uniform', lower: 2, upper: 8 },
  { family: 'half-normal', scale: 4 },
]
const probabilities = [0, 1e-15, 1e-9, 0.001, 0.02, 0.1, 0.25, 0.5, 0.6, 0.9, 0.975, 0.999, 1 - 1e-9, 1, -0.1, 1.1, NaN]

describe('quantileFunction: the quantile with parameters checked once', () => {
  it('gives the same double as quantile on a grid of p for every family (tolerance 0)', () => {
    for (const d of everyFamily) {
      const q = quantileFunction(d)
      for (const p of probabilities) expect(Object.is(q(p), quantile(d, p)), `${JSON.stringify(d)} at p = ${p}: ${q(p)} vs ${quantile(d, p)}`).toBe(true)
    }
  })

  // Round trip through the accurate CDF, in the smaller tail so that 1 − p is never formed: the tail probability at
  // Q(p) is within 1e-11 relative, plus what moving x by 4 units in the last place can change (density × 4ε|x|).
  it('inverts the CDF in the smaller tail for every family', () => {
    for (const d of everyFamily) {
      const q = quantileFunction(d)
      for (const p of probabilities.filter((x) => x > 0 && x < 1)) {
        const x = q(p)
        const tail = p <= 0.5 ? p : 1 - p
        const got = p <= 0.5 ? cdf(d, x) : sf(d, x)
        const allowed = 1e-11 * tail + pdf(d, x) * 4 * Number.EPSILON * Math.abs(x)
        expect(Math.abs(got - tail), `${JSON.stringify(d)} at p = ${p}: tail ${got} vs ${tail}`).toBeLessThanOrEqual(allowed)
      }
    }
  })

  it('refuses bad parameters when it is made, with the field named', () => {
    expect(() => quantileFunction({ family: 'gamma', shape: -1, rate: 1 })).toThrow(EngineInputError)
    expect(() => logDensityFunction({ family: 'beta', alpha: 1, beta: Number.NaN })).toThrow(EngineInputError)
  })
})

describe('logDensityFunction: the log density with parameters checked once', () => {
  it('gives the same double as logPdf, inside, outside and at the ends of the support', () => {
    const xs = [-Infinity, -50, -1, 0, 1e-300, 1e-9, 0.3, 0.5, 0.999, 1, 2, 7.5, 8, 40, 45, 1e6, Infinity, NaN]
    for (const d of everyFamily) {
      const f = logDensityFunction(d)
      for (const x of xs) expect(Object.is(f(x), logPdf(d, x)), `${JSON.stringify(d)} at x = ${x}: ${f(x)} vs ${logPdf(d, x)}`).toBe(true)
    }
  })
})

// Pinned before the per-marginal quantile functions were introduced (fixtures/generate_pinned_joint_draws.ts): a seed's
// draws are part of a documented prior, so a speed change must give the same doubles, bit for bit.
describe('joint draws for a seed stay the same', () => {
  it('reproduces the pinned draws of one marginal of every family exactly', () => {
    const draws = sampleJoint(pinned.marginals as PriorDistribution[], pinned.matrix, pinned.n, pinned.seed)
    expect(draws.map((row) => row.map(String))).toEqual(pinned.draws)
  })
})
