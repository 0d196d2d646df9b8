/**
 * The calibration cutoff on a log scale: where a cutoff sits on the plot, which cutoff a height stands for, and the
 * steps of the keyboard. Heights run from 0 (the bottom decade, where "no cutoff" sits) to 1 (a score of 1).
 */

/** The highest cutoff the analyst may choose (below 1, as the schema requires). */
export const CUTOFF_MAX = 0.99

/**
 * The lowest power of ten the plot shows: one decade below the lowest score, at least 10^-2, at most 10^-16. It rests
 * on the scores alone, so the scale stays put while the cutoff is dragged; a cutoff lower still sits at the bottom.
 */
export function lowestDecade(scores: number[]): number {
  const positive = scores.filter((v) => v > 0 && Number.isFinite(v))
  const lowest = positive.length ? Math.min(...positive) : 1
  return Math.max(-16, Math.min(-2, Math.floor(Math.log10(lowest)) - 1))
}

/** Height of a calibration score (or cutoff) on the plot; 0 and anything under the bottom decade sit at the bottom. */
export function heightOfCutoff(value: number, bottom: number): number {
  if (!(value > 0)) return 0
  return Math.min(1, Math.max(0, 1 - Math.log10(value) / bottom))
}

/** The cutoff a height stands for, to two significant digits; the lowest 3 % is "no cutoff" (0). */
export function cutoffFromHeight(height: number, bottom: number): number {
  if (!(height > 0.03)) return 0
  const value = 10 ** (bottom * (1 - Math.min(1, height)))
  return Math.min(CUTOFF_MAX, Number(value.toPrecision(2)))
}

/** The cutoff after a key press on the line (a quarter decade per arrow, a decade per page key), or null for other keys. */
export function cutoffStep(cutoff: number, key: string, bottom: number): number | null {
  const floor = Number((10 ** bottom).toPrecision(2))
  const times = (factor: number) => {
    if (!(cutoff > 0)) return factor > 1 ? floor : 0
    const next = cutoff * factor
    if (next < floor) return 0
    return Math.min(CUTOFF_MAX, Number(next.toPrecision(2)))
  }
  switch (key) {
    case 'ArrowUp':
    case 'ArrowRight':
      return times(10 ** 0.25)
    case 'ArrowDown':
    case 'ArrowLeft':
      return times(10 ** -0.25)
    case 'PageUp':
      return times(10)
    case 'PageDown':
      return times(0.1)
    case 'Home':
      return 0
    case 'End':
      return CUTOFF_MAX
    default:
      return null
  }
}
