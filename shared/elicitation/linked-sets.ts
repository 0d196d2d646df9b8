import { correlationWithEigenvalueFloor, nearestCorrelation, quantile, type Distribution } from '../stats/index'
import { linkedSetCodeWithCheck, type LinkedQuantity } from './joint-model-code'
import { safeName } from './model-code'

/** One expert's weight in a quantity's reconciliation, normalised over that reconciliation's experts. */
export type ReconciliationWeights = Map<number, number>

/** The weights of a link's experts and how they were set, in plain words. */
export interface LinkPoolWeights {
  weights: number[]
  rule: string
}

/** One side's weights for the link's experts, renormalised over them; null when none of them carries weight there. */
function sideWeights(expertIds: number[], side: ReconciliationWeights | null): number[] | null {
  const raw = side ? expertIds.map((id) => side.get(id) ?? 0) : expertIds.map(() => 1)
  const total = raw.reduce((s, w) => s + w, 0)
  return total > 0 ? raw.map((w) => w / total) : null
}

/**
 * The weights of the experts who answered a link (Priorsmith's convention): each quantity's reconciliation weights,
 * renormalised over the link's experts (an expert left out of, or absent from, that reconciliation gets 0; a quantity not
 * reconciled yet gives equal weights), then the average of the two sides. A side where none of the link's experts carries
 * weight drops out; when both drop out every weight is 0.
 */
export function linkPoolWeights(expertIds: number[], first: ReconciliationWeights | null, second: ReconciliationWeights | null): LinkPoolWeights {
  if (expertIds.length === 0) return { weights: [], rule: 'Nobody has answered yet' }
  const both = [sideWeights(expertIds, first), sideWeights(expertIds, second)]
  const sides = both.filter((s): s is number[] => s !== null)
  const reconciled = [first, second].filter((s) => s !== null).length
  const rule =
    sides.length === 0 ? 'None of these experts carries weight in either quantity’s reconciliation'
      : reconciled === 0 ? 'Equal weights: neither quantity is reconciled yet'
        : sides.length === 1 ? `Only ${both[0] ? 'the first' : 'the second'} quantity’s ${(both[0] ? first : second) ? 'reconciliation weights' : 'equal weights (it is not reconciled yet)'}: these experts carry no weight in the other’s reconciliation`
          : reconciled === 2 ? 'The average of the experts’ weights in the two quantities’ reconciliations'
            : 'The average of the experts’ weights in the reconciled quantity and equal weights for the one not reconciled yet'
  if (sides.length === 0) return { weights: expertIds.map(() => 0), rule }
  return { weights: expertIds.map((_, i) => sides.reduce((s, side) => s + side[i], 0) / sides.length), rule }
}

/** The connected sets of quantities that links join (directly or through each other), each in the order of `quantityIds`; unlinked quantities are left out. */
export function linkedComponents(quantityIds: number[], pairs: [number, number][]): number[][] {
  const parent = new Map(quantityIds.map((id) => [id, id]))
  const root = (id: number): number => {
    let r = id
    while (parent.get(r) !== r) r = parent.get(r)!
    parent.set(id, r)
    return r
  }
  const linked = new Set<number>()
  for (const [a, b] of pairs) {
    if (!parent.has(a) || !parent.has(b)) throw new Error(`link between unknown quantities ${a} and ${b}`)
    parent.set(root(a), root(b))
    linked.add(a).add(b)
  }
  const sets = new Map<number, number[]>()
  for (const id of quantityIds) {
    if (!linked.has(id)) continue
    const r = root(id)
    sets.set(r, [...(sets.get(r) ?? []), id])
  }
  return [...sets.values()]
}

/** A link's entry in a set's matrix: the two quantities and the correlation used. */
export interface SetLink {
  first: number
  second: number
  correlation: number
}

/** The correlation matrix of a linked set in the order of `quantityIds`: 1 on the diagonal, each link's correlation, 0 (and listed) for pairs no link joins. */
export function linkedSetMatrix(quantityIds: number[], links: SetLink[]): { matrix: number[][]; unlinked: [number, number][] } {
  const index = new Map(quantityIds.map((id, i) => [id, i]))
  const matrix: number[][] = quantityIds.map((_, i) => quantityIds.map((__, j) => (i === j ? 1 : 0)))
  const joined = quantityIds.map(() => quantityIds.map(() => false))
  for (const l of links) {
    const i = index.get(l.first)
    const j = index.get(l.second)
    if (i === undefined || j === undefined) throw new Error(`link between ${l.first} and ${l.second} is not in the set`)
    matrix[i][j] = matrix[j][i] = l.correlation
    joined[i][j] = joined[j][i] = true
  }
  const unlinked: [number, number][] = []
  for (let i = 0; i < quantityIds.length; i++) for (let j = i + 1; j < quantityIds.length; j++) if (!joined[i][j]) unlinked.push([quantityIds[i], quantityIds[j]])
  return { matrix, unlinked }
}

/** Smallest eigenvalue a repaired matrix keeps, so that a multivariate normal accepts it (Priorsmith's convention). */
export const REPAIR_EIGENVALUE_FLOOR = 1e-6

/**
 * Whether a set's correlations hold together and, when not, the repair: the nearest correlation matrix (Higham 2002,
 * through nearestCorrelation) with its eigenvalues raised to REPAIR_EIGENVALUE_FLOOR (correlationWithEigenvalueFloor),
 * with each entry's change from the asked matrix.
 */
export function correlationRepair(matrix: number[][]) {
  const nearest = nearestCorrelation(matrix)
  // nearestCorrelation hands a valid correlation matrix back at once (no iterations).
  if (nearest.iterations === 0) return { positiveSemiDefinite: true, minEigenvalue: nearest.minEigenvalue, repair: null, jointMatrix: nearest.matrix }
  const repaired = correlationWithEigenvalueFloor(nearest.matrix, REPAIR_EIGENVALUE_FLOOR)
  const changes = repaired.map((row, i) => row.map((x, j) => x - matrix[i][j]))
  return {
    positiveSemiDefinite: false,
    minEigenvalue: nearest.minEigenvalue,
    repair: { matrix: repaired, changes, maxChange: Math.max(...changes.flat().map(Math.abs)), iterations: nearest.iterations },
    jointMatrix: repaired,
  }
}

export type LinkedSetCodeLine = ReturnType<typeof linkedSetCodeWithCheck>[number]

/** The name of a linked set's vector in model code: "joint_" and the quantities' symbols. */
export const linkedSetName = (symbols: string[]) => `joint_${symbols.map(safeName).join('_')}`

/** Model code of a linked set's joint prior (multivariate normal or Gaussian copula) with its read-back check. */
export function linkedSetCode(quantities: LinkedQuantity[], R: number[][]): LinkedSetCodeLine[] {
  return linkedSetCodeWithCheck(quantities, R, linkedSetName(quantities.map((q) => q.symbol)), (d: Distribution, p: number) => quantile(d, p))
}
