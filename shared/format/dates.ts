/**
 * Dates and times as every screen, e-mail and the .docx write them, assembled from Intl's parts so an ICU update cannot
 * change the punctuation. Where the earlier copies disagreed:
 * - a moment carries its weekday ("Thu 24 Dec 2026, 17:00"): deadlines and round windows are planned by the day of the
 *   week, and one form everywhere is learnt once;
 * - no moment (null, undefined, "") reads "—", as an empty number does, so a table cell never looks unfilled by mistake;
 *   a text that is not a date is shown as it came, rather than "Invalid Date";
 * - screens write their reader's own clock (no `timeZone`); the .docx and e-mail pass the study's or the round's zone
 *   and name it with its offset from UTC on that date, because their reader may be anywhere (and the .docx is read
 *   years later, when nobody remembers whether that date fell in summer time).
 */

export interface DateStyle {
  /** IANA time zone to write the moment in; omitted, the reader's own (the browser's, or the server's). */
  timeZone?: string
  /** 'short' for screens ("Thu 24 Dec 2026"); 'long' for documents and e-mail ("Thursday 24 December 2026"). */
  words?: 'short' | 'long'
  /** Adds the seconds ("17:00:05"): audit events often share a minute. */
  seconds?: boolean
  /** Names the zone after the time with its offset from UTC that day: "(Europe/Berlin, UTC+1)", "(UTC)". */
  zone?: boolean
}

type Moment = string | Date | null | undefined

/** The moment as a Date, or the text to show instead ("—" for none, the value itself when it is not a date). */
function toDate(value: Moment): Date | string {
  if (value === null || value === undefined || value === '') return '—'
  const date = value instanceof Date ? value : new Date(value)
  return Number.isNaN(date.getTime()) ? String(value) : date
}

function partsOf(date: Date, options: Intl.DateTimeFormatOptions): (type: Intl.DateTimeFormatPartTypes) => string {
  const parts = new Intl.DateTimeFormat('en-GB', { hourCycle: 'h23', ...options }).formatToParts(date)
  return (type) => parts.find((p) => p.type === type)?.value ?? ''
}

/** "GMT+01:00" → "UTC+1", "GMT+05:30" → "UTC+5:30", "GMT" or "GMT-00:00" → "UTC+0". */
function utcOffset(longOffset: string): string {
  const m = /^GMT([+-])(\d{2}):(\d{2})$/.exec(longOffset)
  if (!m || (m[2] === '00' && m[3] === '00')) return 'UTC+0'
  const hours = String(Number(m[2]))
  return `UTC${m[1]}${m[3] === '00' ? hours : `${hours}:${m[3]}`}`
}

/** " (Europe/Berlin, UTC+1)", " (UTC)", or nothing when the style names no zone. */
function zoneSuffix(date: Date, style: DateStyle): string {
  if (!style.zone) return ''
  const timeZone = style.timeZone ?? new Intl.DateTimeFormat().resolvedOptions().timeZone
  if (timeZone === 'UTC') return ` (${timeZone})`
  return ` (${timeZone}, ${utcOffset(partsOf(date, { timeZone, timeZoneName: 'longOffset' })('timeZoneName'))})`
}

/** "Thu 24 Dec 2026, 17:00"; with `words: 'long'` and `zone`: "Thursday 24 December 2026, 18:00 (Europe/Berlin, UTC+1)". */
export function formatDateTime(value: Moment, style: DateStyle = {}): string {
  const date = toDate(value)
  if (typeof date === 'string') return date
  const words = style.words === 'long' ? 'long' : 'short'
  const get = partsOf(date, {
    timeZone: style.timeZone, weekday: words, day: 'numeric', month: words, year: 'numeric', hour: '2-digit', minute: '2-digit',
    second: style.seconds ? '2-digit' : undefined,
  })
  const time = `${get('hour')}:${get('minute')}${style.seconds ? `:${get('second')}` : ''}`
  return `${get('weekday')} ${get('day')} ${get('month')} ${get('year')}, ${time}${zoneSuffix(date, style)}`
}

/** "24 Dec, 17:00": for tables and lists where the year goes without saying. */
export function formatShortDateTime(value: Moment, style: Pick<DateStyle, 'timeZone'> = {}): string {
  const date = toDate(value)
  if (typeof date === 'string') return date
  const get = partsOf(date, { timeZone: style.timeZone, day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' })
  return `${get('day')} ${get('month')}, ${get('hour')}:${get('minute')}`
}

/** "24 Dec 2026": a day, for when something was created or last changed. */
export function formatDate(value: Moment, style: Pick<DateStyle, 'timeZone'> = {}): string {
  const date = toDate(value)
  if (typeof date === 'string') return date
  const get = partsOf(date, { timeZone: style.timeZone, day: 'numeric', month: 'short', year: 'numeric' })
  return `${get('day')} ${get('month')} ${get('year')}`
}

/** "17:05": the time of day, for "Saved 17:05". */
export function formatClockTime(value: Moment, style: Pick<DateStyle, 'timeZone'> = {}): string {
  const date = toDate(value)
  if (typeof date === 'string') return date
  const get = partsOf(date, { timeZone: style.timeZone, hour: '2-digit', minute: '2-digit' })
  return `${get('hour')}:${get('minute')}`
}

/** "in 3 days", "in 5 hours", "2 days ago": coarse, for deadlines. */
export function formatRelativeTime(value: string | Date, now: Date = new Date()): string {
  const date = value instanceof Date ? value : new Date(value)
  const diff = date.getTime() - now.getTime()
  const abs = Math.abs(diff)
  const minute = 60_000
  const hour = 60 * minute
  const day = 24 * hour
  const [n, unit] =
    abs >= 2 * day ? [Math.round(abs / day), 'day'] : abs >= 2 * hour ? [Math.round(abs / hour), 'hour'] : [Math.max(1, Math.round(abs / minute)), 'minute']
  const text = `${n} ${unit}${n === 1 ? '' : 's'}`
  return diff >= 0 ? `in ${text}` : `${text} ago`
}
