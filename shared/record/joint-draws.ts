import type { RecordLink, RecordLinkedSet } from '../api/records'
import { niceAxis } from '../format/axis'
import { sampleJoint } from '../stats/index'

/** The seeded joint draws behind a linked set's scatter in the record: the same seed and n on the page and in the .docx. */
export const RECORD_JOINT_DRAWS = { seed: 20261203, n: 1000 } as const

/** One link's scatter: the pair's draws from the set's joint prior, first quantity across, second up. */
export interface LinkScatter {
  first: { name: string; symbol: string }
  second: { name: string; symbol: string }
  points: [number, number][]
}

/**
 * The scatter of each link of a linked set that is part of the prior: its recorded number of draws from sampleJoint with
 * the recorded seed, over the set's reconciled priors and the matrix it uses; none for a set that is not part of the prior.
 */
export function linkedSetScatters(set: Pick<RecordLinkedSet, 'quantities' | 'jointMatrix' | 'draws'> & { links: Pick<RecordLink, 'first' | 'second'>[] }): LinkScatter[] {
  if (!set.draws || set.quantities.some((q) => !q.distribution)) return []
  const draws = sampleJoint(set.quantities.map((q) => q.distribution!), set.jointMatrix, set.draws.n, set.draws.seed)
  const column = new Map(set.quantities.map((q, i) => [q.symbol, i]))
  return set.links.map((l) => {
    const i = column.get(l.first.symbol)!
    const j = column.get(l.second.symbol)!
    return { first: l.first, second: l.second, points: draws.map((row) => [row[i], row[j]] as [number, number]) }
  })
}

/** The share of draws a scatter's frame holds: the middle 99 %, so a few draws far out in a long tail do not squash the rest. */
export const SCATTER_FRAME_SHARE = 0.99

/** The p-quantile of sorted values (linear between order statistics; common practice). */
function sortedQuantile(sorted: number[], p: number): number {
  const h = (sorted.length - 1) * p
  const lo = Math.floor(h)
  return sorted[lo] + (h - lo) * ((sorted[Math.min(lo + 1, sorted.length - 1)] ?? sorted[lo]) - sorted[lo])
}

/** A scatter's round axes: around the middle SCATTER_FRAME_SHARE of the draws on each axis, outward to round steps. */
export function scatterAxes(points: [number, number][]): { x: { min: number; max: number; step: number }; y: { min: number; max: number; step: number } } {
  const tail = (1 - SCATTER_FRAME_SHARE) / 2
  const axis = (values: number[]) => {
    const sorted = [...values].sort((a, b) => a - b)
    return niceAxis(sortedQuantile(sorted, tail), sortedQuantile(sorted, 1 - tail), 5)
  }
  return { x: axis(points.map((p) => p[0])), y: axis(points.map((p) => p[1])) }
}
