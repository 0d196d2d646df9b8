/**
 * Numbers as every screen, e-mail and the .docx write them. One behaviour for the cases the earlier copies disagreed
 * on, and why:
 * - no value (null, undefined) and NaN read "—": NaN means nothing to a reader, and an empty cell must not look like 0;
 * - infinities read "∞" and "-∞" (a support's open end), never "Infinity";
 * - negative zero reads "0": a sign on nothing only raises a question;
 * - negatives carry the ASCII minus "-": values are copied into code and spreadsheets, which read no other;
 * - tables and the record group no thousands ("12346", not "12,346"), because their values stand in lists and
 *   brackets where a comma separates values ("Beta(1234, 5)"); only prose for experts groups ("1,840 km");
 * - a whole-number part is never rounded away: 12345.6 at 4 significant digits reads "12346", not "12350";
 * - the exponent form is kept for magnitudes of a million and more or below 0.0001, with the same significant digits.
 */

const EXPONENT_FROM = 1e6
const EXPONENT_BELOW = 1e-4

/** What a value that is not a finite number reads as, or null when it is one. */
function notFinite(x: number | null | undefined): string | null {
  if (x === null || x === undefined || Number.isNaN(x)) return '—'
  if (x === Infinity) return '∞'
  if (x === -Infinity) return '-∞'
  return null
}

/** `digits` significant digits, but every digit of the whole-number part; trailing zeros dropped. */
function significant(x: number, digits: number, grouping: boolean): string {
  if (x === 0) return '0'
  const wholeDigits = Math.floor(Math.log10(Math.abs(x))) + 1
  const text = numberFormat(wholeDigits >= digits ? 0 : digits, grouping).format(x)
  return text === '-0' ? '0' : text
}

// Building an Intl.NumberFormat costs far more than formatting with one, and fits format their warnings many times a second.
const numberFormats = new Map<string, Intl.NumberFormat>()

/** The formatter for `digits` significant digits (0: whole numbers only), kept for reuse. */
function numberFormat(digits: number, grouping: boolean): Intl.NumberFormat {
  const key = `${digits}:${grouping}`
  let format = numberFormats.get(key)
  if (!format) {
    format = new Intl.NumberFormat('en-GB', digits === 0 ? { maximumFractionDigits: 0, useGrouping: grouping } : { maximumSignificantDigits: digits, useGrouping: grouping })
    numberFormats.set(key, format)
  }
  return format
}

/** "1.234e+7", "5e-5": `digits` significant digits in exponent form, trailing zeros of the mantissa dropped. */
function exponent(x: number, digits: number): string {
  return x.toExponential(Math.max(0, digits - 1)).replace(/\.?0+e/, 'e')
}

/** A number in a table, a parameter or the record: `digits` significant digits (common practice), see above. */
export function formatNumber(x: number | null | undefined, digits = 4): string {
  const special = notFinite(x)
  if (special !== null) return special
  const abs = Math.abs(x!)
  if (abs !== 0 && (abs >= EXPONENT_FROM || abs < EXPONENT_BELOW)) return exponent(x!, digits)
  return significant(x!, digits, false)
}

/** A value in prose for experts: 3 significant digits, whole numbers grouped ("1,840 km"), never an exponent. */
export function formatValue(x: number | null | undefined): string {
  return notFinite(x) ?? significant(x!, 3, true)
}

/**
 * A probability, weight or p-value as a decimal, never a percentage: 3 significant digits ("0.25", "0.0042"),
 * exponent form below 0.001 ("4.2e-4"), and never rounded onto 1 when it is not 1 ("> 0.999").
 */
export function formatProbability(p: number | null | undefined): string {
  const special = notFinite(p)
  if (special !== null) return special
  if (p === 0 || p === 1) return String(p)
  if (Math.abs(p!) < 1e-3) return exponent(p!, 2)
  const text = significant(p!, 3, false)
  return text === '1' && p! < 1 ? '> 0.999' : text
}

/** A probability known by its natural logarithm: as formatProbability, or "≈ 10^-1664" once it underflows a double. */
export function formatProbabilityFromLog(p: number, logP: number): string {
  if (Number.isFinite(logP) && logP / Math.LN10 < -300) return `≈ 10^${Math.round(logP / Math.LN10)}`
  return formatProbability(p)
}

/** The size of a small difference, one significant digit in exponent form: "3e-15". */
export function formatTiny(x: number): string {
  if (x === 0) return '0'
  return notFinite(x) ?? x.toExponential(0).replace('e+', 'e')
}

/** A number exactly as stored, for an edge or a limit the analyst typed and reads back: "0.1", "2", "∞", "-∞". */
export function formatExact(x: number): string {
  return notFinite(x) ?? String(x === 0 ? 0 : x)
}

/** Percentage points as typed by an expert: "20 %", "12.5 %", "0.25 %", "-10 %" (two decimals below 1 point, else one). */
export function formatPercentPoints(points: number): string {
  const special = notFinite(points)
  if (special !== null) return special
  const rounded = Number(points.toFixed(Math.abs(points) < 1 && points !== 0 ? 2 : 1))
  return `${rounded === 0 ? 0 : rounded} %`
}

/** A signed change with two decimals: "+0.12", "-0.09", "0.00" (within rounding of zero, no sign). */
export function formatSigned(x: number): string {
  const special = notFinite(x)
  if (special !== null) return x === Infinity ? '+∞' : special
  const s = Math.abs(x).toFixed(2)
  return s === '0.00' ? s : `${x > 0 ? '+' : '-'}${s}`
}

/**
 * A probability as a percentage for prose: whole per cent from 1 % to 99 % ("31 %"), one decimal nearer 0 or 100
 * ("0.4 %", "99.6 %"), and "< 0.1 %" or "> 99.9 %" rather than a rounded 0 or 100 that the value is not.
 */
export function formatPercent(p: number): string {
  const special = notFinite(p)
  if (special !== null) return special
  const percent = p * 100
  if (percent === 0 || percent === 100) return `${percent} %`
  if (percent < 0.05) return '< 0.1 %'
  if (percent > 99.95) return '> 99.9 %'
  return percent >= 1 && percent <= 99 ? `${Math.round(percent)} %` : `${percent.toFixed(1)} %`
}

/** A file size: "812 B", "14.2 kB", "3.1 MB" (1 kB = 1024 B, as file managers count). */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} kB`
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`
}

/** A count of things in prose or a table, thousands grouped: "100,000" (a count is never copied into code). */
export function formatCount(count: number): string {
  return notFinite(count) ?? new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 }).format(count)
}

/** A count with its noun: "1 quantity", "3 quantities", "no quantities", "1,200 rows". */
export function countNoun(count: number, singular: string, plural = `${singular}s`): string {
  if (count === 0) return `no ${plural}`
  return `${formatCount(count)} ${count === 1 ? singular : plural}`
}

/** A written value with its unit: "3.389 L/s"; no unit, or no value ("—"), just the text. */
export function withUnit(text: string, unit: string | null | undefined): string {
  return unit && text !== '—' ? `${text} ${unit}` : text
}

/** The unit in a column header or caption: " (L/s)"; nothing without a unit. */
export function unitSuffix(unit: string | null | undefined): string {
  return unit ? ` (${unit})` : ''
}
