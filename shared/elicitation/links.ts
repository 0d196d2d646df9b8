import { copulaCorrelationFromConditional } from '../stats/copula'

/** A quantity's name as it reads inside a sentence: the first letter lower-cased unless the word is an abbreviation ("KV-07 flow"). */
function inSentence(name: string): string {
  const text = name.trim()
  const firstWord = text.split(/\s+/)[0] ?? ''
  if (firstWord.length > 1 && /[A-Z]/.test(firstWord.slice(1))) return text
  return text.charAt(0).toLowerCase() + text.slice(1)
}

/** The conditional question asked when the analyst leaves a link's wording empty, in the expert's own terms. */
export function defaultLinkWording(firstName: string, secondName: string): string {
  return `Suppose ${inSentence(firstName)} turned out above your middle value. How likely is it that ${inSentence(secondName)} is also above yours?`
}

export type LinkDirection = 'unrelated' | 'together' | 'opposite'
export type LinkStrength = 'none' | 'weak' | 'moderate' | 'strong' | 'very strong'

export interface LinkMeaning {
  direction: LinkDirection
  strength: LinkStrength
  /** One or two sentences in plain words for the expert. */
  text: string
  /** The Gaussian-copula correlation the answer implies (shown only as a secondary figure). */
  correlation: number
}

/**
 * The bands of |p − 1/2| that the words use, in percentage points: within 2 points reads as unrelated, then weak up to
 * 10, moderate up to 25, strong up to 40, very strong beyond. These are Priorsmith's own convention for the wording,
 * not a published scale; the figure shown beside them is exact.
 */
export const LINK_STRENGTH_BANDS: readonly { below: number; strength: LinkStrength }[] = [
  { below: 0.02, strength: 'none' },
  { below: 0.1, strength: 'weak' },
  { below: 0.25, strength: 'moderate' },
  { below: 0.4, strength: 'strong' },
  { below: Infinity, strength: 'very strong' },
]

const STRENGTH_WORD: Record<Exclude<LinkStrength, 'none'>, string> = { weak: 'slightly', moderate: 'clearly', strong: 'strongly', 'very strong': 'very strongly' }

/** What an answer p to a link's question says about the two quantities, in plain words (the copula's correlation from Sheppard's relation). */
export function linkMeaning(p: number, firstName: string, secondName: string): LinkMeaning {
  const correlation = copulaCorrelationFromConditional(p)
  const strength = LINK_STRENGTH_BANDS.find((b) => Math.abs(p - 0.5) < b.below)!.strength
  const first = inSentence(firstName)
  const second = inSentence(secondName)
  if (strength === 'none') {
    const exactly = p === 0.5 ? '' : 'almost '
    return { direction: 'unrelated', strength, correlation, text: `The two are ${exactly}unrelated in your view: learning that ${first} is high tells you ${p === 0.5 ? 'nothing' : 'next to nothing'} about ${second}.` }
  }
  const how = STRENGTH_WORD[strength]
  if (p > 0.5) {
    return { direction: 'together', strength, correlation, text: `In your view they tend to move together (${how}): when ${first} is high, ${second} is more likely to be high too.` }
  }
  return { direction: 'opposite', strength, correlation, text: `In your view when one is high the other tends to be low (${how}): when ${first} is high, ${second} is more likely to be low.` }
}
