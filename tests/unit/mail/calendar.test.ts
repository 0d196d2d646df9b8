import { describe, expect, it } from 'vitest'
import { CALENDAR_CONTENT_TYPE, roundCalendarFile } from '../../../server/mail/calendar'

const base = {
  title: 'Kestrel Valley: burst rates, round 1',
  description: 'Answer the questions on burst rates of cast-iron mains.',
  start: new Date('2026-12-10T09:30:00Z'),
  end: new Date('2026-12-24T17:00:00Z'),
  url: 'http://localhost:3000/answer/7',
}

describe('roundCalendarFile', () => {
  it('writes one VEVENT with the window in UTC, the summary and the link', () => {
    const ics = roundCalendarFile({ ...base, organizerEmail: 'no-reply@priorsmith.local', uid: 'round-7@priorsmith' })
    expect(ics.startsWith('BEGIN:VCALENDAR\r\n')).toBe(true)
    expect(ics.trimEnd().endsWith('END:VCALENDAR')).toBe(true)
    expect(ics).toContain('DTSTART:20261210T093000Z')
    expect(ics).toContain('DTEND:20261224T170000Z')
    expect(ics).toContain('SUMMARY:Kestrel Valley: burst rates\\, round 1')
    expect(ics).toContain('URL:http://localhost:3000/answer/7')
    expect(ics).toContain('UID:round-7@priorsmith')
    expect(ics).toContain('METHOD:PUBLISH')
    expect(ics).toContain('MAILTO:no-reply@priorsmith.local')
    expect(ics.match(/BEGIN:VEVENT/g)).toHaveLength(1)
  })

  it('converts a date given with an offset to UTC', () => {
    const ics = roundCalendarFile({ ...base, start: new Date('2026-12-10T09:30:00+02:00'), end: new Date('2026-12-11T00:15:00-05:00') })
    expect(ics).toContain('DTSTART:20261210T073000Z')
    expect(ics).toContain('DTEND:20261211T051500Z')
  })

  it('declares the same method in the MIME type as in the file', () => {
    expect(CALENDAR_CONTENT_TYPE).toBe('text/calendar; charset=utf-8; method=PUBLISH')
  })

  it('refuses an invalid or reversed window with a clear message', () => {
    expect(() => roundCalendarFile({ ...base, start: new Date('nonsense') })).toThrow('roundCalendarFile: start is not a valid date')
    expect(() => roundCalendarFile({ ...base, end: new Date('2026-12-01T00:00:00Z') })).toThrow('roundCalendarFile: the round must end after it starts')
    expect(() => roundCalendarFile({ ...base, title: '  ' })).toThrow('roundCalendarFile: the title is empty')
  })
})
