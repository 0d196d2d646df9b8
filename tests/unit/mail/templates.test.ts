import { describe, expect, it } from 'vitest'
import { escapeHtml, mailDateTime, invitationMessage, reminderMessage, roundNoticeMessage } from '../../../server/mail/templates'

const opensAt = new Date('2026-12-10T09:30:00Z')
const closesAt = new Date('2026-12-24T17:00:00Z')

const invitation = {
  expertName: 'Dr <script>alert(1)</script> Rowe',
  studyTitle: 'Kestrel Valley pipe renewal',
  roundTitle: 'Round 1 & calibration',
  opensAt,
  closesAt,
  publicUrl: 'https://priorsmith.example.org/',
  token: 'tok_abc123',
  linkExpiresAt: new Date('2026-12-16T08:00:00Z'),
  quantities: ['Burst rate of cast-iron mains', 'Leak-alert uptake'],
  analystName: 'Alex Analyst',
  timeZone: 'UTC',
}

describe('escapeHtml', () => {
  it('escapes the five HTML-significant characters', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;')
  })
})

describe('mailDateTime', () => {
  it('writes a UTC date unambiguously', () => {
    expect(mailDateTime(closesAt, 'UTC')).toBe('Thursday 24 December 2026, 17:00 (UTC)')
  })

  it('states the time in the round’s zone, naming the zone and its offset on that date', () => {
    expect(mailDateTime(closesAt, 'Europe/Berlin')).toBe('Thursday 24 December 2026, 18:00 (Europe/Berlin, UTC+1)')
    expect(mailDateTime(new Date('2026-07-01T17:00:00Z'), 'Europe/Berlin')).toBe('Wednesday 1 July 2026, 19:00 (Europe/Berlin, UTC+2)')
    expect(mailDateTime(closesAt, 'America/New_York')).toBe('Thursday 24 December 2026, 12:00 (America/New_York, UTC-5)')
    expect(mailDateTime(closesAt, 'Asia/Kolkata')).toBe('Thursday 24 December 2026, 22:30 (Asia/Kolkata, UTC+5:30)')
    expect(mailDateTime(closesAt, 'Europe/London')).toBe('Thursday 24 December 2026, 17:00 (Europe/London, UTC+0)')
    // Past midnight in the zone: the date moves too.
    expect(mailDateTime(new Date('2026-12-24T23:30:00Z'), 'Pacific/Auckland')).toBe('Friday 25 December 2026, 12:30 (Pacific/Auckland, UTC+13)')
  })
})

describe('every e-mail in the round’s time zone', () => {
  const tz = 'America/New_York'
  const common = { expertName: 'Jo Expert', studyTitle: 'Kestrel Valley', roundTitle: 'Round 2', roundId: 4, publicUrl: 'http://localhost:3000', quantities: ['Burst rate'], timeZone: tz }
  const messages = [
    invitationMessage({ ...invitation, timeZone: tz }),
    roundNoticeMessage({ ...common, opensAt, closesAt }),
    reminderMessage({ ...common, closesAt }),
  ]

  it.each(messages.map((m, i) => [['invitation', 'notice', 'reminder'][i], m] as const))('%s: states its times in the round’s zone, never in UTC', (_, m) => {
    expect(m.text).toContain('Thursday 24 December 2026, 12:00 (America/New_York, UTC-5)')
    expect(m.text).not.toContain('17:00')
    expect(m.text).not.toContain('(UTC)')
    expect(m.html).toContain('12:00 (America/New_York, UTC-5)')
  })
})

