import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createDb, type Db } from '../../server/db/knex'
import { createMailer, type Mailer } from '../../server/mail/mailer'
import { startSmtpFake, type SmtpFake } from '../../server/mail/smtp-fake'
import { localMailConfig } from '../../server/mail/transport'
import { signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
let fake: SmtpFake
let mailer: Mailer
let mailDb: Db

beforeAll(async () => {
  fake = await startSmtpFake()
  mailDb = createDb(inject('databaseUrl'))
  // Rows other suites left queued would be delivered here too and blur the count.
  await mailDb('outbox_messages').where({ status: 'queued' }).update({ status: 'failed', last_error: 'left by another test suite' })
  mailer = createMailer({ databaseUrl: inject('databaseUrl'), db: mailDb, transport: localMailConfig(fake.port, {}), retryDelaySeconds: 1, pollingIntervalSeconds: 0.5, sweepIntervalMs: 2000 })
  await mailer.start()
  h = startApi({ kickMail: (ids) => mailer.kick(ids), mailFake: fake })
})
afterAll(async () => {
  await mailer.stop()
  await fake.stop()
  await h.close()
  await mailDb.destroy()
})

describe('invitations while the mail server is down', () => {
  it('keeps every invitation of a round opened during the outage and delivers each once the server is back', async () => {
    const analyst = await signedIn(h, 'analyst@kestrel.example')
    const study = (await analyst.post('/api/studies', { title: 'Mail outage study', context: 'Opening a round while SMTP is down.' }).expect(201)).body
    const q = (await analyst.post(`/api/studies/${study.id}/quantities`, { name: 'Uptake', symbol: 'uptake', unit: '', question: 'What share of households will join the scheme?', support: { kind: 'proportion' } }).expect(201)).body
    const round = (await analyst.post(`/api/studies/${study.id}/rounds`, {
      title: 'Outage round', opensAt: new Date().toISOString(), closesAt: new Date(Date.now() + 7 * 86400e3).toISOString(), items: [{ quantityId: q.id, method: 'quantile' }],
    }).expect(201)).body
    const invitees = ['outage.a@example.org', 'outage.b@example.org', 'outage.c@example.org']
    for (const email of invitees) await analyst.post(`/api/rounds/${round.id}/invitations`, { email, name: 'Outage Expert' }).expect(201)
    await analyst.post(`/api/rounds/${round.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)

    await fake.stop()
    await analyst.post(`/api/rounds/${round.id}/open`).expect(200)
    const rows = () => h.db('outbox_messages').where({ round_id: round.id }).orderBy('id')
    const deadline = Date.now() + 20_000
    while ((await rows()).some((r) => r.attempts === 0) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200))
    const failed = await rows()
    expect(failed).toHaveLength(4)
    expect(failed.every((r) => r.status === 'queued' && r.attempts >= 1 && r.last_error)).toBe(true)

    const before = fake.messages.length
    await fake.start()
    const until = Date.now() + 30_000
    while ((await rows()).some((r) => r.status !== 'sent') && Date.now() < until) await new Promise((r) => setTimeout(r, 250))
    const sent = await rows()
    expect(sent.map((r) => r.status)).toEqual(['sent', 'sent', 'sent', 'sent'])
    const received = fake.messages.slice(before).map((m) => m.to).sort()
    expect(received).toEqual([...invitees, 'expert1@kestrel.example'].sort())
    const admin = await signedIn(h, 'admin@kestrel.example')
    const mailbox = (await admin.get('/api/dev/mailbox').expect(200)).body
    expect(mailbox.filter((m: { to: string }) => invitees.includes(m.to))).toHaveLength(3)
  }, 90_000)
})
