/**
 * One anonymous label per expert of a study, used on every screen and in every export: "Expert 1", "Expert 2", … in
 * the order the experts first joined one of the study's panels. Joining a later round never changes an earlier
 * expert's label, and a label never says where an expert sits in a particular table.
 */

/** "Expert 1" for the first expert to join (index 0). */
export function expertLabel(index: number): string {
  if (!Number.isSafeInteger(index) || index < 0) throw new RangeError(`expertLabel: not a non-negative whole number: ${index}`)
  return `Expert ${index + 1}`
}

/** What every expert label looks like: "Expert " and a whole number from 1. */
export const EXPERT_LABEL_PATTERN = /^Expert [1-9]\d*$/

/** Labels for experts given in the order they first joined the study's panels; a key seen again keeps its label. */
export function labelExperts<K>(keysInJoinOrder: readonly K[]): Map<K, string> {
  const labels = new Map<K, string>()
  for (const key of keysInJoinOrder) if (!labels.has(key)) labels.set(key, expertLabel(labels.size))
  return labels
}

/** An expert as the record names them: "Expert 2 (Helen Okafor)" when names are shown, else "Expert 2". */
export function labelWithName(e: { code: string; name?: string | null }): string {
  return e.name ? `${e.code} (${e.name})` : e.code
}
