import { COMPOSITION_CONVENTION } from '../stats/dirichlet'
import { formatPercentPoints } from '../format/numbers'

/** One share as the expert has answered it so far: the mean of the shape fitted to their answer, or null before it has one. */
export interface ShareMean {
  name: string
  mean: number | null
}

/** What the shares must add up to: the whole (every share is asked), or less, leaving the rest to `restLabel`. */
export interface WholeShape {
  /** Names what takes the rest ("Other", or the shares asked elsewhere); null when the listed shares are the whole. */
  restLabel: string | null
}

export interface CompositionSumReading {
  /** Sum of the means given so far (0 to 1 scale); null before any share has a fitted shape. */
  sum: number | null
  /** Shares with no fitted shape yet. */
  missing: string[]
  tone: 'waiting' | 'fits' | 'check'
  /** One sentence in plain words, starting with the sum: "Your shares add up to about 104 %: …". */
  message: string
}

/** A total or a remainder of shares in whole per cent ("104 %"): a sum, not a probability, so it may pass 100 %. */
const percent = (x: number) => formatPercentPoints(Math.round(x * 100))
const list = (names: string[]) => (names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`)

/**
 * Whether an expert's shares of a whole hang together: the means of their fitted shapes (not the middle values, which
 * need not add up) should add up to the whole, within Priorsmith's tolerance (COMPOSITION_CONVENTION.meanSumTolerance),
 * or stay below it when an "other" share or shares asked elsewhere take the rest. Said in plain words.
 */
export function compositionSumReading(shares: ShareMean[], whole: WholeShape): CompositionSumReading {
  const given = shares.filter((s): s is { name: string; mean: number } => s.mean !== null && Number.isFinite(s.mean))
  const missing = shares.filter((s) => s.mean === null || !Number.isFinite(s.mean)).map((s) => s.name)
  if (given.length === 0) {
    return { sum: null, missing, tone: 'waiting', message: 'Once you have answered these shares, their total shows here.' }
  }
  const sum = given.reduce((s, x) => s + x.mean, 0)
  const tolerance = COMPOSITION_CONVENTION.meanSumTolerance
  if (missing.length) {
    const over = sum > 1 + tolerance
    return {
      sum, missing, tone: over ? 'check' : 'waiting',
      message: over
        ? `Your shares so far add up to about ${percent(sum)}: already more than the whole, before ${list(missing)}. Lower one or more of them.`
        : `Your shares so far add up to about ${percent(sum)}, which leaves about ${percent(Math.max(0, 1 - sum))} for ${list(missing)}${whole.restLabel ? ` and ${whole.restLabel}` : ''}.`,
    }
  }
  if (whole.restLabel) {
    if (sum >= 1)
      return { sum, missing, tone: 'check', message: `Your shares add up to about ${percent(sum)}: that leaves nothing for ${whole.restLabel}. Lower one or more shares so that something is left.` }
    return { sum, missing, tone: 'fits', message: `Your shares add up to about ${percent(sum)}, which leaves about ${percent(1 - sum)} for ${whole.restLabel}.` }
  }
  if (sum > 1 + tolerance)
    return {
      sum, missing, tone: 'check',
      message: `Your shares add up to about ${percent(sum)}: together they claim about ${percent(sum - 1)} more than the whole. Lowering one or more shares makes them fit; otherwise the joint prior shrinks them all in proportion.`,
    }
  if (sum < 1 - tolerance)
    return {
      sum, missing, tone: 'check',
      message: `Your shares add up to about ${percent(sum)}: together they leave about ${percent(1 - sum)} of the whole to nobody. Raising one or more shares makes them fit; otherwise the joint prior enlarges them all in proportion.`,
    }
  if (percent(sum) === '100 %') return { sum, missing, tone: 'fits', message: 'Your shares add up to about 100 %: together they make up the whole, as they should.' }
  return {
    sum, missing, tone: 'fits',
    message: `Your shares add up to about ${percent(sum)}: close enough to the whole. The joint prior ${sum > 1 ? 'shrinks' : 'enlarges'} them a little, in proportion, so that they add up to exactly 100 %.`,
  }
}
