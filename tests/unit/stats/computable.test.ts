import { describe, expect, it } from 'vitest'
import { evaluateCandidates } from '../../../shared/elicitation/impact'
import { EngineInputError, fitAll, validateDistribution, type Distribution } from '../../../shared/stats/index'
import { LogIntegral } from '../../../shared/stats/quadrature'

// Values constructed for these checks: each sits where doubles lose a distribution's spread (about 1e308, or a width
// below the spacing of doubles at the location).
describe('distributions one cannot compute with', () => {
  const improper: [string, Distribution][] = [
    ['lognormal(700, 1e-300)', { family: 'lognormal', meanlog: 700, sdlog: 1e-300 }],
    ['normal(1e308, 1e13)', { family: 'normal', mu: 1e308, sigma: 1e13 }],
    ['normal(1e6, 1e-12)', { family: 'normal', mu: 1e6, sigma: 1e-12 }],
    ['uniform(-1.79e308, 1.79e308)', { family: 'uniform', lower: -1.79e308, upper: 1.79e308 }],
    ['uniform(-1e308, -1e308)', { family: 'uniform', lower: -1e308, upper: -1e308 }],
  ]
  it.each(improper)('%s is refused with the field named', (_, d) => {
    expect(() => validateDistribution(d, 'comparison')).toThrow(EngineInputError)
    try {
      validateDistribution(d, 'comparison')
    } catch (err) {
      expect((err as EngineInputError).field).toBe('comparison')
    }
  })

  it('ordinary priors still pass', () => {
    for (const d of [{ family: 'normal', mu: 3, sigma: 1 }, { family: 'lognormal', meanlog: 1, sdlog: 0.5 }, { family: 'gamma', shape: 2, rate: 0.5 }, { family: 'beta', alpha: 2, beta: 8 }] as Distribution[]) {
      expect(() => validateDistribution(d)).not.toThrow()
    }
  })
})

describe('fitting values at the edge of the number range', () => {
  it.each([
    [[-1e308, 0, 1e308]],
    [[-1.78e308, -1.75e308, -1.72e308]],
    [[1e300, 1e300 * (1 + 1e-15), 1e300 * (1 + 2e-15)]],
  ])('%j: no improper fit is returned; when none is left, a plain input error on points', (values) => {
    const points = values.map((value, i) => ({ value, prob: [0.25, 0.5, 0.75][i] }))
    let fits: ReturnType<typeof fitAll> = []
    try {
      fits = fitAll(points, { kind: 'real' })
    } catch (err) {
      expect(err).toBeInstanceOf(EngineInputError)
      expect((err as EngineInputError).field).toBe('points')
    }
    for (const f of fits) expect(() => validateDistribution(f.distribution)).not.toThrow()
  })
})

describe('integrals over nothing', () => {
  it('an integrand zero everywhere is an input error on the prior, not a crash', () => {
    expect(() => new LogIntegral(() => -Infinity, [{ center: 0, scale: 1 }])).toThrow(EngineInputError)
  })

  it('an impact candidate whose prior cannot be computed is named in the error', () => {
    const run = () => evaluateCandidates([{ key: 'expert-2', label: 'Expert 2', kind: 'expert', prior: { family: 'uniform', lower: -1e308, upper: -1e308 } }],
      { model: 'normal-known-sigma', values: [2.2, 3.5], sigma: 2 }, null)
    expect(run).toThrow(/^Expert 2: /)
    try {
      run()
    } catch (err) {
      expect((err as EngineInputError).field).toBe('expert-2')
    }
  })
})
