import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runRoundSchedule } from '../../server/services/rounds'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
/** Outbox rows written by other suites (with made-up round ids) are older than this. */
let outboxBaseline = 0
let analyst: Client
let studyId: number
let quantityIds: number[]
const kicked: number[] = []

const day = 24 * 3600 * 1000
const roundBody = (overrides: Record<string, unknown> = {}) => ({
  title: 'Round 1: burst rate and uptake',
  briefing: 'Please read the evidence notes before answering.',
  opensAt: new Date(Date.now() - 3600 * 1000).toISOString(),
  closesAt: new Date(Date.now() + 7 * day).toISOString(),
  items: [
    { quantityId: quantityIds[0], method: 'quantile' },
    { quantityId: quantityIds[1], method: 'fixed-interval', edges: [0, 0.1, 0.2, 0.4, 1] },
    { quantityId: quantityIds[2], method: 'chip-grid', edges: [0, 2, 4, 6, 8, 10], chips: 20 },
  ],
  ...overrides,
})

/** The link an e-mail carries, read from the outbox row's text. */
async function linkFromOutbox(email: string, path: 'invite' | 'answer'): Promise<string> {
  const row = await h.db('outbox_messages').where({ to_address: email }).orderBy('id', 'desc').first()
  const m = row.text_body.match(new RegExp(`http://localhost:3000/${path}/([A-Za-z0-9_-]+)`))
  if (!m) throw new Error(`no ${path} link in mail to ${email}: ${row.text_body}`)
  return m[1]
}

beforeAll(async () => {
  h = startApi({ kickMail: async (ids) => { kicked.push(...ids) } })
  analyst = await signedIn(h, 'analyst@kestrel.example')
  outboxBaseline = Number((await h.db('outbox_messages').max('id as max'))[0].max ?? 0)
  studyId = (await analyst.post('/api/studies', { title: 'Rounds test study', context: 'Testing rounds and invitations.' }).expect(201)).body.id
  const q = (symbol: string, support: object) => analyst.post(`/api/studies/${studyId}/quantities`, {
    name: `Quantity ${symbol}`, symbol, unit: 'u', question: `What is the value of ${symbol} for the Kestrel Valley network?`, support,
  }).expect(201)
  quantityIds = [
    (await q('burst', { kind: 'positive' })).body.id,
    (await q('uptake', { kind: 'proportion' })).body.id,
    (await q('flow', { kind: 'real' })).body.id,
  ]
})
afterAll(async () => {
  await h.close()
})

describe('scheduling a round', () => {
  it('creates a draft round numbered 1 with its items in order', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody())
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ number: 1, status: 'draft', version: 1, reminderHoursBefore: 24, calibrationPosition: 'after' })
    expect(res.body.items.map((i: { method: string }) => i.method)).toEqual(['quantile', 'fixed-interval', 'chip-grid'])
    expect(res.body.items[2]).toMatchObject({ edges: [0, 2, 4, 6, 8, 10], chips: 20 })
    expect(res.body.practice.answer).toBe(1840)
  })

  it('answers 400 with field errors: edges outside the support, closing before opening, unknown quantity', async () => {
    const bad = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({
      items: [{ quantityId: quantityIds[1], method: 'fixed-interval', edges: [0, 0.5, 1.5] }],
    }))
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toEqual({ 'items[0].edges': "Interval edges must lie within the quantity's support [0, 1]" })

    const window = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ closesAt: new Date(Date.now() - 2 * day).toISOString() }))
    expect(window.body.error.fields).toEqual({ closesAt: 'The round must close after it opens' })

    const foreign = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ items: [{ quantityId: 999999, method: 'quantile' }] }))
    expect(foreign.body.error.fields).toEqual({ 'items[0].quantityId': 'Choose a quantity of this study' })

    const chips = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ items: [{ quantityId: quantityIds[2], method: 'chip-grid', edges: [0, 1, 2] }] }))
    expect(chips.body.error.fields).toEqual({ 'items[0].chips': 'Enter the number of chips' })
    expect((await analyst.get(`/api/studies/${studyId}/rounds`)).body).toHaveLength(1)
  })

  it('will not open a round with an empty panel', async () => {
    const [round] = (await analyst.get(`/api/studies/${studyId}/rounds`)).body
    const res = await analyst.post(`/api/rounds/${round.id}/open`)
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ panel: 'Add at least one expert' })
  })
})

