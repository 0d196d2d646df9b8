import { describe, expect, it } from 'vitest'
import { analyzePrior, type PilotData, type PriorDistribution } from '@shared/stats'
import fx from './fixtures/huge-counts.json'

const rel = (got: number, want: number) => Math.abs(got - want) / Math.abs(want)

// Outside check: fixtures/huge-counts.json, written by generate_huge_counts.py (mpmath at 80 digits, exact reference forms:
// ln Γ closed forms, beta moments and the gamma moment generating function). Constructed cases, n from 1e6 to 1e12.
describe('binomial evidence and Box p at very large n', () => {
  for (const c of fx.binomial) {
    it(c.id, () => {
      const data: PilotData = { model: 'binomial', successes: c.successes, trials: c.trials, ...('rows' in c ? { rows: c.rows } : {}) }
      const r = analyzePrior(c.prior as PriorDistribution, data)
      expect(rel(r.logEvidence, c.logEvidence), `log evidence ${r.logEvidence} vs ${c.logEvidence}`).toBeLessThan(1e-10)
      expect(rel(r.priorPredictiveP, c.boxP), `Box p ${r.priorPredictiveP} vs ${c.boxP}`).toBeLessThan(1e-8)
      expect(rel(r.logPriorPredictiveP, c.logBoxP)).toBeLessThan(1e-8)
      expect(r.conflict).toBe(c.boxP < 0.05)
    })
  }
})

describe('Poisson evidence and Box p at very large counts', () => {
  for (const c of fx.poisson) {
    it(c.id, () => {
      const r = analyzePrior(c.prior as PriorDistribution, { model: 'poisson', counts: c.counts, exposures: c.exposures })
      expect(rel(r.logEvidence, c.logEvidence), `log evidence ${r.logEvidence} vs ${c.logEvidence}`).toBeLessThan(1e-10)
      expect(rel(r.priorPredictiveP, c.boxP), `Box p ${r.priorPredictiveP} vs ${c.boxP}`).toBeLessThan(1e-8)
      expect(rel(r.logPriorPredictiveP, c.logBoxP)).toBeLessThan(1e-8)
    })
  }
})
