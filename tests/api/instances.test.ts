// Several app instances on one PostgreSQL database and one pg-boss queue, as a deployment behind a load balancer runs
// them. Two real processes started as production starts them (`tsx server/index.ts`, on two ports) serve the same users
// (sessions and CSRF tokens live in PostgreSQL) and both workers deliver the mail, each message exactly once. Around
// that: instances starting together on a new database all come up, and the round schedule every instance runs each
// minute sends one set of reminders when two run it at the same moment.
import { spawn, type ChildProcess } from 'node:child_process'
import net, { type AddressInfo } from 'node:net'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { AppContext } from '../../server/context'
import { createDb, type Db } from '../../server/db/knex'
import { createMailer, MAIL_QUEUE, PGBOSS_SCHEMA } from '../../server/mail/mailer'
import { startSmtpFake, type SmtpFake } from '../../server/mail/smtp-fake'
import { localMailConfig } from '../../server/mail/transport'
import { runRoundSchedule } from '../../server/services/rounds'
import { DEMO_PASSWORD } from '../../seeds/demo'
import { waitFor } from '../support/wait'

const root = path.resolve(import.meta.dirname, '../..')
const databaseUrl = inject('databaseUrl')
const SESSION_SECRET = 'instances-test-secret'
const day = 24 * 3600 * 1000

/**
 * A transparent TCP relay in front of the shared SMTP fake, one per instance. The fake cannot tell which process
 * handed it a message (both say the same EHLO name from the same address, and nothing in the message names the
 * process), so each instance is pointed at its own relay and the relay notes the RCPT TO of every message it carries.
 * The bytes reach the one fake unchanged.
 */
interface Relay {
  port: number
  /** Envelope recipients of the messages that passed through, in order. */
  recipients: string[]
  close(): Promise<void>
}