describe('panel, opening and invitations', () => {
  let roundId: number

  beforeAll(async () => {
    roundId = (await analyst.get(`/api/studies/${studyId}/rounds`)).body[0].id
  })

  it('adds an existing expert and a new invitee; nothing is sent while the round is a draft', async () => {
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'ignored for accounts' }).expect(201)
    const res = await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'Hydro.Consultant@Example.org', name: 'Mara Lindqvist' })
    expect(res.status).toBe(201)
    expect(res.body.panel.map((p: { email: string; userId: number | null; label: string }) => [p.email, p.userId !== null, p.label])).toEqual([
      ['expert2@kestrel.example', true, 'Expert 1'], ['hydro.consultant@example.org', false, 'Expert 2'],
    ])
    expect(await h.db('outbox_messages').where({ round_id: roundId }).where('id', '>', outboxBaseline)).toHaveLength(0)
    const dup = await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' })
    expect(dup.body.error.fields).toEqual({ email: 'This expert is already on the panel' })
    const notExpert = await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'reviewer@kestrel.example', name: 'Ingrid' })
    expect(notExpert.body.error.fields).toEqual({ email: 'Only expert accounts can sit on a panel' })
  })

  it('opening queues a notice for the account holder and an invitation with a calendar file for the invitee', async () => {
    kicked.length = 0
    const res = await analyst.post(`/api/rounds/${roundId}/open`)
    expect(res.status).toBe(200)
    expect(res.body.status).toBe('open')
    const mails = await h.db('outbox_messages').where({ round_id: roundId }).where('id', '>', outboxBaseline).orderBy('id')
    expect(mails.map((m) => [m.to_address, m.kind, m.status])).toEqual([
      ['expert2@kestrel.example', 'round-notice', 'queued'],
      ['hydro.consultant@example.org', 'invitation', 'queued'],
    ])
    expect(kicked).toEqual(mails.map((m) => m.id))
    expect(mails[1].ics).toContain('BEGIN:VCALENDAR')
    expect(mails[0].text_body).toContain(`http://localhost:3000/answer/${roundId}`)
    const inv = await h.db('invitations').where({ round_id: roundId }).first()
    const token = await linkFromOutbox('hydro.consultant@example.org', 'invite')
    expect(inv.token_hash).toMatch(/^[0-9a-f]{64}$/)
    expect(inv.token_hash).not.toContain(token)
    expect(JSON.stringify(inv)).not.toContain(token)
    expect((await h.db('studies').where({ id: studyId }).first()).status).toBe('eliciting')
    expect((await analyst.post(`/api/rounds/${roundId}/open`)).status).toBe(409)
  })

  it('describes a valid invitation, accepts it once (signing the expert in), and refuses reuse', async () => {
    const token = await linkFromOutbox('hydro.consultant@example.org', 'invite')
    const visitor = new Client(h)
    await visitor.csrf()
    const info = await visitor.get(`/api/invitations/${token}`).expect(200)
    expect(info.body).toMatchObject({ state: 'valid', email: 'hydro.consultant@example.org', name: 'Mara Lindqvist', roundId, studyTitle: 'Rounds test study' })

    const weak = await visitor.post(`/api/invitations/${token}/accept`, { name: 'Mara Lindqvist', password: 'short' })
    expect(weak.status).toBe(400)
    expect(weak.body.error.fields).toEqual({ password: 'Use at least 10 characters' })

    const ok = await visitor.post(`/api/invitations/${token}/accept`, { name: 'Mara Lindqvist', password: 'rivers-and-pipes-7' })
    expect(ok.status).toBe(201)
    expect(ok.body).toMatchObject({ roundId, user: { email: 'hydro.consultant@example.org', role: 'expert', displayName: 'Mara Lindqvist' } })
    await visitor.csrf()
    const round = await visitor.get(`/api/rounds/${roundId}`).expect(200)
    expect(round.body.panel).toEqual([])
    expect(round.body.practice).not.toHaveProperty('answer')

    const again = await new Client(h).get(`/api/invitations/${token}`)
    expect(again.body.state).toBe('used')
    const reuse = new Client(h)
    await reuse.csrf()
    const second = await reuse.post(`/api/invitations/${token}/accept`, { name: 'Someone Else', password: 'another-pass-99' })
    expect(second.status).toBe(410)
    expect(second.body.error.message).toBe('This invitation link has already been used. Sign in with the password you chose.')
  })

  it('refuses an expired link and a revoked one; a resend issues a new working link', async () => {
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'late.expert@example.org', name: 'Late Expert' }).expect(201)
    const first = await linkFromOutbox('late.expert@example.org', 'invite')
    await h.db('invitations').where({ email: 'late.expert@example.org' }).update({ expires_at: new Date(Date.now() - 1000) })
    const visitor = new Client(h)
    await visitor.csrf()
    expect((await visitor.get(`/api/invitations/${first}`)).body.state).toBe('expired')
    expect((await visitor.post(`/api/invitations/${first}/accept`, { name: 'Late Expert', password: 'a-good-pass-9' })).status).toBe(410)

    const round = (await analyst.get(`/api/rounds/${roundId}`)).body
    const member = round.panel.find((p: { email: string }) => p.email === 'late.expert@example.org')
    await analyst.post(`/api/rounds/${roundId}/panel/${member.id}/resend`).expect(200)
    const second = await linkFromOutbox('late.expert@example.org', 'invite')
    expect(second).not.toBe(first)
    expect((await visitor.get(`/api/invitations/${second}`)).body.state).toBe('valid')

    await analyst.post(`/api/rounds/${roundId}/panel/${member.id}/revoke`).expect(200)
    const revoked = await visitor.get(`/api/invitations/${second}`)
    expect(revoked.body).toMatchObject({ state: 'revoked', message: 'This invitation link was withdrawn. Ask the analyst for a new one.' })
    expect((await visitor.get('/api/invitations/not-a-real-token-at-all-xx')).status).toBe(404)
  })

  it('shows progress per expert and quantity, and stamps an expert’s first visit', async () => {
    const expert2 = await signedIn(h, 'expert2@kestrel.example')
    const entry = await expert2.get(`/api/rounds/${roundId}/entry`).expect(200)
    expect(entry.body).toEqual({ declaration: null, practice: null, earlier: null, pilotData: [], calibrationAnsweredEarlier: [], submittedAt: null })
    const progress = await analyst.get(`/api/rounds/${roundId}/progress`).expect(200)
    expect(progress.body.quantities.map((q: { symbol: string }) => q.symbol)).toEqual(['burst', 'uptake', 'flow'])
    const row = progress.body.experts.find((e: { email: string }) => e.email === 'expert2@kestrel.example')
    expect(row.firstOpenedAt).not.toBeNull()
    expect(row.quantities.map((q: { status: string }) => q.status)).toEqual(['not started', 'not started', 'not started'])
    expect((await expert2.get(`/api/rounds/${roundId}/progress`)).status).toBe(403)
  })

  it('stores the expert’s declaration with field errors for a half-filled form', async () => {
    const expert2 = await signedIn(h, 'expert2@kestrel.example')
    const bad = await expert2.put(`/api/rounds/${roundId}/declaration`, { expertise: 'Pipes', interests: 'described' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toEqual({
      expertise: 'Use at least 10 characters', interestsText: 'Describe your interests', seenPilotData: 'Say whether you have seen the pilot data',
    })
    const ok = await expert2.put(`/api/rounds/${roundId}/declaration`, {
      expertise: 'Twelve years of burst analysis for a regional utility.', interests: 'described', interestsText: 'Consulting for a pipe supplier in 2023.', seenPilotData: false,
    })
    expect(ok.status).toBe(200)
    expect(ok.body.declaration).toMatchObject({ interests: 'described', interestsText: 'Consulting for a pipe supplier in 2023.', seenPilotData: false })
  })

  it('lets the analyst extend an open round but not change its quantities; closes early', async () => {
    const round = (await analyst.get(`/api/rounds/${roundId}`)).body
    const later = new Date(Date.parse(round.closesAt) + 2 * day).toISOString()
    const ext = await analyst.patch(`/api/rounds/${roundId}`, { closesAt: later, version: round.version })
    expect(ext.status).toBe(200)
    expect(ext.body.closesAt).toBe(later)
    const locked = await analyst.patch(`/api/rounds/${roundId}`, { items: [{ quantityId: quantityIds[0], method: 'quantile' }], version: ext.body.version })
    expect(locked.body.error.fields).toEqual({ items: 'Cannot change while the round is open' })
    const stale = await analyst.patch(`/api/rounds/${roundId}`, { closesAt: later, version: round.version })
    expect(stale.status).toBe(409)
    const audit = (await analyst.get(`/api/studies/${studyId}/audit`)).body
    expect(audit.find((e: { action: string }) => e.action === 'round.extend').details.closesAtAfter).toBe(later)
  })
})

