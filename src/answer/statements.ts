import { quantile, type Distribution, type Support } from '@shared/stats'
import { chanceWords, quantityPhrase, rangeText, valueText } from './format'

export interface QuantityWords {
  name: string
  unit: string
  support: Support
}

export interface ImpliedQuantiles {
  q05: number
  q50: number
  q95: number
}

/** The 5 %, 50 % and 95 % values of a fitted distribution. */
export function impliedQuantiles(d: Distribution): ImpliedQuantiles {
  return { q05: quantile(d, 0.05), q50: quantile(d, 0.5), q95: quantile(d, 0.95) }
}

/**
 * Plain sentences read off the chosen distribution, each standing on its own:
 * a 1 in 4 chance below its lower quartile, a 1 in 2 chance between its quartiles, a 1 in 10 chance above its 90 % value.
 */
export function feedbackStatements(d: Distribution, q: QuantityWords): string[] {
  const subject = quantityPhrase(q.name)
  const v = (x: number) => valueText(x, q.unit, q.support)
  const q25 = quantile(d, 0.25)
  const q75 = quantile(d, 0.75)
  const q90 = quantile(d, 0.9)
  const out: string[] = []
  if (Number.isFinite(q25)) out.push(`You are saying there is a ${chanceWords(0.25)} chance that ${subject} is below ${v(q25)}.`)
  if (Number.isFinite(q25) && Number.isFinite(q75)) {
    out.push(`You are saying there is a ${chanceWords(0.5)} chance that it lies between ${rangeText(q25, q75, q.unit, q.support)}.`)
  }
  if (Number.isFinite(q90)) out.push(`You are saying there is a ${chanceWords(0.1)} chance that it is above ${v(q90)}.`)
  return out
}

/** Id of the list of plain statements on an answer screen: the charts of that answer name it as their description. */
export const FEEDBACK_STATEMENTS_ID = 'feedback-statements'