async function startRelay(targetPort: number): Promise<Relay> {
  const recipients: string[] = []
  const sockets = new Set<net.Socket>()
  const server = net.createServer((client) => {
    const upstream = net.connect(targetPort, '127.0.0.1')
    for (const s of [client, upstream]) {
      sockets.add(s)
      s.on('close', () => sockets.delete(s))
    }
    client.on('error', () => upstream.destroy())
    upstream.on('error', () => client.destroy())
    client.pipe(upstream)
    upstream.pipe(client)
    // SMTP commands are lines; after DATA the message runs to CRLF.CRLF and is not read for commands.
    let buf = ''
    let inData = false
    client.on('data', (chunk: Buffer) => {
      buf += chunk.toString('latin1')
      for (;;) {
        if (inData) {
          const end = buf.indexOf('\r\n.\r\n')
          if (end < 0) {
            buf = buf.slice(-4)
            break
          }
          buf = buf.slice(end + 5)
          inData = false
        } else {
          const eol = buf.indexOf('\r\n')
          if (eol < 0) break
          const line = buf.slice(0, eol)
          buf = buf.slice(eol + 2)
          const rcpt = /^RCPT TO:\s*<([^>]*)>/i.exec(line)
          if (rcpt) recipients.push(rcpt[1].toLowerCase())
          if (/^DATA$/i.test(line)) inData = true
        }
      }
    })
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  return {
    port: (server.address() as AddressInfo).port,
    recipients,
    close: async () => {
      for (const s of sockets) s.destroy()
      await new Promise((resolve) => server.close(resolve))
    },
  }
}

async function freePort(): Promise<number> {
  const s = net.createServer()
  await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', resolve))
  const { port } = s.address() as AddressInfo
  await new Promise((resolve) => s.close(resolve))
  return port
}

interface Instance {
  name: string
  base: string
  proc: ChildProcess
  /** stdout and stderr, kept to explain a failure. */
  output: string[]
  exited: Promise<number | null>
}

/** One app process as production runs it; SMTP_HOST makes it use the shared fake (through its relay) instead of its own. */
function spawnInstance(name: string, port: number, smtpPort: number): Instance {
  const proc = spawn(path.join(root, 'node_modules/.bin/tsx'), ['server/index.ts'], {
    cwd: root,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      NODE_ENV: 'production', PORT: String(port), PUBLIC_URL: `http://localhost:${port}`, DATABASE_URL: databaseUrl,
      SESSION_SECRET, SIGN_IN_LIMIT: '1000',
      // The fake offers no TLS; SMTP_REQUIRE_TLS=0 is the setting for a trusted relay without it.
      SMTP_HOST: '127.0.0.1', SMTP_PORT: String(smtpPort), SMTP_SECURE: '0', SMTP_REQUIRE_TLS: '0', SMTP_USER: '', SMTP_PASS: '',
    },
  })
  const output: string[] = []
  proc.stdout!.on('data', (d: Buffer) => output.push(d.toString()))
  proc.stderr!.on('data', (d: Buffer) => output.push(d.toString()))
  const exited = new Promise<number | null>((resolve) => proc.once('exit', (code) => resolve(code)))
  return { name, base: `http://127.0.0.1:${port}`, proc, output, exited }
}

async function waitHealthy(inst: Instance, deadlineMs = 25_000) {
  let gone = false
  void inst.exited.then(() => { gone = true })
  const until = Date.now() + deadlineMs
  for (;;) {
    if (gone) throw new Error(`instance ${inst.name} exited during start:\n${inst.output.join('')}`)
    const ok = await fetch(`${inst.base}/api/health`).then((r) => r.ok, () => false)
    if (ok) return
    if (Date.now() > until) throw new Error(`instance ${inst.name} not healthy after ${deadlineMs} ms:\n${inst.output.join('')}`)
    await new Promise((r) => setTimeout(r, 200))
  }
}

/** SIGTERM (the app's graceful shutdown), then wait for the exit; a process that hangs is killed after 20 s. */
async function stopInstance(inst: Instance) {
  if (inst.proc.exitCode === null && inst.proc.signalCode === null) {
    inst.proc.kill('SIGTERM')
    const timer = setTimeout(() => inst.proc.kill('SIGKILL'), 20_000)
    await inst.exited
    clearTimeout(timer)
  }
  // Not a failure of what this file proves, but worth seeing: the output says why the shutdown was not clean.
  if (inst.proc.exitCode !== 0) console.warn(`[instances] ${inst.name} exited with ${inst.proc.exitCode ?? inst.proc.signalCode}:\n${inst.output.join('')}`)
}

interface Reply {
  status: number
  body: any
}

/**
 * A browser's view of the app: one cookie jar and one CSRF token, sent to whichever instance the request goes to
 * (a browser sends the same cookie to both, since cookies ignore the port; a load balancer would do the same).
 */
class Browser {
  cookie = ''
  token = ''
  async send(inst: Instance, method: string, url: string, body?: unknown, opts: { cookie?: string; token?: string } = {}): Promise<Reply> {
    const cookie = opts.cookie ?? this.cookie
    const headers: Record<string, string> = {}
    if (cookie) headers.cookie = cookie
    if (method !== 'GET') headers['x-csrf-token'] = opts.token ?? this.token
    if (body !== undefined) headers['content-type'] = 'application/json'
    const res = await fetch(`${inst.base}${url}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
    const set = res.headers.getSetCookie()[0]?.split(';')[0]
    // A cleared cookie comes back empty; the jar keeps the old one so the test can show the server forgot it.
    if (set && !set.endsWith('=')) this.cookie = set
    const text = await res.text()
    return { status: res.status, body: text ? JSON.parse(text) : null }
  }
  async csrf(inst: Instance): Promise<string> {
    const r = await this.send(inst, 'GET', '/api/auth/csrf')
    if (r.status !== 200) throw new Error(`csrf on ${inst.name}: ${r.status}`)
    this.token = r.body.token
    return this.token
  }
  async signIn(inst: Instance, email: string) {
    await this.csrf(inst)
    const r = await this.send(inst, 'POST', '/api/auth/sign-in', { email, password: DEMO_PASSWORD })
    if (r.status !== 200) throw new Error(`sign-in as ${email} on ${inst.name}: ${r.status} ${JSON.stringify(r.body)}`)
    // passport regenerates the session on sign-in, which drops the token fetched before it.
    await this.csrf(inst)
  }
  /** A call that must succeed with `status`; returns the body. */
  async ok(inst: Instance, method: string, url: string, body?: unknown, status = method === 'POST' ? 201 : 200) {
    const r = await this.send(inst, method, url, body)
    if (r.status !== status) throw new Error(`${method} ${url} on ${inst.name}: expected ${status}, got ${r.status} ${JSON.stringify(r.body)}`)
    return r.body
  }
}

let db: Db
let fake: SmtpFake
let relays: Relay[] = []
let instances: Instance[] = []
let A: Instance
let B: Instance
/** Signed in on A before the tests, for the ones that only need an analyst. */
const analyst = new Browser()

beforeAll(async () => {
  db = createDb(databaseUrl)
  // Rows other suites left queued would be swept up by these instances' workers and blur the counts.
  await db('outbox_messages').where({ status: 'queued' }).update({ status: 'failed', last_error: 'left by another test suite' })
  fake = await startSmtpFake()
  relays = [await startRelay(fake.port), await startRelay(fake.port)]
})

afterAll(async () => {
  await Promise.all(instances.map(stopInstance))
  for (const r of relays) await r.close()
  await fake?.stop()
  await db?.destroy()
}, 40_000)

describe('instances starting together on a new database', () => {
  it('all start, none a deadlock victim over creating the queue', async () => {
    // As on the first deployment: a migrated database with no pg-boss schema and no queue yet. A database of its
    // own, so no other suite's jobs or workers are in the way. Before the advisory lock in createMailer().start(),
    // PostgreSQL picked one of the concurrent create_queue calls as a deadlock victim and that instance failed to
    // start: measured, 5 attempts in 10 with two instances and 9 in 10 with four, so four instances three times make
    // a pass without the lock very unlikely.
    const name = 'priorsmith_test_first_start'
    const url = new URL(databaseUrl)
    url.pathname = `/${name}`
    const fresh = url.toString()
    try {
      for (let attempt = 0; attempt < 3; attempt++) {
        await db.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [name])
        await db.raw('CREATE DATABASE ??', [name])
        const migrator = createDb(fresh)
        await migrator.migrate.latest()
        await migrator.destroy()
        const handles = Array.from({ length: 4 }, () => createDb(fresh))
        const mailers = handles.map((h) => createMailer({ databaseUrl: fresh, db: h, transport: localMailConfig(fake.port, {}), log: () => {} }))
        try {
          const started = await Promise.allSettled(mailers.map((m) => m.start()))
          expect(started.map((r) => (r.status === 'rejected' ? String(r.reason) : 'started'))).toEqual(handles.map(() => 'started'))
          const { rows } = await handles[0].raw('SELECT name, policy FROM ??.queue WHERE name = ?', [PGBOSS_SCHEMA, MAIL_QUEUE])
          expect(rows).toEqual([{ name: MAIL_QUEUE, policy: 'short' }])
        } finally {
          await Promise.all(mailers.map((m) => m.stop()))
          await Promise.all(handles.map((h) => h.destroy()))
        }
      }
    } finally {
      await db.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [name])
    }
  })
})

describe('two app processes on one database and queue', () => {
  beforeAll(async () => {
    const [portA, portB] = [await freePort(), await freePort()]
    A = spawnInstance('A', portA, relays[0].port)
    B = spawnInstance('B', portB, relays[1].port)
    instances = [A, B]
    await Promise.all(instances.map((i) => waitHealthy(i)))
    await analyst.signIn(A, 'analyst@kestrel.example')
  }, 40_000)

  describe('users and mail', () => {
    it('serve one session: a sign-in, its CSRF token and a sign-out on either instance hold on the other', async () => {
      expect(A.base).not.toBe(B.base)
      const tab = new Browser()
      await tab.signIn(A, 'analyst@kestrel.example')
      // The session signed in on A is found by B (connect-pg-simple), so B knows who this is.
      expect((await tab.send(B, 'GET', '/api/auth/me')).body).toMatchObject({ email: 'analyst@kestrel.example', role: 'analyst' })
      // csrf-sync keeps the token in the session: B hands out the very token A issued, and accepts it on a write.
      const tokenFromA = tab.token
      expect((await tab.send(B, 'GET', '/api/auth/csrf')).body.token).toBe(tokenFromA)
      const refused = await tab.send(B, 'POST', '/api/studies', { title: 'Forged', context: 'Wrong token.' }, { token: 'not-the-token' })
      expect(refused.status).toBe(403)
      const study = await tab.ok(B, 'POST', '/api/studies', { title: 'Two-instance study', context: 'Written on B, read on A.' }, 201)
      // A write on B is visible from A at once: there is no per-process cache between them.
      expect((await tab.ok(A, 'GET', `/api/studies/${study.id}`)).title).toBe('Two-instance study')
      const quantity = await tab.ok(B, 'POST', `/api/studies/${study.id}/quantities`, {
        name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'positive' },
      })
      expect((await tab.ok(A, 'GET', `/api/quantities/${quantity.id}`))).toMatchObject({ id: quantity.id, symbol: 'flow', unit: 'L/s' })

      // Signing out on B destroys the session row: the cookie signed in on A no longer opens anything on A either.
      const held = tab.cookie
      expect((await tab.send(A, 'GET', '/api/auth/me')).status).toBe(200)
      expect((await tab.send(B, 'POST', '/api/auth/sign-out')).status).toBe(204)
      expect((await tab.send(A, 'GET', '/api/auth/me', undefined, { cookie: held })).status).toBe(401)
      expect((await tab.send(B, 'GET', '/api/auth/me', undefined, { cookie: held })).status).toBe(401)
      // Its CSRF token went with it: a write with the old cookie and token is refused on A.
      expect((await tab.send(A, 'POST', '/api/studies', { title: 'After sign-out', context: 'Must be refused.' }, { cookie: held, token: tokenFromA })).status).toBe(403)
      // Another session of the same user (signed in before the tests) is untouched by this sign-out.
      expect((await analyst.send(B, 'GET', '/api/auth/me')).status).toBe(200)
    })

    it('share the mail: every invitation reaches the one SMTP server exactly once, and both workers sent some', async () => {
      const stamp = Date.now()
      const study = await analyst.ok(A, 'POST', '/api/studies', { title: 'Two-instance mail study', context: 'Invitations sent by two workers.' })
      const quantity = await analyst.ok(B, 'POST', `/api/studies/${study.id}/quantities`, {
        name: 'Household uptake', symbol: 'uptake', unit: '', question: 'What share of households will join the metering scheme?', support: { kind: 'proportion' },
      })
      const round = await analyst.ok(A, 'POST', `/api/studies/${study.id}/rounds`, {
        title: 'Two-instance round', opensAt: new Date(stamp).toISOString(), closesAt: new Date(stamp + 7 * day).toISOString(), items: [{ quantityId: quantity.id, method: 'quantile' }],
      })
      const emails = Array.from({ length: 12 }, (_, i) => `inst-${stamp}-${i}@example.org`)
      // Panel members are added through both instances alternately; the round is opened on B.
      for (const [i, email] of emails.entries()) {
        await analyst.ok(i % 2 ? B : A, 'POST', `/api/rounds/${round.id}/invitations`, { email, name: `Expert ${i}` })
      }
      await analyst.ok(B, 'POST', `/api/rounds/${round.id}/open`, undefined, 200)

      // By address as well: mail.test.ts queues a message under a made-up round id that can be this round's.
      const rows = () => db('outbox_messages').where({ round_id: round.id }).whereIn('to_address', emails).orderBy('id')
      const ids = (await rows()).map((r) => r.id as number)
      expect(ids).toHaveLength(12)
      // Settled: every row sent and every pg-boss job for it completed, so no delivery is still in flight.
      await waitFor('all twelve invitations sent and their jobs completed', async () => {
        const unsent = (await rows()).filter((r) => r.status !== 'sent').length
        const { rows: live } = await db.raw<{ rows: unknown[] }>(
          `SELECT 1 FROM ??.job WHERE singleton_key = ANY(?) AND state <> 'completed'`, [PGBOSS_SCHEMA, ids.map((id) => `mail-${id}`)],
        )
        return unsent === 0 && live.length === 0
      })
      const sent = await rows()
      expect(sent.map((r) => [r.status, r.attempts])).toEqual(emails.map(() => ['sent', 1]))

      // Exactly once at the shared fake: each address once, no extras, each with its own outbox Message-ID.
      const delivered = fake.messages.filter((m) => emails.includes(m.to))
      expect(delivered.map((m) => m.to).sort()).toEqual([...emails].sort())
      expect(new Set(delivered.map((m) => m.messageId)).size).toBe(12)
      expect(delivered.map((m) => m.messageId?.match(/^<outbox-(\d+)-/)?.[1]).map(Number).sort((x, y) => x - y)).toEqual(ids)

      // Which process sent what, from the relays: together they carried each message once, and each carried some.
      // Each worker fetches at most 5 jobs per 2 s poll, so one worker alone needs three polls (≥ 4 s) for twelve jobs,
      // and the other worker polls within any 2 s: the split is guaranteed, not luck.
      const [byA, byB] = relays.map((r) => r.recipients.filter((to) => emails.includes(to)))
      expect([...byA, ...byB].sort()).toEqual([...emails].sort())
      expect(byA.length).toBeGreaterThan(0)
      expect(byB.length).toBeGreaterThan(0)
      console.log(`[instances] invitations sent by instance A: ${byA.length}, by instance B: ${byB.length}`)
    })
  })

  describe('the round schedule run by every instance', () => {
    it('sends one set of reminders and closes each round once when two instances run it at the same moment', async () => {
      const stamp = Date.now()
      const study = await analyst.ok(A, 'POST', `/api/studies`, { title: 'Schedule race study', context: 'runRoundSchedule from two processes.' })
      const quantity = await analyst.ok(A, 'POST', `/api/studies/${study.id}/quantities`, {
        name: 'Burst rate', symbol: 'burst', unit: 'per 100 km', question: 'Mains bursts per 100 km per year?', support: { kind: 'positive' },
      })
      // Reminders due now (48 h before a close 2 h away); four rounds of three, so the two runs overlap in earnest.
      const closesAt = new Date(stamp + 2 * 3600e3)
      const roundIds: number[] = []
      const panel: Record<number, string[]> = {}
      for (let r = 0; r < 4; r++) {
        const round = await analyst.ok(A, 'POST', `/api/studies/${study.id}/rounds`, {
          title: `Race round ${r}`, opensAt: new Date(stamp - 3600e3).toISOString(), closesAt: closesAt.toISOString(), reminderHoursBefore: 48,
          items: [{ quantityId: quantity.id, method: 'quantile' }],
        })
        panel[round.id] = [0, 1, 2].map((i) => `race-${stamp}-${r}-${i}@example.org`)
        for (const email of panel[round.id]) await analyst.ok(B, 'POST', `/api/rounds/${round.id}/invitations`, { email, name: 'Race Expert' })
        await analyst.ok(B, 'POST', `/api/rounds/${round.id}/open`, undefined, 200)
        roundIds.push(round.id)
      }
      const baseline = Number((await db('outbox_messages').max('id as max'))[0].max)

      // Each "instance" is a db handle of its own (its own pool), as each process has; both are connected before the race.
      const handles = [createDb(databaseUrl), createDb(databaseUrl)]
      try {
        await Promise.all(handles.map((h) => h.raw('SELECT 1')))
        const kicked: number[][] = [[], []]
        const ctxs: AppContext[] = handles.map((h, i) => ({ db: h, publicUrl: A.base, kickMail: async (ids: number[]) => { kicked[i].push(...ids) } }))

        const first = await Promise.all(ctxs.map((c) => runRoundSchedule(c)))
        const ours = () => db('outbox_messages').where('id', '>', baseline).whereIn('round_id', roundIds).orderBy('id')
        const reminders = await ours()
        // One message per panel member of each round, no more, and each kicked by exactly one of the two runs.
        expect(reminders.map((m) => `${m.round_id} ${m.to_address}`).sort()).toEqual(roundIds.flatMap((id) => panel[id].map((e) => `${id} ${e}`)).sort())
        const kickedOurs = kicked.map((k) => k.filter((id) => reminders.some((m) => m.id === id)))
        expect([...kickedOurs[0], ...kickedOurs[1]].sort((x, y) => x - y)).toEqual(reminders.map((m) => m.id))
        expect(first[0].reminders + first[1].reminders).toBeGreaterThanOrEqual(12)
        const marked = await db('rounds').whereIn('id', roundIds).pluck('reminder_sent_at')
        expect(marked.every((d) => d instanceof Date)).toBe(true)

        // Past the closing time both runs close the rounds: one close each (one audit event), and no further mail.
        const later = new Date(closesAt.getTime() + 60_000)
        await Promise.all(ctxs.map((c) => runRoundSchedule(c, later)))
        expect(await db('rounds').whereIn('id', roundIds).pluck('status')).toEqual(roundIds.map(() => 'closed'))
        const closes = await db('audit_events').where({ action: 'round.close' }).whereIn('subject', roundIds.map((id) => `round:${id}`)).select('subject')
        expect(closes.map((e) => e.subject).sort()).toEqual(roundIds.map((id) => `round:${id}`).sort())
        expect(await ours()).toHaveLength(reminders.length)
      } finally {
        // The reminders were only recorded, not handed to a worker: keep later suites' mailers from sweeping them up.
        await db('outbox_messages').where('id', '>', baseline).whereIn('round_id', roundIds).where({ status: 'queued' })
          .update({ status: 'failed', last_error: 'instances test: reminders are counted, not delivered' })
        await Promise.all(handles.map((h) => h.destroy()))
      }
    })
  })
})