describe('reminders and automatic closing', () => {
  it('reminds only those who have not submitted, once, and closes a round past its closing time', async () => {
    const r = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ title: 'Round with reminder', reminderHoursBefore: 48, closesAt: new Date(Date.now() + 30 * 3600 * 1000).toISOString() })).expect(201)
    await analyst.post(`/api/rounds/${r.body.id}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
    await analyst.post(`/api/rounds/${r.body.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)
    await analyst.post(`/api/rounds/${r.body.id}/open`).expect(200)
    await h.db('round_panel').where({ round_id: r.body.id, email: 'expert1@kestrel.example' }).update({ submitted_at: new Date() })
    const ctx = { db: h.db, publicUrl: 'http://localhost:3000', kickMail: async () => {} }

    // The schedule covers every round in the database, and other suites share it: count this round's reminders.
    const first = await runRoundSchedule(ctx)
    expect(first.reminders).toBeGreaterThanOrEqual(1)
    const reminders = await h.db('outbox_messages').where({ round_id: r.body.id, kind: 'reminder' })
    expect(reminders.map((m) => m.to_address)).toEqual(['expert2@kestrel.example'])
    expect(reminders[0].subject).toMatch(/^Reminder:/)
    expect((await runRoundSchedule(ctx)).reminders).toBe(0)
    expect(await h.db('outbox_messages').where({ round_id: r.body.id, kind: 'reminder' })).toHaveLength(1)

    const closed = await runRoundSchedule(ctx, new Date(Date.now() + 31 * 3600 * 1000))
    expect(closed.closed).toBeGreaterThanOrEqual(1)
    expect((await h.db('rounds').where({ id: r.body.id }).first()).status).toBe('closed')
  })
})

