import { createHash } from 'node:crypto'
import type { Request, RequestHandler } from 'express'
import rateLimit, { ipKeyGenerator, type ClientRateLimitInfo, type Options, type Store } from 'express-rate-limit'
import pg from 'pg'
import { normaliseEmail } from '../../shared/schemas/auth'
import { waitUntilIdle } from '../idle'

const WINDOW_MS = 15 * 60 * 1000
/** Failed sign-ins are kept this long for review, then deleted. */
const FAILURE_RETENTION_DAYS = 90
/** How many times the per-account-and-address limit an address (over all accounts) or an account (over all addresses) may fail. */
export const CEILING_FACTOR = 5
const TOO_MANY = 'Too many sign-in attempts. Wait 15 minutes and try again.'

/** How many refused keys an instance remembers; beyond it the oldest is forgotten and its next hit asks PostgreSQL again. */
const REFUSED_KEYS_REMEMBERED = 10_000

/**
 * express-rate-limit's counters in PostgreSQL, so that every app instance counts the same attempts. One statement per
 * hit: it starts a new window when the old one has passed. A key over its limit is refused until its window ends
 * whatever further hits it gets, so an instance that has seen a key refused remembers until when and answers from
 * memory: a flood from a refused address then costs no database write (other instances learn the same from their own
 * first refused hit, so the limit holds across instances).
 */
class PostgresStore implements Store {
  localKeys = false
  private windowMs = WINDOW_MS
  private limit = Infinity
  private refusedUntil = new Map<string, Date>()
  constructor(private pool: pg.Pool, readonly prefix: string) {}

  init(options: Options) {
    this.windowMs = options.windowMs
    if (typeof options.limit === 'number') this.limit = options.limit
  }

  private rememberRefused(key: string, until: Date) {
    this.refusedUntil.delete(key)
    this.refusedUntil.set(key, until)
    if (this.refusedUntil.size > REFUSED_KEYS_REMEMBERED) this.refusedUntil.delete(this.refusedUntil.keys().next().value!)
  }

  private key(raw: string) {
    return this.prefix + createHash('sha256').update(raw).digest('hex')
  }

  /** Until when `raw` is known here to be refused, or null. */
  knownRefusedUntil(raw: string): Date | null {
    const until = this.refusedUntil.get(this.key(raw))
    return until && until.getTime() > Date.now() ? until : null
  }

  async increment(raw: string): Promise<ClientRateLimitInfo> {
    const key = this.key(raw)
    const until = this.refusedUntil.get(key)
    if (until && until.getTime() > Date.now()) return { totalHits: this.limit + 1, resetTime: until }
    if (until) this.refusedUntil.delete(key)
    const { rows } = await this.pool.query(
      `INSERT INTO rate_limit_hits (key, hits, reset_at) VALUES ($1, 1, now() + make_interval(secs => $2))
       ON CONFLICT (key) DO UPDATE SET
         hits = CASE WHEN rate_limit_hits.reset_at <= now() THEN 1 ELSE rate_limit_hits.hits + 1 END,
         reset_at = CASE WHEN rate_limit_hits.reset_at <= now() THEN EXCLUDED.reset_at ELSE rate_limit_hits.reset_at END
       RETURNING hits, reset_at`,
      [key, this.windowMs / 1000],
    )
    if (rows[0].hits > this.limit) this.rememberRefused(key, rows[0].reset_at)
    return { totalHits: rows[0].hits, resetTime: rows[0].reset_at }
  }

  async decrement(raw: string) {
    await this.pool.query('UPDATE rate_limit_hits SET hits = greatest(hits - 1, 0) WHERE key = $1 AND reset_at > now()', [this.key(raw)])
  }

  async resetKey(raw: string) {
    this.refusedUntil.delete(this.key(raw))
    await this.pool.query('DELETE FROM rate_limit_hits WHERE key = $1', [this.key(raw)])
  }
}

/** The sign-in form's e-mail in its normal form (what the limits count and the account look-up uses). */
const emailOf = (req: Request) => normaliseEmail(typeof req.body?.email === 'string' ? req.body.email : '')
const addressOf = (req: Request) => ipKeyGenerator(req.ip ?? '')

