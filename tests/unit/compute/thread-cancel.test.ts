import { afterAll, describe, expect, it } from 'vitest'
import { computeSteps, type ImpactTask } from '../../../server/compute/tasks'
import { ComputeCancelled, ComputeThread } from '../../../server/compute/threads'

// Constructed: five pilot values with known σ = 2, a reconciled and a comparison prior, 60 sweep widths.
const task: ImpactTask = {
  candidates: [
    { key: 'reconciled', label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'normal', mu: 3, sigma: 1 } },
    { key: 'comparison', label: 'Comparison prior', kind: 'comparison', prior: { family: 'normal', mu: 3, sigma: 20 } },
  ],
  data: { model: 'normal-known-sigma', sigma: 2, values: [2.2, 3.5, 2.8, 3.9, 2.6] },
  decision: { direction: 'above', threshold: 2.5, probability: 0.8 },
  reconciled: { family: 'normal', mu: 3, sigma: 1 },
  support: { kind: 'positive' },
  factors: Array.from({ length: 60 }, (_, i) => 0.25 * 1.06 ** i),
  n: 5,
}

const thread = new ComputeThread()
afterAll(() => thread.stop())

describe('cancelling an analysis on its compute thread', () => {
  it('stops at the first step once the signal is aborted, reporting no step, and keeps the thread for the next analysis', async () => {
    // The thread reads the stop after each step; a signal aborted before the start stops it after its first step. (A
    // signal aborted mid-run stops it the same way at the step after; when that is, depends on the thread's speed.)
    const seen: number[] = []
    await expect(thread.run(task, (done) => seen.push(done), 60_000, AbortSignal.abort())).rejects.toBeInstanceOf(ComputeCancelled)
    expect(seen).toEqual([])

    const after: number[] = []
    const result = await thread.run(task, (done) => after.push(done), 60_000)
    expect(after).toEqual(Array.from({ length: computeSteps(task) }, (_, i) => i + 1))
    expect(result.sweep?.points).toHaveLength(60)
  }, 60_000)
})