describe('the round’s time zone in its e-mails', () => {
  it('takes an IANA name, refuses anything else with a field error, and keeps UTC when none is given', async () => {
    const plain = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ title: 'Round without a zone' })).expect(201)
    expect(plain.body.timeZone).toBe('UTC')
    for (const timeZone of ['Mars/Olympus', 'Europe/../etc', '', 42, 'UTC+1']) {
      const bad = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ timeZone }))
      expect(bad.status).toBe(400)
      expect(bad.body.error.fields).toEqual({ timeZone: 'Choose a time zone by its IANA name, such as Europe/London or America/New_York' })
    }
    const spelled = await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({ timeZone: 'europe/berlin' })).expect(201)
    expect(spelled.body.timeZone).toBe('Europe/Berlin')
    const changed = await analyst.patch(`/api/rounds/${spelled.body.id}`, { timeZone: 'America/New_York', version: spelled.body.version }).expect(200)
    expect(changed.body.timeZone).toBe('America/New_York')
    const refused = await analyst.patch(`/api/rounds/${spelled.body.id}`, { timeZone: 'Nowhere/Land', version: changed.body.version })
    expect(refused.status).toBe(400)
    expect((await analyst.get(`/api/rounds/${spelled.body.id}`)).body.timeZone).toBe('America/New_York')
  })

  it('states every time of the invitation, the notice and the reminder in that zone, with its name', async () => {
    const closesAt = new Date(Date.now() + 30 * 3600 * 1000)
    closesAt.setUTCSeconds(0, 0)
    const r = (await analyst.post(`/api/studies/${studyId}/rounds`, roundBody({
      title: 'Round in Berlin time', timeZone: 'Europe/Berlin', reminderHoursBefore: 48, closesAt: closesAt.toISOString(),
    })).expect(201)).body
    await analyst.post(`/api/rounds/${r.id}/invitations`, { email: 'berlin.expert@example.org', name: 'Kai' }).expect(201)
    await analyst.post(`/api/rounds/${r.id}/invitations`, { email: 'expert3@kestrel.example', name: 'Priya' }).expect(201)
    await analyst.post(`/api/rounds/${r.id}/open`).expect(200)
    await runRoundSchedule({ db: h.db, publicUrl: 'http://localhost:3000', kickMail: async () => {} })
    const rows = await h.db('outbox_messages').where({ round_id: r.id }).orderBy('id')
    expect(rows.map((m) => m.kind).sort()).toEqual(['invitation', 'invitation', 'reminder', 'round-notice'])
    const berlin = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/Berlin', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(closesAt)
    for (const m of rows) {
      expect(m.text_body).toContain(`${berlin} (Europe/Berlin, UTC+`)
      expect(m.text_body).not.toContain('(UTC)')
    }
  })
})

