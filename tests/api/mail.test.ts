import express, { type Request } from 'express'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { inject } from 'vitest'
import { createDb, type Db } from '../../server/db/knex'
import { errorHandler } from '../../server/http/error-handler'
import { roundCalendarFile } from '../../server/mail/calendar'
import { createMailer, type Mailer, type MailerOptions } from '../../server/mail/mailer'
import { listOutbox, queueMail, requeueFailed } from '../../server/mail/outbox'
import { startSmtpFake, type SmtpFake } from '../../server/mail/smtp-fake'
import { invitationMessage } from '../../server/mail/templates'
import { localMailConfig } from '../../server/mail/transport'
import { devMailboxRouter } from '../../server/routes/dev-mailbox'
import { waitFor } from '../support/wait'

const databaseUrl = inject('databaseUrl')
const dbs: Db[] = []
const mailers: Mailer[] = []
const fakes: SmtpFake[] = []
let db: Db
let fake: SmtpFake
let mailer: Mailer
let studyId: number

function newDb(): Db {
  const d = createDb(databaseUrl)
  dbs.push(d)
  return d
}

async function newMailer(options: Partial<MailerOptions> & { port: number; db?: Db }): Promise<Mailer> {
  const { port, ...rest } = options
  const m = createMailer({
    databaseUrl,
    db: rest.db ?? db,
    transport: localMailConfig(port, {}),
    retryDelaySeconds: 1,
    pollingIntervalSeconds: 0.5,
    sweepIntervalMs: 60_000,
    log: () => {},
    ...rest,
  })
  mailers.push(m)
  await m.start()
  return m
}

const rowsOf = (ids: number[]) => db('outbox_messages').whereIn('id', ids).orderBy('id')
const received = (subject: string) => fake.messages.filter((m) => m.subject === subject)

/** Queues messages in one transaction, as a route would, and returns their ids. */
async function queueMany(subjects: string[], extra: { studyId?: number } = {}): Promise<number[]> {
  return db.transaction(async (trx) => {
    const ids: number[] = []
    for (const [i, subject] of subjects.entries()) {
      ids.push(await queueMail(trx, { to: `expert${i}@kestrel.example`, toName: `Expert ${i}`, subject, text: `Body of ${subject}`, kind: 'test', ...extra }))
    }
    return ids
  })
}

beforeAll(async () => {
  db = newDb()
  // Other suites share this database and leave queued rows that no mailer of theirs delivers; this suite's
  // mailers would pick them up and the exact-count assertions below would see them.
  await db('outbox_messages').where({ status: 'queued' }).update({ status: 'failed', last_error: 'left by another test suite' })
  fake = await startSmtpFake()
  fakes.push(fake)
  mailer = await newMailer({ port: fake.port })
  studyId = (await db('studies').first('id')).id
})

afterAll(async () => {
  await Promise.allSettled(mailers.map((m) => m.stop()))
  await Promise.allSettled(fakes.map((f) => f.stop()))
  await Promise.allSettled(dbs.map((d) => d.destroy()))
})

