import type { Family, Support } from '@shared/stats'
import { formatValue } from '@/rounds/numbers'

/** Names of the fitted families as the expert reads them. */
export const FAMILY_LABELS: Record<Family, string> = {
  normal: 'Normal',
  'student-t': 'Student-t',
  lognormal: 'Lognormal',
  gamma: 'Gamma',
  beta: 'Beta',
  'scaled-beta': 'Scaled beta',
  uniform: 'Uniform',
}

/** Below this sum of squared CDF errors the fit is called close (DESIGN: "close fit" when SSE < 0.001). */
export const CLOSE_FIT_SSE = 0.001

/** "close fit" or "rough fit", from the sum of squared errors between the elicited and fitted CDF. */
export function fitQuality(sse: number): 'close fit' | 'rough fit' {
  return sse < CLOSE_FIT_SSE ? 'close fit' : 'rough fit'
}

/** The SSE as a short number: "0.0042", "3.1e-6", "0". */
export function formatSse(sse: number): string {
  if (!Number.isFinite(sse)) return String(sse)
  if (sse === 0) return '0'
  if (Math.abs(sse) < 1e-4) return sse.toExponential(1)
  return sse.toFixed(4)
}

/**
 * A value with the quantity's unit for prose: "8.03 bursts per 100 km per year". A share (proportion support)
 * keeps its unit in brackets, since "0.3 share of households" does not read: "0.3 (share of households)".
 */
export function valueText(value: number, unit: string | undefined, support?: Support): string {
  const v = formatValue(value)
  if (!unit) return v
  if (support?.kind === 'proportion') return `${v} (${unit})`
  return `${v} ${unit}`
}

/** A range with the unit once: "7.9 and 13 bursts per 100 km per year", "0.2 and 0.35 (share of households)". */
export function rangeText(a: number, b: number, unit: string | undefined, support?: Support): string {
  const pair = `${formatValue(a)} and ${formatValue(b)}`
  if (!unit) return pair
  return support?.kind === 'proportion' ? `${pair} (${unit})` : `${pair} ${unit}`
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

/** "Saved 14:05" time of day. */
export function clockTime(date: Date): string {
  return new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit' }).format(date)
}
