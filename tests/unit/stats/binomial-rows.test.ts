import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { extractPilotData } from '../../../shared/elicitation/pilot'
import { analyzePrior, bayesFactor, EngineInputError, type PilotData, type PriorDistribution } from '../../../shared/stats/index'
import { expectAbs } from './checks'

// Reference values: scipy 1.17 (scipy.integrate.quad of the product of scipy.stats.bernoulli.pmf / scipy.stats.binom.pmf
// per row times the prior density; scipy.special.betaln closed form for beta priors), from the committed generator
// fixtures/binomial-rows.py, which records the library versions in fixtures/binomial-rows.json.
interface RowCase {
  id: string
  layout: 'binary' | 'counts'
  successes: number[]
  trials: number[]
  prior: PriorDistribution
  logMarginalLikelihood: number
  logMarginalLikelihoodClosedForm?: number
  logEvidenceFromTotals: number | null
}
const FIXTURE = JSON.parse(readFileSync(new URL('./fixtures/binomial-rows.json', import.meta.url), 'utf8')) as { cases: RowCase[] }
const sum = (xs: number[]) => xs.reduce((s, x) => s + x, 0)
const rowsData = (c: RowCase): PilotData => ({ model: 'binomial', successes: sum(c.successes), trials: sum(c.trials), rows: { successes: c.successes, trials: c.trials } })

describe('log evidence of binomial data given as rows', () => {
  for (const c of FIXTURE.cases) {
    it(`${c.id}: equals scipy's marginal likelihood of the rows as recorded (scipy.integrate.quad of per-row pmfs × prior)`, () => {
      const a = analyzePrior(c.prior, rowsData(c))
      expectAbs(a.logEvidence, c.logMarginalLikelihood, 1e-9, c.id)
      if (c.logMarginalLikelihoodClosedForm !== undefined) expectAbs(a.logEvidence, c.logMarginalLikelihoodClosedForm, 1e-10, `${c.id} (scipy.special.betaln closed form)`)
      // The quadrature route agrees with the same scipy value.
      expectAbs(analyzePrior(c.prior, rowsData(c), { forceQuadrature: true }).logEvidence, c.logMarginalLikelihood, 1e-8, `${c.id} by quadrature`)
    })
  }

  it('differs from the totals-only evidence by the coefficients, and leaves Bayes factors as they were (scipy values)', () => {
    const c = FIXTURE.cases.find((x) => x.id === 'row-counts-beta')!
    const totals: PilotData = { model: 'binomial', successes: sum(c.successes), trials: sum(c.trials) }
    expectAbs(analyzePrior(c.prior, totals).logEvidence, c.logEvidenceFromTotals!, 1e-10, 'totals (scipy.special.betaln with C(n, y))')
    const other: PriorDistribution = { family: 'beta', alpha: 1, beta: 1 }
    const withRows = bayesFactor(analyzePrior(c.prior, rowsData(c)).logEvidence, analyzePrior(other, rowsData(c)).logEvidence).logBF
    const withTotals = bayesFactor(analyzePrior(c.prior, totals).logEvidence, analyzePrior(other, totals).logEvidence).logBF
    expectAbs(withRows, withTotals, 1e-12, 'log Bayes factor')
  })

  it('refuses rows that do not add up to the totals', () => {
    const bad: PilotData = { model: 'binomial', successes: 3, trials: 4, rows: { successes: [1, 1], trials: [2, 1] } }
    expect(() => analyzePrior({ family: 'beta', alpha: 1, beta: 1 }, bad)).toThrow(EngineInputError)
  })
})

describe('pilot data extraction keeps the rows of binomial data', () => {
  it('a 0/1 column becomes rows of one trial each; per-row counts keep their rows', () => {
    const binary = extractPilotData([['id', 'joins'], ['1', '1'], ['2', '0'], ['3', '1']], { model: 'binomial', binaryColumn: 'joins' })
    expect(binary.data).toEqual({ model: 'binomial', successes: 2, trials: 3, rows: { successes: [1, 0, 1], trials: [1, 1, 1] } })
    const counts = extractPilotData([['s', 't'], ['3', '10'], ['5', '12']], { model: 'binomial', successesColumn: 's', trialsColumn: 't' })
    expect(counts.data).toEqual({ model: 'binomial', successes: 8, trials: 22, rows: { successes: [3, 5], trials: [10, 12] } })
  })
})
