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
