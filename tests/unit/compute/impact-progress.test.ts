import { afterAll, describe, expect, it } from 'vitest'
import { computeImpact, computeJointDraws, computeSteps, impactSteps, type ImpactTask, type JointDrawsTask } from '../../../server/compute/tasks'
import { ComputeCancelled, ComputeThread } from '../../../server/compute/threads'

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

// Constructed: σ unknown, three candidates of which one is a robust mixture, a 12-width sweep.
const unknownSigma: ImpactTask = {
  candidates: [
    { key: 'expert-1', label: 'Expert 1', kind: 'expert', prior: { family: 'normal', mu: 2.5, sigma: 0.8 } },
    { key: 'reconciled', label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'normal', mu: 3, sigma: 1 } },
    { key: 'comparison', label: 'Comparison prior', kind: 'comparison', prior: { family: 'normal', mu: 3, sigma: 20 } },
    {
      key: 'mixture', label: 'Robust mixture (20 % on the wide component)', kind: 'mixture', prior: { family: 'normal', mu: 3, sigma: 1 },
      mixture: { components: [{ family: 'normal', mu: 3, sigma: 1 }, { family: 'normal', mu: 3, sigma: 10 }], weights: [0.8, 0.2] },
    },
  ],
  data: { model: 'normal', values: [2.2, 3.5, 2.8, 3.9, 2.6, 3.1], sigmaPrior: { family: 'half-normal', scale: 2 } },
  decision: { direction: 'below', threshold: 3.5, probability: 0.7 },
  reconciled: { family: 'normal', mu: 3, sigma: 1 },
  support: { kind: 'real' },
  factors: Array.from({ length: 12 }, (_, i) => 0.25 * 1.3 ** i),
  n: 6,
}

/** Every progress report of one computation, in order. */
function reports(t: ImpactTask): number[] {
  const seen: number[] = []
  computeImpact(t, (done) => seen.push(done))
  return seen
}

const oneToN = (n: number) => Array.from({ length: n }, (_, i) => i + 1)

describe('progress of an impact analysis (the job progress bar)', () => {
  it('counts each candidate, the fractional Bayes factors, each sensitivity, each sweep width, both curves, the tipping point and the store', () => {
    // 2 candidates + 1 fractional + 2 sensitivities, 4 widths + 2 curves, the tipping point; storing is the last step.
    expect(computeSteps(task)).toBe(5 + 6 + 1)
    expect(impactSteps(task)).toBe(13)
    expect(reports(task)).toEqual(oneToN(12))
  })

  it('reports every counted step once and in order whatever the analysis holds, never the total (the worker stores the last step)', () => {
    const cases: Record<string, ImpactTask> = {
      'no reconciled prior': { ...task, reconciled: null },
      'no decision rule': { ...task, decision: null },
      'no comparison prior': { ...task, candidates: task.candidates.filter((c) => c.kind !== 'comparison') },
      'unknown σ, a mixture, 12 widths': unknownSigma,
    }
    const counted = Object.fromEntries(Object.entries(cases).map(([name, t]) => [name, [computeSteps(t), impactSteps(t), reports(t)]]))
    expect(counted).toEqual({
      'no reconciled prior': [5, 6, oneToN(5)],
      'no decision rule': [11, 12, oneToN(11)],
      'no comparison prior': [1 + 1 + 6 + 1, 10, oneToN(9)],
      'unknown σ, a mixture, 12 widths': [4 + 1 + 4 + 12 + 2 + 1, 25, oneToN(24)],
    })
  })

  it('gives the same numbers with and without a listener', () => {
    const withProgress = computeImpact(task, () => {})
    const plain = computeImpact(task)
    expect({ ...withProgress, computeMs: 0 }).toEqual({ ...plain, computeMs: 0 })
  })

  it('stops at the step whose report throws (how a cancelled job ends), reporting nothing after it', () => {
    const stop = new Error('stopped here')
    for (const at of [1, 3, 7, 12]) {
      const seen: number[] = []
      expect(() => computeImpact(task, (done) => {
        seen.push(done)
        if (done === at) throw stop
      })).toThrow(stop)
      expect(seen).toEqual(oneToN(at))
    }
  })
})

describe('a compute thread: cancelling an analysis, and joint draws off the event loop', () => {
  const thread = new ComputeThread()
  afterAll(() => thread.stop())
  const wide = { ...task, factors: Array.from({ length: 60 }, (_, i) => 0.25 * 1.06 ** i) }

  it('stops at the first step once the signal is aborted, reporting no step, and keeps the thread for the next analysis', async () => {
    // The thread reads the stop after each step; a signal aborted before the start stops it after its first step. (A
    // signal aborted mid-run stops it the same way at the step after; when that is depends on the thread's speed.)
    const seen: number[] = []
    await expect(thread.run(wide, (done) => seen.push(done), 60_000, AbortSignal.abort())).rejects.toBeInstanceOf(ComputeCancelled)
    expect(seen).toEqual([])

    const after: number[] = []
    const result = await thread.run(wide, (done) => after.push(done), 60_000)
    expect(after).toEqual(oneToN(computeSteps(wide)))
    expect(result.sweep?.points).toHaveLength(60)
  }, 60_000)

  it('makes joint draws byte for byte as in the process, several asked at once each in its turn', async () => {
    // Constructed: a gamma and a normal marginal bound by a Gaussian copula with correlation 0.4.
    const draws: JointDrawsTask = { symbols: ['bursts', 'flow'], marginals: [{ family: 'gamma', shape: 8, rate: 0.7 }, { family: 'normal', mu: 3, sigma: 1 }], matrix: [[1, 0.4], [0.4, 1]], n: 2000, seed: 7 }
    const other = { ...draws, seed: 8 }
    const [a, b] = await Promise.all([thread.jointDraws(draws, 60_000), thread.jointDraws(other, 60_000)])
    expect(a).toBe(computeJointDraws(draws))
    expect(b).toBe(computeJointDraws(other))
    expect(a).not.toBe(b)
    const lines = a.trimEnd().split('\n')
    expect(lines[0]).toBe('bursts,flow')
    expect(lines).toHaveLength(2001)
  }, 60_000)
})