describe('queueMail and the delivery worker', () => {
  it('delivers a queued invitation with its calendar file and records it as sent', async () => {
    const content = invitationMessage({
      expertName: 'Robin Rowe', studyTitle: 'Kestrel Valley', roundTitle: 'Round 1', opensAt: new Date('2026-12-10T09:00:00Z'),
      closesAt: new Date('2026-12-24T17:00:00Z'), publicUrl: 'http://localhost:3000', token: 'tok-1',
      linkExpiresAt: new Date('2026-12-16T09:00:00Z'), quantities: ['Burst rate'], timeZone: 'UTC',
    })
    const ics = roundCalendarFile({
      title: 'Round 1', description: 'Kestrel Valley', start: new Date('2026-12-10T09:00:00Z'), end: new Date('2026-12-24T17:00:00Z'),
      url: 'http://localhost:3000/answer/1',
    })
    const id = await db.transaction((trx) =>
      queueMail(trx, { to: 'robin.rowe@kestrel.example', toName: 'Robin Rowe', ...content, ics, kind: 'invitation', studyId, roundId: 1 }))
    const queued = await db('outbox_messages').where({ id }).first()
    expect(queued.status).toBe('queued')
    expect(queued.attempts).toBe(0)

    await mailer.kick([id])
    const row = await waitFor('the invitation to be sent', async () => {
      const r = await db('outbox_messages').where({ id }).first()
      return r.status === 'sent' && r
    })
    expect(row.attempts).toBe(1)
    expect(row.last_error).toBeNull()
    expect(row.sent_at).toBeInstanceOf(Date)
    expect(row.message_id).toMatch(new RegExp(`^<outbox-${id}-\\d+@priorsmith\\.local>$`))

    const got = received(content.subject)
    expect(got).toHaveLength(1)
    const m = got[0]
    expect(m.to).toBe('robin.rowe@kestrel.example')
    expect(m.toHeader).toBe('"Robin Rowe" <robin.rowe@kestrel.example>')
    expect(m.from).toBe('"Priorsmith" <no-reply@priorsmith.local>')
    expect(m.messageId).toBe(row.message_id)
    expect(m.text).toContain('http://localhost:3000/invite/tok-1')
    expect(m.html).toContain('href="http://localhost:3000/invite/tok-1"')
    expect(m.attachments).toHaveLength(1)
    expect(m.attachments[0].filename).toBe('round.ics')
    expect(m.attachments[0].contentType).toBe('text/calendar')
    expect(m.attachments[0].content).toContain('BEGIN:VCALENDAR')
    expect(m.attachments[0].content).toContain('DTSTART:20261210T090000Z')

    const outbox = await listOutbox(db, { studyId })
    expect(outbox[0]).toMatchObject({
      id, kind: 'invitation', to: 'robin.rowe@kestrel.example', toName: 'Robin Rowe', subject: content.subject,
      status: 'sent', attempts: 1, lastError: null,
    })
    expect(new Date(outbox[0].sentAt!).getTime()).toBeGreaterThan(0)
  })

  it('does not send a message whose transaction rolled back', async () => {
    const subject = 'rolled back message'
    await expect(db.transaction(async (trx) => {
      await queueMail(trx, { to: 'nobody@kestrel.example', subject, text: 'never', kind: 'test' })
      throw new Error('the causing change failed')
    })).rejects.toThrow('the causing change failed')
    expect(await db('outbox_messages').where({ subject }).count<{ count: string }[]>('id as count')).toEqual([{ count: '0' }])
  })

  it('rejects an invalid address before anything is stored', async () => {
    await expect(queueMail(db, { to: 'not an address', subject: 's', text: 't', kind: 'test' })).rejects.toThrow('not a valid e-mail address')
  })

  it('keeps every message while the SMTP server is down and delivers each exactly once after it restarts', async () => {
    const port = fake.port
    await fake.stop()
    expect(fake.running).toBe(false)
    const subjects = [1, 2, 3, 4, 5].map((i) => `fault test message ${i}`)
    const ids = await queueMany(subjects, { studyId })
    await mailer.kick(ids)

    // Each message has been tried, failed, and is waiting for its retry.
    const failed = await waitFor('a failed first attempt on every message', async () => {
      const rows = await rowsOf(ids)
      return rows.every((r) => r.attempts >= 1) && rows
    })
    for (const r of failed) {
      expect(r.status).toBe('queued')
      expect(r.last_error).toMatch(/ECONNREFUSED|ESOCKET|ECONNECTION|connect/i)
    }
    const outboxWhileDown = await listOutbox(db, { studyId })
    expect(outboxWhileDown.filter((e) => ids.includes(e.id)).every((e) => e.status === 'queued' && e.lastError)).toBe(true)
    expect(subjects.flatMap(received)).toHaveLength(0)

    await fake.start()
    expect(fake.port).toBe(port)
    const sent = await waitFor('every message to be sent after the restart', async () => {
      const rows = await rowsOf(ids)
      return rows.every((r) => r.status === 'sent') && rows
    })
    for (const r of sent) {
      expect(r.attempts).toBeGreaterThanOrEqual(2)
      expect(r.last_error).toBeNull()
    }
    // Give any stray duplicate a moment to arrive, then count.
    await new Promise((r) => setTimeout(r, 1500))
    for (const s of subjects) expect(received(s), s).toHaveLength(1)
    expect(fake.messages.filter((m) => m.subject.startsWith('fault test message')).map((m) => m.subject).sort()).toEqual(subjects)
  }, 60_000)

  it('lets two app instances share the queue without sending anything twice', async () => {
    const other = await newMailer({ port: fake.port, db: newDb() })
    const subjects = Array.from({ length: 10 }, (_, i) => `shared queue message ${i + 1}`)
    const ids = await queueMany(subjects)
    // Both instances are woken for every message, and one also tries to deliver each directly.
    const direct = await Promise.all([mailer.kick(ids), other.kick(ids), ...ids.map((id) => other.deliverNow(id))])
    const outcomes = direct.slice(2)
    expect(outcomes.every((o) => o === 'sent' || o === 'already-sent')).toBe(true)
    await waitFor('all ten to be sent', async () => (await rowsOf(ids)).every((r) => r.status === 'sent'))
    await new Promise((r) => setTimeout(r, 1500))
    for (const s of subjects) expect(received(s), s).toHaveLength(1)
    const rows = await rowsOf(ids)
    expect(rows.every((r) => r.attempts === 1)).toBe(true)
  }, 45_000)

  it('delivers a message whose kick was lost, through the sweeper', async () => {
    const sweeping = await newMailer({ port: fake.port, db: newDb(), sweepIntervalMs: 1000 })
    const [id] = await queueMany(['message never kicked'])
    await waitFor('the sweeper to deliver it', async () => (await db('outbox_messages').where({ id }).first()).status === 'sent')
    expect(received('message never kicked')).toHaveLength(1)
    await sweeping.stop()
  }, 30_000)

  it('marks a message failed once its retries are used up', async () => {
    // Every worker shares the queue, so the server is down for all of them; the job carries retryLimit 1.
    await fake.stop()
    try {
      const giving = await newMailer({ port: fake.port, retryLimit: 1 })
      const [id] = await queueMany(['message to an unreachable server'])
      await giving.kick([id])
      const row = await waitFor('the message to be marked failed', async () => {
        const r = await db('outbox_messages').where({ id }).first()
        return r.status === 'failed' && r
      })
      expect(row.attempts).toBe(2)
      expect(row.last_error).toMatch(/ECONNREFUSED|connect/i)
      expect(row.sent_at).toBeNull()
      await fake.start()
      // A failed message is neither sent by a direct delivery nor picked up by a sweep.
      expect(await mailer.deliverNow(id)).toBe('failed-earlier')
      expect(received('message to an unreachable server')).toHaveLength(0)
      const [entry] = (await listOutbox(db, { studyId: null })).filter((e) => e.id === id)
      expect(entry).toMatchObject({ status: 'failed', attempts: 2, sentAt: null })
      await giving.stop()

      // The analyst's "try again": back in the queue, delivered once, history kept in attempts.
      expect(await requeueFailed(db, [id])).toEqual([id])
      expect(await requeueFailed(db, [id])).toEqual([])
      await mailer.kick([id])
      const sent = await waitFor('the requeued message to be sent', async () => {
        const r = await db('outbox_messages').where({ id }).first()
        return r.status === 'sent' && r
      })
      expect(sent.attempts).toBe(3)
      expect(received('message to an unreachable server')).toHaveLength(1)
    } finally {
      await fake.start()
    }
  }, 30_000)
})

