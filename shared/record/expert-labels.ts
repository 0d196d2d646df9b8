/**
 * One anonymous label per expert of a study, used on every screen and in every export: "Expert A", "Expert B", …,
 * "Expert Z", "Expert AA", … in the order the experts first joined one of the study's panels. Joining a later round
 * never changes an earlier expert's label.
 */

/** The letters of a 0-based index in spreadsheet-column order: 0 → A, 25 → Z, 26 → AA (common practice). */
export function labelLetters(index: number): string {
  if (!Number.isSafeInteger(index) || index < 0) throw new RangeError(`labelLetters: not a non-negative whole number: ${index}`)
  let n = index
  let out = ''
  do {
    out = String.fromCharCode(65 + (n % 26)) + out
    n = Math.floor(n / 26) - 1
  } while (n >= 0)
  return out
}

/** "Expert A" for the first expert to join (index 0). */
export const expertLabel = (index: number): string => `Expert ${labelLetters(index)}`

/** Labels for experts given in the order they first joined the study's panels; a key seen again keeps its label. */
export function labelExperts<K>(keysInJoinOrder: readonly K[]): Map<K, string> {
  const labels = new Map<K, string>()
  for (const key of keysInJoinOrder) if (!labels.has(key)) labels.set(key, expertLabel(labels.size))
  return labels
}

/** An expert as the record names them: "Expert B (Helen Okafor)" when names are shown, else "Expert B". */
export function labelWithName(e: { code: string; name?: string | null }): string {
  return e.name ? `${e.code} (${e.name})` : e.code
}
