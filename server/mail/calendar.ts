import { createEvent } from 'ics'

/**
 * The calendar file is informational ("add the answering window to your calendar"), so it is an
 * iTIP PUBLISH: a REQUEST would need ATTENDEE lines and would make mail clients offer
 * accept/decline replies addressed to the no-reply sender. The MIME type repeats the file's METHOD.
 */
export const CALENDAR_METHOD = 'PUBLISH'
export const CALENDAR_CONTENT_TYPE = `text/calendar; charset=utf-8; method=${CALENDAR_METHOD}`

export interface RoundCalendarInput {
  title: string
  description: string
  start: Date
  end: Date
  url: string
  organizerEmail?: string
  organizerName?: string
  /** Stable id, e.g. `round-12@priorsmith`, so a later file for the same round updates the entry instead of adding one. */
  uid?: string
}

/** One VEVENT for a round's answering window, times in UTC. Throws a clear error on bad input. */
export function roundCalendarFile(input: RoundCalendarInput): string {
  const { start, end } = input
  if (!(start instanceof Date) || Number.isNaN(start.getTime())) throw new Error('roundCalendarFile: start is not a valid date')
  if (!(end instanceof Date) || Number.isNaN(end.getTime())) throw new Error('roundCalendarFile: end is not a valid date')
  if (end.getTime() <= start.getTime()) throw new Error('roundCalendarFile: the round must end after it starts')
  if (!input.title.trim()) throw new Error('roundCalendarFile: the title is empty')
  const { error, value } = createEvent({
    productId: '-//Priorsmith//Elicitation rounds//EN',
    method: CALENDAR_METHOD,
    ...(input.uid ? { uid: input.uid } : {}),
    title: input.title,
    description: input.description,
    url: input.url,
    start: start.getTime(),
    startInputType: 'utc',
    startOutputType: 'utc',
    end: end.getTime(),
    endInputType: 'utc',
    endOutputType: 'utc',
    status: 'CONFIRMED',
    busyStatus: 'FREE',
    transp: 'TRANSPARENT',
    ...(input.organizerEmail ? { organizer: { name: input.organizerName ?? 'Priorsmith', email: input.organizerEmail } } : {}),
  })
  if (error || !value) throw new Error(`roundCalendarFile: could not build the calendar file: ${error?.message ?? 'no output'}`)
  return value
}
