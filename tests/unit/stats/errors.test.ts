import { describe, expect, it } from 'vitest'
import {
  analyzePrior,
  cookeClassical,
  EngineInputError,
  fitAll,
  fitDistribution,
  linearPool,
  logPool,
  scaleSpread,
  widthSweep,
  type Distribution,
  type PilotData,
} from '@shared/stats'

function inputError(fn: () => unknown): EngineInputError {
  try {
    fn()
  } catch (e) {
    expect(e).toBeInstanceOf(EngineInputError)
    expect(e).toBeInstanceOf(Error)
    return e as EngineInputError
  }
  throw new Error('expected an EngineInputError')
}

const N: Distribution = { family: 'normal', mu: 0, sigma: 1 }

describe('EngineInputError: field and plain message', () => {
  it('non-increasing values or probabilities', () => {
    const a = inputError(() => fitDistribution([{ value: 5, prob: 0.25 }, { value: 5, prob: 0.5 }, { value: 9, prob: 0.75 }], 'normal'))
    expect(a.field).toBe('points')
    expect(a.message).toMatch(/values must increase/)
    const b = inputError(() => fitDistribution([{ value: 1, prob: 0.5 }, { value: 2, prob: 0.4 }], 'normal'))
    expect(b.message).toMatch(/probabilities must increase/)
  })

  it('probabilities outside (0, 1)', () => {
    for (const prob of [0, 1, -0.1, 1.2, Number.NaN]) {
      const e = inputError(() => fitDistribution([{ value: 1, prob }, { value: 2, prob: 0.99 }], 'normal'))
      expect(e.field).toBe('points')
      expect(e.message).toMatch(/strictly between 0 and 1/)
    }
  })

  it('a value outside the support', () => {
    expect(inputError(() => fitAll([{ value: -1, prob: 0.2 }, { value: 3, prob: 0.8 }], { kind: 'positive' })).field).toBe('points')
    expect(inputError(() => fitDistribution([{ value: 0, prob: 0.2 }, { value: 3, prob: 0.8 }], 'lognormal')).message).toMatch(/outside/)
    expect(inputError(() => fitDistribution([{ value: 0.5, prob: 0.2 }, { value: 1.5, prob: 0.8 }], 'beta')).field).toBe('points')
    expect(inputError(() => fitDistribution([{ value: 5, prob: 0.2 }, { value: 30, prob: 0.8 }], 'scaled-beta', { lower: 0, upper: 30 })).field).toBe('points')
    expect(inputError(() => fitAll([{ value: 0.2, prob: 0.2 }, { value: 1.1, prob: 0.8 }], { kind: 'proportion' })).field).toBe('points')
  })

  it('too few points for the family', () => {
    const e = inputError(() => fitDistribution([{ value: 3, prob: 0.5 }], 'gamma'))
    expect(e.field).toBe('points')
    expect(e.message).toMatch(/at least 2 points/)
    expect(inputError(() => fitDistribution([], 'normal')).field).toBe('points')
  })

  it('weights that are negative, sum to 0 or do not match the components', () => {
    expect(inputError(() => linearPool([N, N], [0.5, -0.5])).field).toBe('weights')
    expect(inputError(() => linearPool([N, N], [0, 0])).message).toMatch(/sum to 0/)
    expect(inputError(() => logPool([N, N], [1])).field).toBe('weights')
  })

  it('empty data, negative or fractional counts, successes > trials, zero trials', () => {
    const cases: [PilotData, string][] = [
      [{ model: 'normal-known-sigma', sigma: 2, values: [] }, 'values'],
      [{ model: 'normal', values: [], sigmaPrior: { family: 'half-normal', scale: 1 } }, 'values'],
      [{ model: 'poisson', counts: [], exposures: [] }, 'counts'],
      [{ model: 'poisson', counts: [1, -2], exposures: [1, 1] }, 'counts'],
      [{ model: 'poisson', counts: [1, 2.5], exposures: [1, 1] }, 'counts'],
      [{ model: 'poisson', counts: [1, 2], exposures: [1, 0] }, 'exposures'],
      [{ model: 'binomial', successes: 11, trials: 10 }, 'successes'],
      [{ model: 'binomial', successes: 0, trials: 0 }, 'trials'],
      [{ model: 'normal-known-sigma', sigma: 0, values: [1] }, 'sigma'],
    ]
    const prior: Distribution = { family: 'gamma', shape: 2, rate: 1 }
    for (const [data, field] of cases) {
      const p = data.model === 'binomial' ? ({ family: 'beta', alpha: 1, beta: 1 } as Distribution) : data.model === 'poisson' ? prior : N
      expect(inputError(() => analyzePrior(p, data)).field).toBe(field)
    }
  })

  it('a prior or σ prior whose support does not fit the parameter', () => {
    expect(inputError(() => analyzePrior(N, { model: 'binomial', successes: 1, trials: 3 })).field).toBe('prior')
    expect(inputError(() => analyzePrior({ family: 'uniform', lower: -1, upper: 5 }, { model: 'poisson', counts: [1], exposures: [1] })).field).toBe('prior')
    expect(inputError(() => analyzePrior(N, { model: 'normal', values: [1, 2], sigmaPrior: N })).field).toBe('sigmaPrior')
  })

  it('invalid distributions, factors and Cooke inputs', () => {
    expect(inputError(() => analyzePrior({ family: 'normal', mu: 0, sigma: -1 }, { model: 'normal-known-sigma', sigma: 1, values: [1] })).field).toBe('prior')
    expect(inputError(() => scaleSpread(N, 0)).field).toBe('factor')
    expect(inputError(() => widthSweep(N, { model: 'normal-known-sigma', sigma: 1, values: [1] }, [])).field).toBe('factors')
    expect(
      inputError(() => cookeClassical({ quantiles: [0.05, 0.5, 0.95], experts: [], realizations: [1] })).field,
    ).toBe('experts')
    expect(
      inputError(() => cookeClassical({ quantiles: [0.5, 0.05], experts: [{ id: 'a', label: 'Expert 1', assessments: [[1, 2]] }], realizations: [1] })).field,
    ).toBe('quantiles')
  })
})
