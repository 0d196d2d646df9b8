import { existsSync } from 'node:fs'
import path from 'node:path'
import express, { type Express } from 'express'
import helmet from 'helmet'
import { createPassport } from './auth/passport'
import { createSignInGuard } from './auth/sign-in-guard'
import type { AppConfig } from '../shared/api/users'
import type { Db } from './db/knex'
import { createCsrf } from './http/csrf'
import { errorHandler, notFoundApi } from './http/error-handler'
import type { AppContext } from './context'
import type { SmtpFake } from './mail/smtp-fake'
import { authRouter } from './routes/auth'
import { calibrationRouter } from './routes/calibration'
import { compositionsRouter } from './routes/compositions'
import { datasetsRouter } from './routes/datasets'
import { devMailboxRouter } from './routes/dev-mailbox'
import { healthRouter } from './routes/health'
import { impactRouter } from './routes/impact'
import { createAnalysisQueue } from './compute/analysis-queue'
import { ComputeThread } from './compute/threads'
import { invitationsRouter } from './routes/invitations'
import { linksRouter } from './routes/links'
import { judgementsRouter } from './routes/judgements'
import { linkReconciliationRouter } from './routes/link-reconciliation'
import { outboxRouter } from './routes/outbox'
import { quantitiesRouter } from './routes/quantities'
import { reconciliationRouter } from './routes/reconciliation'
import { recordsRouter } from './routes/records'
import { roundsRouter } from './routes/rounds'
import { studiesRouter } from './routes/studies'
import { usersRouter } from './routes/users'
import { createSessionMiddleware } from './session'

export interface AppOptions {
  db: Db
  databaseUrl: string
  sessionSecret: string
  secureCookies?: boolean
  /** Sign-in attempts per client address and account in 15 minutes; an address (over every account) or an account (over every address) may fail five times as often. */
  signInLimitPerWindow?: number
  /** How long an answer to an already refused address is held back (default 1 s; tests set 0). */
  holdRefusedSignInMs?: number
  /** Folder of the built client (vite build); served with a fallback to index.html for client routes. */
  clientDir?: string
  /** Address used in e-mailed links. */
  publicUrl?: string
  /** Wakes the mail worker after outbox rows commit (the mailer's kick); omitted, mail waits for the sweeper. */
  kickMail?: (ids: number[]) => Promise<void>
  /** IANA time zone in which exports and record e-mails write dates (APP_TIME_ZONE); default UTC. */
  timeZone?: string
  /** The local SMTP fake, when it runs in this process: enables /api/dev/mailbox. */
  mailFake?: SmtpFake | null
  /** ANALYSIS_TIME_LIMIT_SECONDS as the workers apply it (default 600): the queue's lease on a job is a minute longer. */
  analysisTimeLimitSeconds?: number
  /** Called after an impact analysis is queued (this process's own worker, if it runs one, takes it at once). */
  onAnalysisQueued?: () => void
}

export interface PriorsmithApp {
  app: Express
  close(): Promise<void>
}

/** Builds the Express app; listening is the caller's job (server/index.ts, tests). */
export function createApp(opts: AppOptions): PriorsmithApp {
  const app = express()
  const { db } = opts
  app.disable('x-powered-by')
  app.set('trust proxy', 'loopback')

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          // Served over plain http on localhost: upgrading would send subresources to https and break them.
          'upgrade-insecure-requests': opts.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: opts.secureCookies ? undefined : false,
    }),
  )
  const signInGuard = createSignInGuard({ databaseUrl: opts.databaseUrl, limitPerWindow: opts.signInLimitPerWindow ?? 20, holdRefusedMs: opts.holdRefusedSignInMs })
  // Before sessions, CSRF and body parsing: a flood from an address already refused costs no database work.
  app.use('/api/auth/sign-in', (req, res, next) => (req.method === 'POST' ? signInGuard.refusedAddress(req, res, next) : next()))
  app.use(express.json({ limit: '4mb' }))

  const sessions = createSessionMiddleware({ databaseUrl: opts.databaseUrl, secret: opts.sessionSecret, secure: !!opts.secureCookies })
  app.use('/api', sessions.middleware)
  const passport = createPassport(db)
  app.use('/api', passport.initialize())
  app.use('/api', passport.session())

  const csrf = createCsrf({ secret: opts.sessionSecret, secure: !!opts.secureCookies })

  app.use('/api/health', healthRouter(db))
  app.get('/api/config', (_req, res) => {
    res.json({ devMailbox: !!opts.mailFake?.running } satisfies AppConfig)
  })
  app.use('/api', csrf.protection)
  app.use('/api/auth', authRouter(db, passport, { guard: signInGuard, generateCsrfToken: csrf.generateToken }))
  app.use('/api/users', usersRouter(db))
  const ctx: AppContext = { db, publicUrl: opts.publicUrl ?? 'http://localhost:3000', kickMail: opts.kickMail ?? (async () => {}) }
  app.use('/api/studies', studiesRouter(db))
  app.use('/api/invitations', invitationsRouter(db))
  app.use('/api/dev/mailbox', devMailboxRouter(opts.mailFake ?? null))
  app.use('/api', quantitiesRouter(db))
  app.use('/api', calibrationRouter(db))
  app.use('/api', compositionsRouter(db))
  // Joint draws (up to 100,000 rows of a linked set) take seconds: a compute thread of the web process makes them, so other
  // requests are answered meanwhile. Started on the first download; one download at a time, the next waits its turn.
  const drawsThread = new ComputeThread()
  const analysisTimeLimitMs = (opts.analysisTimeLimitSeconds ?? 600) * 1000
  app.use('/api', linkReconciliationRouter(db, (task) => drawsThread.jointDraws(task, analysisTimeLimitMs)))
  app.use('/api', roundsRouter(ctx))
  app.use('/api', judgementsRouter(db))
  app.use('/api', linksRouter(db))
  app.use('/api', reconciliationRouter(db))
  app.use('/api', datasetsRouter(db))
  const analysisQueue = createAnalysisQueue({ databaseUrl: opts.databaseUrl, db, timeLimitSeconds: opts.analysisTimeLimitSeconds ?? 600, onQueued: opts.onAnalysisQueued })
  app.use('/api', impactRouter(db, analysisQueue))
  app.use('/api', recordsRouter({ ...ctx, timeZone: opts.timeZone ?? 'UTC' }))
  app.use('/api', outboxRouter(db))
  app.use('/api', notFoundApi)

  if (opts.clientDir && existsSync(path.join(opts.clientDir, 'index.html'))) {
    const clientDir = opts.clientDir
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }))
    app.get(/^(?!\/api\/).*/, (_req, res) => {
      res.sendFile(path.join(clientDir, 'index.html'), { headers: { 'Cache-Control': 'no-cache' } })
    })
  }

  app.use(errorHandler)

  return {
    app,
    close: async () => {
      await signInGuard.close()
      await sessions.close()
      await analysisQueue.close()
      await drawsThread.stop()
    },
  }
}
