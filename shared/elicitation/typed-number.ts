/**
 * Reading a number the way people type it: the decimal separator of their own locale ("0,5" where a comma is the
 * decimal mark), spaces between groups of three digits ("1 250"), a trailing "%" on percentage inputs. Input that
 * could be read two ways ("1,250" where a point is the decimal mark: 1250 or 1.25?) is refused with a message
 * rather than guessed. The tool's own convention; one function for every typed number on the experts' screens.
 */

export type DecimalMark = '.' | ','

/**
 * What a trailing "%" means in this field: 'points' for a field asked in percent ("25 %" and "25" both read 25),
 * 'share' for a field holding a share between 0 and 1 ("25 %" reads 0.25), 'none' where a percentage makes no sense.
 */
export type PercentMode = 'points' | 'share' | 'none'

export interface TypedNumberOptions {
  decimal: DecimalMark
  percent?: PercentMode
}

export type TypedNumber = { ok: true; value: number } | { ok: false; empty: boolean; message: string }

/** The decimal mark of a locale ("en-GB" → ".", "de-DE" → ","); "." when the locale is unknown. */
export function decimalMarkOf(locale?: string): DecimalMark {
  try {
    const part = new Intl.NumberFormat(locale).formatToParts(1.5).find((p) => p.type === 'decimal')
    return part?.value === ',' ? ',' : '.'
  } catch {
    return '.'
  }
}

const SPACES = /[ \u00a0\u2009\u202f]/
const MINUS = /^[-\u2212]/

/** Removes spaces that separate groups of three digits; null when a space sits anywhere else. */
function withoutGroupSpaces(s: string): string | null {
  if (!SPACES.test(s)) return s
  const [whole, ...rest] = s.split(/(?=[.,eE])/)
  if (!/^\d{1,3}([ \u00a0\u2009\u202f]\d{3})+$/.test(whole) || rest.some((r) => SPACES.test(r))) return null
  return whole.replace(new RegExp(SPACES.source, 'g'), '') + rest.join('')
}

/** Whether `digits` split by `mark` forms thousands groups: 1–3 digits (not starting with 0), then groups of 3. */
function isGrouped(text: string, mark: DecimalMark): boolean {
  const groups = text.split(mark)
  return groups.length > 1 && /^[1-9]\d{0,2}$/.test(groups[0]) && groups.slice(1).every((g) => /^\d{3}$/.test(g))
}

const failure = (message: string): TypedNumber => ({ ok: false, empty: false, message })

/** Reads one typed number; see the module comment for what is accepted. */
export function readTypedNumber(input: string | number | null | undefined, options: TypedNumberOptions): TypedNumber {
  if (typeof input === 'number') return Number.isFinite(input) ? { ok: true, value: input } : failure('Enter a finite number')
  const original = (input ?? '').trim()
  if (original === '') return { ok: false, empty: true, message: 'Enter a number' }
  const mode = options.percent ?? 'none'
  let s = original
  let percent = false
  if (/%$/.test(s)) {
    if (mode === 'none') return failure('Enter a plain number here, without %')
    percent = true
    s = s.slice(0, -1).trim()
  }
  let sign = ''
  if (MINUS.test(s)) {
    sign = '-'
    s = s.slice(1).trim()
  } else if (s.startsWith('+')) s = s.slice(1).trim()

  const spaced = withoutGroupSpaces(s)
  if (spaced === null) return failure(`Spaces may only separate groups of three digits, as in 1 250`)
  s = spaced

  let exponent = ''
  const e = /[eE][-+]?\d+$/.exec(s)
  if (e) {
    exponent = e[0]
    s = s.slice(0, e.index)
  }
  if (!/^[\d.,]+$/.test(s) || !/\d/.test(s)) return failure(mode === 'points' ? 'Enter a percentage, such as 20' : 'Enter a number, such as 12 or 0.35')

  const other: DecimalMark = options.decimal === '.' ? ',' : '.'
  const marks = { '.': s.split('.').length - 1, ',': s.split(',').length - 1 }
  let plain: string
  if (marks['.'] && marks[',']) {
    // Both marks: the last one is the decimal mark, the other separates thousands.
    const decimal: DecimalMark = s.lastIndexOf('.') > s.lastIndexOf(',') ? '.' : ','
    const grouping: DecimalMark = decimal === '.' ? ',' : '.'
    const [whole, fraction] = [s.slice(0, s.lastIndexOf(decimal)), s.slice(s.lastIndexOf(decimal) + 1)]
    if (marks[decimal] !== 1 || !isGrouped(whole, grouping) || !/^\d+$/.test(fraction)) return failure(`“${original}” is not a number we can read`)
    plain = `${whole.split(grouping).join('')}.${fraction}`
  } else if (marks['.'] + marks[','] === 0) {
    plain = s
  } else {
    const mark: DecimalMark = marks['.'] ? '.' : ','
    if (marks[mark] > 1) {
      if (!isGrouped(s, mark)) return failure(`“${original}” is not a number we can read`)
      plain = s.split(mark).join('')
    } else {
      const [whole, fraction] = s.split(mark)
      if (fraction === '' || (whole === '' && mark === other)) return failure(`“${original}” is not a number we can read`)
      if (mark === other && isGrouped(s, mark)) {
        // "1,250" where a point is the decimal mark (or "1.250" where a comma is): thousands or a decimal?
        const asDecimal = `${whole}${options.decimal}${fraction}`
        return failure(`“${original}” could mean ${whole}${fraction} or ${asDecimal}: type ${whole}${fraction} or ${asDecimal}`)
      }
      plain = `${whole || '0'}.${fraction}`
    }
  }
  const value = Number(`${sign}${plain}${exponent}`)
  if (!Number.isFinite(value)) return failure('Enter a finite number')
  if (percent && mode === 'share') return { ok: true, value: Number((value / 100).toPrecision(12)) }
  return { ok: true, value }
}

/** The number as read, or null when empty or unreadable (for places that only need the value). */
export function typedNumberValue(input: string | number | null | undefined, options: TypedNumberOptions): number | null {
  const read = readTypedNumber(input, options)
  return read.ok ? read.value : null
}

/**
 * The value understood, written back in the locale's style, when it differs from what was typed ("1 250,5" →
 * "1250.5" shown as "1,250.5"); null when the text already says it plainly or could not be read.
 */
export function understoodText(input: string, options: TypedNumberOptions, locale?: string): string | null {
  const read = readTypedNumber(input, options)
  if (!read.ok) return null
  const shown = new Intl.NumberFormat(locale, { maximumFractionDigits: 10, useGrouping: true }).format(read.value)
  const typed = input.trim().replace(/\s*%$/, '')
  const suffix = options.percent === 'points' ? ' %' : ''
  const plainTyped = typed === String(read.value) || typed === shown
  if (plainTyped && !(options.percent === 'share' && /%\s*$/.test(input))) return null
  return `${shown}${suffix}`
}
