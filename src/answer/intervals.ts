/** Percentage left to give: 100 minus what the typed probabilities add up to (rounded against float noise). */
export function remainingPercent(probs: readonly (number | null)[]): number {
  const total = probs.reduce<number>((s, p) => s + (typeof p === 'number' ? p : 0), 0)
  return Number((100 - total * 100).toFixed(6))
}
