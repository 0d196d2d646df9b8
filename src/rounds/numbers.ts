const grouped = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 })
const significant = new Intl.NumberFormat('en-GB', { maximumSignificantDigits: 3 })

/** A value for prose and tables: whole numbers from 1,000 up, else 3 significant digits. */
export function formatValue(value: number): string {
  if (!Number.isFinite(value)) return String(value)
  return Math.abs(value) >= 1000 ? grouped.format(value) : significant.format(value)
}

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