describe('/api/dev/mailbox router', () => {
  /** The router behind a stand-in for the session: the `x-test-role` header decides who is signed in. */
  function appWith(box: SmtpFake | null) {
    const app = express()
    app.use((req: Request, _res, next) => {
      const role = req.get('x-test-role')
      ;(req as unknown as { isAuthenticated: () => boolean }).isAuthenticated = () => !!role
      if (role) (req as unknown as { user: unknown }).user = { id: 1, role, email: `${role}@kestrel.example` }
      next()
    })
    app.use('/api/dev/mailbox', devMailboxRouter(box))
    app.use(errorHandler)
    return app
  }

  it('answers 401 when signed out and 403 to every role but admin', async () => {
    const app = appWith(fake)
    expect((await request(app).get('/api/dev/mailbox')).status).toBe(401)
    for (const role of ['analyst', 'expert', 'reviewer']) {
      const res = await request(app).get('/api/dev/mailbox').set('x-test-role', role)
      expect(res.status).toBe(403)
      expect(res.body).toEqual({ error: { message: 'Your role does not allow this' } })
    }
  })

  it('lists the received messages newest first for the admin, and shows one with its attachment', async () => {
    const app = appWith(fake)
    const res = await request(app).get('/api/dev/mailbox').set('x-test-role', 'admin').expect(200)
    expect(res.body).toHaveLength(fake.messages.length)
    expect(res.body[0].id).toBe(fake.messages[fake.messages.length - 1].id)
    const invitation = res.body.find((m: { subject: string }) => m.subject.startsWith('Invitation:'))
    expect(invitation).toMatchObject({ to: 'robin.rowe@kestrel.example', attachments: [{ filename: 'round.ics', contentType: 'text/calendar' }] })
    expect(typeof invitation.receivedAt).toBe('string')
    expect(invitation.attachments[0].content).toBeUndefined()

    const one = await request(app).get(`/api/dev/mailbox/${invitation.id}`).set('x-test-role', 'admin').expect(200)
    expect(one.body.subject).toBe(invitation.subject)
    expect(one.body.attachments[0].content).toContain('BEGIN:VCALENDAR')
    expect((await request(app).get('/api/dev/mailbox/999999').set('x-test-role', 'admin')).status).toBe(404)
  })

  it('answers 404 when no fake runs', async () => {
    const res = await request(appWith(null)).get('/api/dev/mailbox').set('x-test-role', 'admin')
    expect(res.status).toBe(404)
    expect(res.body).toEqual({ error: { message: 'The local mail fake is not running' } })
    const stopped = await startSmtpFake()
    fakes.push(stopped)
    await stopped.stop()
    expect((await request(appWith(stopped)).get('/api/dev/mailbox').set('x-test-role', 'admin')).status).toBe(404)
  })
})
