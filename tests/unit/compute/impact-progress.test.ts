import { describe, expect, it } from 'vitest'
import { computeImpact, impactSteps, type ImpactTask } from '../../../server/compute/tasks'

// Constructed: five pilot values with known σ = 2, two candidate priors and a reconciled prior, four sweep widths.
const task: ImpactTask = {
  candidates: [
    { key: 'reconciled', label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'normal', mu: 3, sigma: 1 } },
    { key: 'comparison', label: 'Comparison prior', kind: 'comparison', prior: { family: 'normal', mu: 3, sigma: 20 } },
  ],
  data: { model: 'normal-known-sigma', sigma: 2, values: [2.2, 3.5, 2.8, 3.9, 2.6] },
  decision: { direction: 'above', threshold: 2.5, probability: 0.8 },
  reconciled: { family: 'normal', mu: 3, sigma: 1 },
  support: { kind: 'positive' },
  factors: [0.5, 1, 2, 4],
  n: 5,
}

describe('progress of an impact analysis (the job progress bar)', () => {
  it('reports each candidate, each sweep width and the tipping point, once and in order, and the same numbers as without', () => {
    const seen: number[] = []
    const withProgress = computeImpact(task, (done) => seen.push(done))
    expect(impactSteps(task)).toBe(2 + 4 + 1)
    expect(seen).toEqual([1, 2, 3, 4, 5, 6, 7])
    const plain = computeImpact(task)
    expect({ ...withProgress, computeMs: 0 }).toEqual({ ...plain, computeMs: 0 })
  })

  it('counts no sweep or tipping point without a reconciled prior, and no tipping point without a decision rule', () => {
    const noReconciled = { ...task, reconciled: null }
    const seen: number[] = []
    computeImpact(noReconciled, (done) => seen.push(done))
    expect(impactSteps(noReconciled)).toBe(2)
    expect(seen).toEqual([1, 2])
    const noRule = { ...task, decision: null }
    const steps: number[] = []
    computeImpact(noRule, (done) => steps.push(done))
    expect(impactSteps(noRule)).toBe(6)
    expect(steps).toEqual([1, 2, 3, 4, 5, 6])
  })
})