describe('a second round of the same study asks less twice', () => {
  let study2: number
  let quantity: number
  let firstCalibration: number
  const practicePoints = [{ value: 1000, prob: 0.01 }, { value: 1300, prob: 0.25 }, { value: 1600, prob: 0.5 }, { value: 2000, prob: 0.75 }, { value: 2600, prob: 0.99 }]
  const declaration = { expertise: 'Fifteen years running the Kestrel Valley burst records.', interests: 'described', interestsText: 'Adviser to a pipe-lining firm.', seenPilotData: true }

  async function openRound(title: string, emails: string[]) {
    const r = (await analyst.post(`/api/studies/${study2}/rounds`, {
      title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(), items: [{ quantityId: quantity, method: 'quantile' }],
    }).expect(201)).body
    for (const email of emails) await analyst.post(`/api/rounds/${r.id}/invitations`, { email, name: 'Expert' }).expect(201)
    await analyst.post(`/api/rounds/${r.id}/open`).expect(200)
    return r.id as number
  }

  beforeAll(async () => {
    study2 = (await analyst.post('/api/studies', { title: 'Two rounds study', context: 'A study asked in two rounds.' }).expect(201)).body.id
    quantity = (await analyst.post(`/api/studies/${study2}/quantities`, {
      name: 'Burst rate', symbol: 'burst', unit: 'bursts per 100 km per year', question: 'How many bursts per 100 km per year on the old mains?', support: { kind: 'positive' },
    }).expect(201)).body.id
    firstCalibration = (await analyst.post(`/api/studies/${study2}/calibration-questions`, { question: 'How many km of mains were renewed in 2024?', unit: 'km', trueValue: 12 }).expect(201)).body.id
  })

  it('shows the earlier declaration and practice, keeps them on "still true", and asks calibration once per study', async () => {
    const expert = await signedIn(h, 'expert1@kestrel.example')
    const first = await openRound('First of two', ['expert1@kestrel.example'])
    await expert.put(`/api/rounds/${first}/declaration`, declaration).expect(200)
    await expert.post(`/api/rounds/${first}/practice`, { points: practicePoints }).expect(200)
    await expert.put(`/api/rounds/${first}/calibration-answers/${firstCalibration}`, { q05: 5, q50: 10, q95: 20, version: 0 }).expect(200)

    const second = await openRound('Second of two', ['expert1@kestrel.example'])
    const entry = (await expert.get(`/api/rounds/${second}/entry`).expect(200)).body
    expect(entry.declaration).toBeNull()
    expect(entry.earlier).toMatchObject({
      roundNumber: 1, roundTitle: 'First of two',
      declaration: { expertise: declaration.expertise, interests: 'described', interestsText: 'Adviser to a pipe-lining firm.', seenPilotData: true },
      practice: { points: practicePoints },
    })
    expect(entry.calibrationAnsweredEarlier).toEqual([firstCalibration])

    const confirmed = (await expert.post(`/api/rounds/${second}/declaration/confirm`, {}).expect(200)).body
    expect(confirmed.declaration).toMatchObject({ expertise: declaration.expertise, interests: 'described', seenPilotData: true })
    expect(confirmed.practice.points).toEqual(practicePoints)
    expect(confirmed.earlier).toBeNull()
    // Confirming twice changes nothing; the record of this round holds its own copy.
    await expert.post(`/api/rounds/${second}/declaration/confirm`, {}).expect(200)
    expect(await h.db('declarations').where({ round_id: second })).toHaveLength(1)
    const audit = (await analyst.get(`/api/studies/${study2}/audit`)).body.filter((e: { action: string }) => e.action === 'declaration.confirm')
    expect(audit).toHaveLength(1)
    expect(audit[0].details).toEqual({ fromRound: 1 })
    expect((await expert.post(`/api/rounds/${second}/declaration/confirm`, { extra: 1 })).status).toBe(400)

    // A calibration question added after round 1 is asked; the one answered in round 1 is not.
    const added = (await analyst.post(`/api/studies/${study2}/calibration-questions`, { question: 'How many bursts were logged in 2024 in total?', unit: '', trueValue: 130 }).expect(201)).body.id
    expect((await expert.get(`/api/rounds/${second}/entry`)).body.calibrationAnsweredEarlier).toEqual([firstCalibration])
    await expert.put(`/api/rounds/${second}/judgements/${quantity}`, {
      method: 'quantile', lower: 4, upper: 25, points: [{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 13, prob: 0.75 }],
      rationale: 'Burst logs 2015–2025 for the old cast-iron mains.', chosenFamily: null, version: 0,
    }).expect(200)
    const submit = await expert.post(`/api/rounds/${second}/submit`)
    expect(submit.status).toBe(400)
    expect(Object.keys(submit.body.error.fields)).toEqual([`calibration.${added}`])
  })

  it('carries the practice along when the expert changes the earlier declaration instead', async () => {
    const expert = await signedIn(h, 'expert3@kestrel.example')
    const first = await openRound('First for expert 3', ['expert3@kestrel.example'])
    await expert.put(`/api/rounds/${first}/declaration`, { ...declaration, interests: 'none', interestsText: '' }).expect(200)
    await expert.post(`/api/rounds/${first}/practice`, { points: practicePoints }).expect(200)
    const second = await openRound('Second for expert 3', ['expert3@kestrel.example'])
    const changed = (await expert.put(`/api/rounds/${second}/declaration`, { ...declaration, seenPilotData: false }).expect(200)).body
    expect(changed.declaration).toMatchObject({ interests: 'described', seenPilotData: false })
    expect(changed.practice.points).toEqual(practicePoints)
    // A first round has nothing to confirm.
    const third = await signedIn(h, 'expert2@kestrel.example')
    const only = await openRound('Only round for expert 2', ['expert2@kestrel.example'])
    const refused = await third.post(`/api/rounds/${only}/declaration/confirm`, {})
    expect(refused.status).toBe(409)
    expect(refused.body.error.message).toBe('There is no declaration from an earlier round of this study to confirm; fill in the form')
  })
})
