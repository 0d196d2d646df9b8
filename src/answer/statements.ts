import { quantile, type Distribution, type Support } from '@shared/stats'
import { chanceWords, quantityPhrase, rangeText, valueText } from './format'
import type { QuantileField, QuantileValues } from './quantile'

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

/**
 * The expert's own quantile values read back as plain sentences, one per judgement, as they place them (before any
 * curve is fitted): "You would be very surprised if it were below 4 or above 25", "You think it is as likely to be below
 * 10 as above", "1 chance in 4 it is below 8". Values with a problem are left out (their sentence would not hold).
 */
export function answerStatements(values: QuantileValues, q: { unit: string; support: Support }, problems: Partial<Record<string, string>> = {}): { key: string; text: string }[] {
  const ok = (f: QuantileField): number | undefined => (problems[f] ? undefined : values[f])
  const v = (x: number) => valueText(x, q.unit, q.support)
  const out: { key: string; text: string }[] = []
  const [lower, upper, median, q1, q3, p05, p95] = (['lower', 'upper', 'median', 'q1', 'q3', 'p05', 'p95'] as const).map(ok)
  if (lower !== undefined && upper !== undefined) out.push({ key: 'range', text: `You would be very surprised if it were below ${v(lower)} or above ${v(upper)}.` })
  else if (lower !== undefined) out.push({ key: 'range', text: `You would be very surprised if it were below ${v(lower)}.` })
  else if (upper !== undefined) out.push({ key: 'range', text: `You would be very surprised if it were above ${v(upper)}.` })
  if (median !== undefined) out.push({ key: 'median', text: `You think it is as likely to be below ${v(median)} as above.` })
  if (q1 !== undefined) out.push({ key: 'q1', text: `1 chance in 4 it is below ${v(q1)}.` })
  if (q3 !== undefined) out.push({ key: 'q3', text: `1 chance in 4 it is above ${v(q3)}.` })
  if (q1 !== undefined && q3 !== undefined) out.push({ key: 'middle-half', text: `As likely to be between ${rangeText(q1, q3, q.unit, q.support)} as outside.` })
  if (p05 !== undefined) out.push({ key: 'p05', text: `1 chance in 20 it is below ${v(p05)}.` })
  if (p95 !== undefined) out.push({ key: 'p95', text: `1 chance in 20 it is above ${v(p95)}.` })
  return out
}
