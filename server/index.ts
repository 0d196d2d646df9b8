import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { createApp } from './app'
import { createAnalysisWorker } from './compute/analysis-worker'
import { loadConfig } from './config'
import { createDb } from './db/knex'
import { waitUntilIdle } from './idle'
import { createMailer } from './mail/mailer'
import { startSmtpFake, type SmtpFake } from './mail/smtp-fake'
import { localMailConfig, mailConfigFromEnv } from './mail/transport'
import { runRoundSchedule } from './services/rounds'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..')
const config = loadConfig()
const db = createDb(config.databaseUrl)

// Without SMTP_HOST the app runs the local mail fake, readable by admins at /dev/mailbox.
let mailFake: SmtpFake | null = null
let transport = mailConfigFromEnv()
if (!transport) {
  mailFake = await startSmtpFake({ port: Number(process.env.MAIL_FAKE_PORT ?? 0) })
  transport = localMailConfig(mailFake.port)
  console.log(`[priorsmith] local mail fake on 127.0.0.1:${mailFake.port} (no mail leaves this machine)`)
}
const mailer = createMailer({ databaseUrl: config.databaseUrl, db, transport })
await mailer.start()

// Impact analyses go on the queue; this process works it too unless IN_PROCESS_WORKER=0 (then `npm run worker`
// processes, here or on other machines, compute them).
const analysisWorker = config.inProcessWorker ? createAnalysisWorker({ databaseUrl: config.databaseUrl, db, ...config.analysis }) : null
await analysisWorker?.start()
if (!analysisWorker) console.log('[priorsmith] IN_PROCESS_WORKER=0: impact analyses wait for `npm run worker` processes')

const { app, close } = createApp({
  db,
  databaseUrl: config.databaseUrl,
  sessionSecret: config.sessionSecret,
  secureCookies: config.secureCookies,
  signInLimitPerWindow: config.signInLimitPerWindow,
  clientDir: process.env.CLIENT_DIR ?? path.join(root, 'dist'),
  publicUrl: config.publicUrl,
  timeZone: config.timeZone,
  kickMail: (ids) => mailer.kick(ids),
  mailFake,
  analysisTimeLimitSeconds: config.analysis.timeLimitSeconds,
  onAnalysisQueued: () => analysisWorker?.notify(),
})

const ctx = { db, publicUrl: config.publicUrl, kickMail: (ids: number[]) => mailer.kick(ids) }
const schedule = setInterval(() => {
  runRoundSchedule(ctx).catch((err) => console.error('[priorsmith] round schedule:', err.message))
}, 60_000)
schedule.unref()

const server = app.listen(config.port, () => {
  console.log(`[priorsmith] serving app and API on ${config.publicUrl}`)
})

let stopping = false
async function shutdown() {
  if (stopping) return
  stopping = true
  clearInterval(schedule)
  // Finish the requests in flight before the pools they use are closed; idle keep-alive connections go at once,
  // and any left after 10 s are cut.
  const closed = new Promise((resolve) => server.close(resolve))
  server.closeIdleConnections()
  const cut = setTimeout(() => server.closeAllConnections(), 10_000)
  await closed
  clearTimeout(cut)
  // A handler whose client hung up may still be running its queries: let them finish before the pool closes.
  const pool = db.client.pool as { numUsed(): number; numPendingAcquires(): number }
  await waitUntilIdle(() => pool.numUsed() + pool.numPendingAcquires() === 0, 10_000)
  await analysisWorker?.stop()
  await mailer.stop()
  await mailFake?.stop()
  await close()
  await db.destroy()
  process.exit(0)
}
process.on('SIGINT', shutdown)
process.on('SIGTERM', shutdown)
