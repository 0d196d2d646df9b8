const grouped = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 })
const significant = new Intl.NumberFormat('en-GB', { maximumSignificantDigits: 3 })

/** A value for prose and tables: whole numbers from 1,000 up, else 3 significant digits. */
export function formatValue(value: number): string {
  if (!Number.isFinite(value)) return String(value)
  return Math.abs(value) >= 1000 ? grouped.format(value) : significant.format(value)
}