describe('plain words in the e-mails', () => {
  const notice = roundNoticeMessage({
    expertName: 'Jo Expert', studyTitle: 'Kestrel Valley', roundTitle: 'Round 2', roundId: 42, opensAt, closesAt, publicUrl: 'http://localhost:3000', quantities: ['Burst rate'], timeZone: 'UTC',
  })
  const inv = invitationMessage(invitation)

  it('promises changes until the expert submits, not until the round closes', () => {
    for (const m of [inv, notice]) {
      expect(m.text).not.toContain('until the round closes')
      expect(m.text).toContain('you can change them until you submit them. Submitting sends them to the analyst and freezes them')
    }
  })

  it('defines the plausible bounds as every screen does', () => {
    expect(inv.text).toContain('the lowest and the highest value you find plausible (values you would be very surprised, about 1 chance in 100, to see the true value fall beyond)')
    expect(inv.text).not.toMatch(/distribution|median|quartile/)
  })
})

describe('invitationMessage', () => {
  const m = invitationMessage(invitation)

  it('never lets a name become markup in the HTML body', () => {
    expect(m.html).not.toContain('<script>')
    expect(m.html).toContain('Dear Dr &lt;script&gt;alert(1)&lt;/script&gt; Rowe,')
    expect(m.html).toContain('Round 1 &amp; calibration')
  })

  it('keeps the plain text readable as given', () => {
    expect(m.text.startsWith('Dear Dr <script>alert(1)</script> Rowe,\n')).toBe(true)
    expect(m.subject).toBe('Invitation: expert judgement for "Kestrel Valley pipe renewal"')
  })

  it('gives the personal single-use link, its expiry, the window and what will be asked', () => {
    expect(m.text).toContain('https://priorsmith.example.org/invite/tok_abc123')
    expect(m.html).toContain('href="https://priorsmith.example.org/invite/tok_abc123"')
    expect(m.text).toContain('expires on Wednesday 16 December 2026, 08:00 (UTC)')
    expect(m.text).toContain('works once')
    expect(m.text).toContain('personal')
    expect(m.text).toContain('from Thursday 10 December 2026, 09:30 (UTC) until Thursday 24 December 2026, 17:00 (UTC)')
    expect(m.text).toContain('2 quantities')
    expect(m.text).toContain('  - Burst rate of cast-iron mains\n  - Leak-alert uptake')
    expect(m.text).toContain('Alex Analyst')
  })

  it('refuses a link that is not http(s)', () => {
    expect(() => invitationMessage({ ...invitation, publicUrl: 'javascript:alert(1)//' })).toThrow(/http or https/)
  })

  it('keeps the subject on one line', () => {
    expect(invitationMessage({ ...invitation, studyTitle: 'A\r\nBcc: x@example.org' }).subject).toBe('Invitation: expert judgement for "A Bcc: x@example.org"')
  })
})

describe('roundNoticeMessage', () => {
  it('links to the answer page of the round', () => {
    const m = roundNoticeMessage({
      expertName: 'Jo Expert', studyTitle: 'Kestrel Valley', roundTitle: 'Round 2 <feedback>', roundId: 42,
      opensAt, closesAt, publicUrl: 'http://localhost:3000', quantities: ['Night-flow reduction'], timeZone: 'UTC',
    })
    expect(m.subject).toBe('New round: "Round 2 <feedback>" (Kestrel Valley)')
    expect(m.text).toContain('http://localhost:3000/answer/42')
    expect(m.html).toContain('href="http://localhost:3000/answer/42"')
    expect(m.html).toContain('Round 2 &lt;feedback&gt;')
    expect(m.text).toContain('one quantity')
  })
})

describe('reminderMessage', () => {
  it('states the closing time and progress', () => {
    const m = reminderMessage({
      expertName: 'Jo Expert', studyTitle: 'Kestrel Valley', roundTitle: 'Round 1', roundId: 7,
      closesAt, publicUrl: 'http://localhost:3000', answered: 1, total: 3, timeZone: 'UTC',
    })
    expect(m.subject).toBe('Reminder: "Round 1" closes Thursday 24 December 2026, 17:00 (UTC)')
    expect(m.text).toContain('closes on Thursday 24 December 2026, 17:00 (UTC)')
    expect(m.text).toContain('1 of 3 questions')
    expect(m.text).toContain('http://localhost:3000/answer/7')
  })
})
