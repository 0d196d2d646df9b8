import { describe, expect, it } from 'vitest'
import { analyzePrior, type PilotData, type PriorDistribution } from '@shared/stats'
import { logBetaPQ, logGammaPQ } from '@shared/stats/special'
import fixture from './fixtures/conflict.json'

type Case = { model: string; prior: PriorDistribution; data: PilotData; logEvidence: number; logBoxP: number }
const cases = fixture.cases as Case[]

// Outside check: fixtures/conflict.json, written by generate_conflict.py (mpmath at 50 digits: quadrature over the
// prior, or the closed forms named in that script; versions in meta.generated_with). Constructed cases of strong
// prior–data conflict, where Box's p underflows double precision but ln p does not.
describe('strong prior–data conflict: the evidence, ln p and the flag, never an error', () => {
  for (const c of cases) {
    const what = `${c.model}, ${JSON.stringify(c.prior)} against ${JSON.stringify(c.data).slice(0, 60)}`
    it(what, () => {
      const a = analyzePrior(c.prior, c.data)
      expect(Math.abs(a.logEvidence - c.logEvidence)).toBeLessThan(1e-9 * Math.abs(c.logEvidence))
      expect(Math.abs(a.logPriorPredictiveP - c.logBoxP)).toBeLessThan(1e-9 * Math.max(1, Math.abs(c.logBoxP)))
      expect(a.priorPredictiveP).toBe(Math.exp(c.logBoxP))
      expect(a.conflict).toBe(true)
    })
  }

  it('the same ln p by forced quadrature where a closed form exists', () => {
    for (const c of cases.filter((k) => k.prior.family === 'beta' || k.prior.family === 'gamma')) {
      const a = analyzePrior(c.prior, c.data, { forceQuadrature: true })
      expect(Math.abs(a.logEvidence - c.logEvidence)).toBeLessThan(1e-8 * Math.abs(c.logEvidence))
      expect(Math.abs(a.logPriorPredictiveP - c.logBoxP)).toBeLessThan(1e-8 * Math.abs(c.logBoxP))
    }
  })

  it('no flag when prior and data agree, and ln p is the log of p', () => {
    const a = analyzePrior({ family: 'beta', alpha: 2, beta: 8 }, { model: 'binomial', successes: 3, trials: 20 })
    expect(a.conflict).toBe(false)
    expect(a.logPriorPredictiveP).toBeCloseTo(Math.log(a.priorPredictiveP), 12)
    const skipped = analyzePrior({ family: 'beta', alpha: 2, beta: 8 }, { model: 'binomial', successes: 3, trials: 20 }, { skipPredictiveCheck: true })
    expect(skipped.priorPredictiveP).toBeNaN()
    expect(skipped.conflict).toBe(false)
  })
})

// Constructed: ln I_x(a, b) and ln P(a, x) far below the double range agree with the product of their exact parts.
describe('incomplete beta and gamma in logs', () => {
  it('ln I_x(a, 1) = a ln x exactly (Abramowitz & Stegun 26.5.x: I_x(a, 1) = x^a), far below 1e-308', () => {
    for (const [x, a] of [[1e-5, 100], [0.01, 900], [0.3, 5000]]) expect(logBetaPQ(x, a, 1).logP).toBeCloseTo(a * Math.log(x), 8)
  })
  it('ln Q(1, x) = −x exactly (Q(1, x) = e^(−x)), far below 1e-308', () => {
    for (const x of [800, 5000, 1e5]) expect(logGammaPQ(1, x).logQ).toBeCloseTo(-x, 8)
  })
})
