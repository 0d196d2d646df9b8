import { describe, expect, it } from 'vitest'
import { compositionImpact, flatDirichlet } from '../../../shared/elicitation/composition-impact'
import { SWEEP_FACTORS } from '../../../shared/elicitation/impact'

describe('compositionImpact', () => {
  const shares = ['Join', 'Meter only', 'Decline']

  it('gives the flat Dirichlet the evidence 1 / C(n + K − 1, K − 1) of one row of counts', () => {
    // Under Dirichlet(1, …, 1) every vector of K counts adding up to n is equally likely: 1 / C(n + K − 1, K − 1)
    // (Bose–Einstein counting; from memory). Counts 3, 2, 5: n = 10, K = 3, C(12, 2) = 66. Constructed data.
    const r = compositionImpact(shares, [6, 4, 10], { model: 'multinomial', counts: [[3, 2, 5]] })
    expect(r.comparison.alpha).toEqual(flatDirichlet(3))
    expect(r.comparison.analysis.logEvidence).toBeCloseTo(-Math.log(66), 12)
    expect(r.bayesFactor.logBF).toBeCloseTo(r.prior.analysis.logEvidence + Math.log(66), 12)
    expect(r.observations).toBe(10)
    expect(r.rows).toBe(1)
  })

  it('sweeps the total concentration as Σα / k² with the Bayes factor against the comparison at each width', () => {
    const r = compositionImpact(shares, [6, 4, 10], { model: 'multinomial', counts: [[3, 2, 5], [4, 1, 5]] })
    expect(r.sweep.points.map((p) => p.factor)).toEqual(SWEEP_FACTORS)
    for (const p of r.sweep.points) {
      expect(p.totalConcentration).toBeCloseTo(20 / p.factor ** 2, 12)
      expect(p.logBFvsComparison).toBeCloseTo(p.logEvidence - r.comparison.analysis.logEvidence, 12)
    }
    const atOne = r.sweep.points.find((p) => p.factor === 1)!
    expect(atOne.logEvidence).toBeCloseTo(r.prior.analysis.logEvidence, 12)
  })

  it('flags a prior that outweighs the data, and says so', () => {
    const heavy = compositionImpact(shares, [60, 40, 100], { model: 'multinomial', counts: [[3, 2, 5]] })
    expect(heavy.flags).toContain('prior-dominates')
    expect(heavy.findings.some((f) => f.startsWith('The prior carries more information than the pilot data: its total concentration 200'))).toBe(true)
    const light = compositionImpact(shares, [0.6, 0.4, 1], { model: 'multinomial', counts: [[30, 20, 50]] })
    expect(light.flags).not.toContain('prior-dominates')
  })

  it('flags a Bayes factor driven by the width when the evidence moves more than 3× and the posterior means stay put', () => {
    // Much data and a wide prior: the posterior hardly moves with the width while the evidence does.
    const driven = compositionImpact(shares, [0.3, 0.2, 0.5], { model: 'multinomial', counts: [[300, 200, 500]] })
    expect(driven.sweep.evidenceRatio).toBeGreaterThan(3)
    expect(driven.sweep.priorDriven).toBe(true)
    expect(driven.flags).toContain('prior-driven')
  })
})
