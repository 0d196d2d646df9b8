const dateTime = new Intl.DateTimeFormat('en-GB', {
  weekday: 'short',
  day: 'numeric',
  month: 'short',
  year: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
})
const shortDateTime = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' })

/** "Tue 3 Mar 2026, 09:00" (local time); "—" for none. */
export function formatDateTime(value: string | Date | null | undefined): string {
  if (!value) return '—'
  const date = value instanceof Date ? value : new Date(value)
  return Number.isNaN(date.getTime()) ? String(value) : dateTime.format(date)
}

/** "3 Mar, 09:00" for tables; "—" for none. */
export function formatShortDateTime(value: string | null | undefined): string {
  if (!value) return '—'
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : shortDateTime.format(date)
}

/** "in 3 days", "in 5 hours", "2 days ago" — coarse, for deadlines. */
export function relativeTime(value: string | Date, now: Date = new Date()): string {
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

/** A default window for a new round: opens at the next full hour, closes 14 days later at 17:00. */
export function defaultWindow(now: Date = new Date()): { opensAt: Date; closesAt: Date } {
  const opensAt = new Date(now)
  opensAt.setMinutes(0, 0, 0)
  opensAt.setHours(opensAt.getHours() + 1)
  const closesAt = new Date(opensAt)
  closesAt.setDate(closesAt.getDate() + 14)
  closesAt.setHours(17, 0, 0, 0)
  return { opensAt, closesAt }
}
