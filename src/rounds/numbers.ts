import { formatValue } from '@shared/elicitation/numbers'

export { formatValue }

/** 0.254 → "25 %"; small and large shares keep one decimal ("0.4 %", "99.6 %"). */
export function formatPercent(prob: number): string {
  const pct = prob * 100
  const digits = pct < 1 || pct > 99 ? 1 : 0
  return `${pct.toFixed(digits)} %`
}

/** "a value with its unit": "1,840 km", or the bare value. */
export function withUnit(value: number, unit: string | undefined): string {
  return unit ? `${formatValue(value)} ${unit}` : formatValue(value)
}
