import { decimalMarkOf, readTypedNumber, understoodText, type PercentMode, type TypedNumber } from '@shared/elicitation/typed-number'

/** The browser's locale, which decides the decimal mark experts type. */
export function browserLocale(): string | undefined {
  return typeof navigator === 'undefined' ? undefined : navigator.language || undefined
}

/** Reads what the expert typed in the browser's locale (see shared/elicitation/typed-number). */
export function readNumber(text: string | number | null | undefined, percent: PercentMode = 'none'): TypedNumber {
  return readTypedNumber(text, { decimal: decimalMarkOf(browserLocale()), percent })
}

/** The number typed, or null when the field is empty or unreadable. */
export function numberOrNull(text: string | number | null | undefined, percent: PercentMode = 'none'): number | null {
  const read = readNumber(text, percent)
  return read.ok ? read.value : null
}

/** "Read as 1,250" under a field when the text typed did not say the number plainly; else null. */
export function understoodNote(text: string, percent: PercentMode = 'none'): string | null {
  const locale = browserLocale()
  const shown = understoodText(text, { decimal: decimalMarkOf(locale), percent }, locale)
  return shown === null ? null : `Read as ${shown}`
}

/** A stored number written back into a field with the browser's decimal mark and no grouping, so it reads back the same. */
export function fieldText(value: number | null | undefined): string {
  if (typeof value !== 'number' || !Number.isFinite(value)) return ''
  const text = String(value)
  return decimalMarkOf(browserLocale()) === ',' ? text.replace('.', ',') : text
}
