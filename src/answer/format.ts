import { quantile, type Distribution, type Support } from '@shared/stats'
import type { ElicitationMethod } from '@shared/schemas/rounds'
import { formatValue } from '@shared/format'

/**
 * The shape of a fitted curve in plain words, for experts (who never see family names): "symmetric", "stretched
 * towards high values", "strongly stretched towards low values", "flat between two limits", with ", with room for
 * far-off values" when its outer tails are wider than a normal curve's. Read from the curve's own quantiles: the
 * distance from the median to the 95 % value against that to the 5 % value (within 15 %: symmetric; over twice:
 * strongly stretched), and the 1 %–99 % range against the quartile range (a normal curve's ratio is 3.45; above 4.5
 * counts as far-off values). The thresholds are the tool's own convention.
 */
export function shapeWords(d: Distribution): string {
  if (d.family === 'uniform') return 'flat between two limits'
  const q = (p: number) => quantile(d, p)
  const [q01, q05, q25, q50, q75, q95, q99] = [0.01, 0.05, 0.25, 0.5, 0.75, 0.95, 0.99].map(q)
  const ratio = (q95 - q50) / (q50 - q05)
  let words: string
  if (!Number.isFinite(ratio) || Math.abs(Math.log(ratio)) < Math.log(1.15)) words = 'symmetric'
  else {
    const side = ratio > 1 ? 'high' : 'low'
    words = `${Math.abs(Math.log(ratio)) > Math.log(2) ? 'strongly ' : ''}stretched towards ${side} values`
  }
  const tails = (q99 - q01) / (q75 - q25)
  return Number.isFinite(tails) && tails > 4.5 ? `${words}, with room for far-off values` : words
}

/** Below this sum of squared CDF errors the fit is called close (the tool's convention). */
export const CLOSE_FIT_SSE = 0.001

/** "close fit" or "rough fit", from the sum of squared errors between the elicited and fitted CDF. */
export function fitQuality(sse: number): 'close fit' | 'rough fit' {
  return sse < CLOSE_FIT_SSE ? 'close fit' : 'rough fit'
}

/** How the expert answers with each method, for their screens (the method's name is for the analyst). */
export const HOW_YOU_ANSWER: Record<ElicitationMethod, string> = {
  quantile: 'a range, then a middle value, then the middle of each half',
  'fixed-interval': 'a percentage for each range of values',
  'chip-grid': 'placing chips on the ranges you find more likely',
}

/** A share written in per cent, as the percentages beside it are: 0.138 → "13.8 %". */
export function shareText(value: number): string {
  return `${formatValue(Number((value * 100).toPrecision(12)))} %`
}

/**
 * A value with the quantity's unit for prose: "8.03 bursts per 100 km per year". A share (proportion support) is
 * written in per cent with its unit in brackets, since "0.3 share of households" does not read: "30 % (share of
 * households)".
 */
export function valueText(value: number, unit: string | undefined, support?: Support): string {
  if (support?.kind === 'proportion') return unit ? `${shareText(value)} (${unit})` : shareText(value)
  const v = formatValue(value)
  return unit ? `${v} ${unit}` : v
}

/** A range with the unit once: "7.9 and 13 bursts per 100 km per year", "20 % and 35 % (share of households)". */
export function rangeText(a: number, b: number, unit: string | undefined, support?: Support): string {
  if (support?.kind === 'proportion') return `${shareText(a)} and ${shareText(b)}${unit ? ` (${unit})` : ''}`
  const pair = `${formatValue(a)} and ${formatValue(b)}`
  return unit ? `${pair} ${unit}` : pair
}

/**
 * The quantity as the subject of a sentence: "Burst rate of old cast-iron mains" → "the burst rate of old
 * cast-iron mains". An initial capital stays when the first word has other capitals or digits ("HbA1c", "PM2.5").
 */
export function quantityPhrase(name: string): string {
  const trimmed = name.trim()
  if (!trimmed) return 'the value'
  const firstWord = /^\S+/.exec(trimmed)![0]
  const lowered = /^[A-Z][a-z'’-]*$/.test(firstWord) ? trimmed[0].toLowerCase() + trimmed.slice(1) : trimmed
  return /^(the|a|an)\s/i.test(lowered) ? lowered : `the ${lowered}`
}

/** "1 in 4" for 0.25, "1 in 10" for 0.1, "1 in 2" for 0.5; other probabilities as a percentage. */
export function chanceWords(prob: number): string {
  const inverse = 1 / prob
  if (prob > 0 && prob <= 0.5 && Math.abs(inverse - Math.round(inverse)) < 1e-9) return `1 in ${Math.round(inverse)}`
  return `${Math.round(prob * 100)} %`
}