/** How long the answer to an address already refused is held back: a flooding client then gets at most as many answers a second as it has requests in flight. */
const HOLD_REFUSED_MS = 1000
/** Refusals held back at once at most; beyond it they are answered at once (each held answer is one timer and one open socket). */
const MAX_HELD = 512

export interface SignInGuard {
  /**
   * Mounted before the session, CSRF and body handling: an address this instance already knows to be refused is answered
   * 429 there, without a session look-up or any other database work, after a short hold.
   */
  refusedAddress: RequestHandler
  /** Run before the sign-in handler; the first limit reached answers 429 and the others are not counted. */
  limiters: RequestHandler[]
  /** Counts one failed sign-in in the bounded failure log (not the audit chain). */
  recordFailure(req: Request): Promise<void>
  close(): Promise<void>
}

/**
 * Sign-in limits over three keys: the address and account together (a typo-prone user does not lock out a shared
 * office), the address over every account (one client trying many e-mails), and the account over every address
 * (many clients guessing one password). Counters and the failure log live in PostgreSQL on a small pool of their own,
 * so a flood of sign-ins waits there and not on the connections everyone else's requests use.
 */
export function createSignInGuard(opts: { databaseUrl: string; limitPerWindow: number; holdRefusedMs?: number }): SignInGuard {
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 3 })
  pool.on('error', (err) => console.error('sign-in guard pool error:', err.message))
  const limiter = (prefix: string, limit: number, key: (req: Request) => string, onlyFailures: boolean, store = new PostgresStore(pool, prefix)) => rateLimit({
    windowMs: WINDOW_MS,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    identifier: prefix,
    store,
    keyGenerator: key,
    skipSuccessfulRequests: onlyFailures,
    handler: (_req, res) => {
      res.status(429).json({ error: { message: TOO_MANY } })
    },
  })
  const ceiling = opts.limitPerWindow * CEILING_FACTOR
  const addressStore = new PostgresStore(pool, 'address:')
  let held = 0
  const refusedAddress: RequestHandler = (req, res, next) => {
    const until = addressStore.knownRefusedUntil(addressOf(req))
    if (!until) return next()
    const answer = () => {
      res.setHeader('Retry-After', String(Math.max(1, Math.ceil((until.getTime() - Date.now()) / 1000))))
      res.status(429).json({ error: { message: TOO_MANY } })
    }
    if (held >= MAX_HELD || opts.holdRefusedMs === 0) return answer()
    held++
    setTimeout(() => {
      held--
      answer()
    }, opts.holdRefusedMs ?? HOLD_REFUSED_MS).unref()
  }
  const limiters = [
    limiter('address:', ceiling, addressOf, true, addressStore),
    limiter('account:', ceiling, emailOf, true),
    limiter('pair:', opts.limitPerWindow, (req) => `${addressOf(req)}|${emailOf(req)}`, false),
  ]

  async function recordFailure(req: Request) {
    await pool.query(
      `INSERT INTO sign_in_failures (hour, address, email, attempts, last_at) VALUES (date_trunc('hour', now()), $1, $2, 1, now())
       ON CONFLICT (hour, address, email) DO UPDATE SET attempts = sign_in_failures.attempts + 1, last_at = now()`,
      [addressOf(req).slice(0, 64), emailOf(req).slice(0, 254)],
    )
  }

  const prune = () => Promise.all([
    pool.query('DELETE FROM rate_limit_hits WHERE reset_at < now()'),
    pool.query(`DELETE FROM sign_in_failures WHERE hour < now() - make_interval(days => $1)`, [FAILURE_RETENTION_DAYS]),
  ]).catch((err) => console.error('[priorsmith] sign-in guard prune:', err.message))
  const pruning = setInterval(prune, WINDOW_MS)
  pruning.unref()

  return {
    refusedAddress,
    limiters,
    recordFailure,
    close: async () => {
      clearInterval(pruning)
      await waitUntilIdle(() => pool.waitingCount === 0 && pool.idleCount === pool.totalCount, 5000)
      await pool.end()
    },
  }
}
