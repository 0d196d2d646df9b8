import { describe, expect, it } from 'vitest'
import { impactSchema } from '@shared/schemas/impact'
import { analyzePrior, type PilotData, type Support } from '@shared/stats'
import { defaultComparison, distributionProblem, impactFormSchema, initialValues, requestOf, ruleText, widePrior } from '@/impact/form'

const bursts: PilotData = { model: 'poisson', counts: [11, 7, 16, 9, 10, 12, 8, 8], exposures: [1.1, 0.85, 1.4, 0.95, 1, 1.2, 0.7, 0.8] }
const flow: PilotData = { model: 'normal-known-sigma', sigma: 1.5, values: [3.1, 4.6, 2.4, 3.8, 4.0, 3.5, 4.2, 4.0] }
const share: PilotData = { model: 'binomial', successes: 41, trials: 120 }

describe('impact form: comparison prior defaults', () => {
  it('prefills a wide prior valid for each support, which the engine accepts with the pilot data', () => {
    const cases: [Support, PilotData][] = [[{ kind: 'positive' }, bursts], [{ kind: 'real' }, flow], [{ kind: 'proportion' }, share], [{ kind: 'bounded', lower: 0, upper: 250 }, flow]]
    for (const [support, data] of cases) {
      const d = defaultComparison(support, data)
      expect(distributionProblem(d as never, support)).toBeNull()
      expect(Number.isFinite(analyzePrior(d, data).logEvidence)).toBe(true)
    }
    // Burst rate ≈ 10.1 per unit exposure: an exponential with mean about 100.
    expect(defaultComparison({ kind: 'positive' }, bursts)).toEqual({ family: 'gamma', shape: 1, rate: 0.0099 })
    expect(defaultComparison({ kind: 'proportion' }, share)).toEqual({ family: 'beta', alpha: 1, beta: 1 })
    expect(widePrior('uniform', { kind: 'bounded', lower: 0, upper: 250 })).toEqual({ family: 'uniform', lower: 0, upper: 250 })
  })

  it('puts each problem on the parameter it concerns', () => {
    const positive: Support = { kind: 'positive' }
    expect(distributionProblem({ family: 'gamma', shape: '', rate: 1 }, positive)).toEqual({ param: 'shape', message: 'Enter the shape' })
    expect(distributionProblem({ family: 'gamma', shape: 'two', rate: 1 }, positive)).toEqual({ param: 'shape', message: 'The shape must be a number' })
    expect(distributionProblem({ family: 'gamma', shape: 2, rate: -1 }, positive)).toEqual({ param: 'rate', message: 'The rate must be above 0' })
    expect(distributionProblem({ family: 'uniform', lower: 5, upper: 2 }, positive)).toEqual({ param: 'upper', message: 'The upper bound must be above the lower bound' })
    expect(distributionProblem({ family: 'uniform', lower: -1, upper: 2 }, positive)?.param).toBe('lower')
    expect(distributionProblem({ family: 'normal', mu: 0, sigma: 1 }, positive)?.param).toBe('family')
  })
})

describe('impact form: the request', () => {
  const support: Support = { kind: 'positive' }

  it('sends the mixture and the decision rule only when switched on, as numbers', () => {
    const values = initialValues(support, 4, bursts)
    expect(requestOf(values)).toEqual({ datasetId: 4, comparison: { family: 'gamma', shape: 1, rate: 0.0099 }, mixtureWeight: null, mixtureWide: null, decision: null, trainingFraction: null })
    const on = { ...values, mixtureOn: true, mixtureWeight: '0.25', decisionOn: true, decision: { direction: 'above' as const, threshold: '12', probability: '0.8' } }
    const body = requestOf(on)
    expect(body).toMatchObject({ mixtureWeight: 0.25, mixtureWide: { family: 'gamma', shape: 1, rate: 0.0099 }, decision: { direction: 'above', threshold: 12, probability: 0.8 } })
    expect(impactSchema.isValidSync(body)).toBe(true)
  })

  it('restores the last run, and checks the options with the shared messages only when switched on', async () => {
    const last = { datasetId: 7, comparison: { family: 'lognormal' as const, meanlog: 2, sdlog: 3 }, mixtureWeight: 0.1, mixtureWide: { family: 'gamma' as const, shape: 1, rate: 0.01 }, decision: { direction: 'below' as const, threshold: 9, probability: 0.9 }, trainingFraction: 0.25 }
    const values = initialValues(support, 4, bursts, last)
    expect(requestOf(values)).toEqual(last)

    const schema = impactFormSchema(support)
    const off = { ...values, mixtureOn: false, mixtureWeight: 'x', decisionOn: false, decision: { direction: 'above', threshold: undefined, probability: 0.8 } }
    await expect(schema.validate(off)).resolves.toBeTruthy()
    const bad = { ...values, mixtureWeight: 2, decision: { direction: 'above', threshold: undefined, probability: 0.8 } }
    const error = await schema.validate(bad, { abortEarly: false }).catch((e: { inner: { path: string; message: string }[] }) => e)
    const messages = Object.fromEntries((error as { inner: { path: string; message: string }[] }).inner.map((e) => [e.path, e.message]))
    expect(messages).toEqual({ mixtureWeight: 'Between 0.01 and 0.99', 'decision.threshold': 'Enter the threshold' })
    const badPrior = await schema.validate({ ...values, comparison: { family: 'gamma', shape: 0, rate: 1 } }).catch((e: { path: string; message: string }) => e)
    expect(badPrior).toMatchObject({ path: 'comparison.shape', message: 'The shape must be above 0' })
  })

  it('sends the training fraction b as a number, none when the field is empty, and refuses b outside (0, 1) with the shared message', async () => {
    const schema = impactFormSchema(support)
    const values = initialValues(support, 4, bursts)
    expect(values.trainingFraction).toBe('')
    await expect(schema.validate(values)).resolves.toBeTruthy()
    await expect(schema.validate({ ...values, trainingFraction: '  ' })).resolves.toBeTruthy()
    expect(requestOf({ ...values, trainingFraction: '0.3' }).trainingFraction).toBe(0.3)
    expect(requestOf({ ...values, trainingFraction: ' ' }).trainingFraction).toBeNull()
    for (const b of ['0', '1', '-0.5', '2']) {
      await expect(schema.validateAt('trainingFraction', { ...values, trainingFraction: b })).rejects.toMatchObject({ message: 'The training fraction b must be greater than 0 and less than 1' })
    }
    await expect(schema.validateAt('trainingFraction', { ...values, trainingFraction: 'half' })).rejects.toMatchObject({ message: 'The training fraction b must be a number' })
  })

  it('states the rule in words', () => {
    expect(ruleText({ direction: 'above', threshold: 12, probability: 0.8 }, 'burst_rate', 'bursts/100 km/yr')).toBe('act if P(burst_rate > 12 bursts/100 km/yr) > 0.8')
  })
})
