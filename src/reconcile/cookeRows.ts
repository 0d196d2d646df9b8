import { formatNumber } from '@shared/format'
import type { CookeScore, ReconcileExpert } from '@/api/reconciliation'

/** One included expert's Cooke scores, the weight at the chosen cutoff and the weight with every expert kept. */
export interface CookeRow {
  expertId: number
  label: string
  name: string
  calibration: number
  information: number
  weight: number
  weightAllKept: number | null
  passes: boolean
}

/** The rows of the weights view, in the order of the scores (the included experts). */
export function cookeRows(experts: ReconcileExpert[], scores: CookeScore[], allKept: CookeScore[] | null, cutoff: number): CookeRow[] {
  const base = new Map((allKept ?? []).map((s) => [s.expertId, s]))
  return scores.flatMap((s) => {
    const e = experts.find((x) => x.expertId === s.expertId)
    if (!e) return []
    return [{
      expertId: s.expertId, label: e.label, name: e.name, calibration: s.calibration, information: s.information, weight: s.normalizedWeight,
      weightAllKept: base.get(s.expertId)?.normalizedWeight ?? null, passes: s.calibration >= cutoff,
    }]
  })
}

/** What the cutoff does, in a sentence. */
export function cutoffEffect(rows: CookeRow[], cutoff: number): string {
  const dropped = rows.filter((r) => !r.passes)
  if (cutoff <= 0) return 'No cutoff: every expert is weighted by calibration × information.'
  if (dropped.length === 0) return `Every expert's calibration score is at least ${formatNumber(cutoff)}: nobody is dropped.`
  if (dropped.length === rows.length) return `No expert reaches a calibration score of ${formatNumber(cutoff)}: performance weights cannot be used at this cutoff.`
  return `${dropped.map((r) => r.label).join(', ')} ${dropped.length === 1 ? 'falls' : 'fall'} below the cutoff ${formatNumber(cutoff)} and ${dropped.length === 1 ? 'gets' : 'get'} no weight.`
}
