import connectPgSimple from 'connect-pg-simple'
import type { Request } from 'express'
import session, { type SessionData } from 'express-session'
import pg from 'pg'
import type { User } from '../shared/types/index'
import { waitUntilIdle } from './idle'
import { sessionWithAccount } from './services/users'

export const SESSION_COOKIE = 'priorsmith.sid'

/** Where a loaded session carries its account from the store's `get` to `createSession` (which sees the request). */
const ACCOUNT = Symbol('account read with the session')
type LoadedSession = SessionData & { [ACCOUNT]?: User | null }
/** The account read together with each request's session, for passport's deserializer. */
const accountsRead = new WeakMap<Request, User | null>()

/**
 * The account read with this request's stored session (null: none), or undefined when the session was not loaded
 * from the store on this request. Saves the separate users query passport would otherwise run on every request.
 */
export function accountReadWithSession(req: Request): User | null | undefined {
  return accountsRead.get(req)
}

/** Sessions stored in PostgreSQL (connect-pg-simple), on a pool of their own. */
export function createSessionMiddleware(opts: { databaseUrl: string; secret: string; secure: boolean }) {
  const PgStore = connectPgSimple(session)
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10 })
  pool.on('error', (err) => console.error('session pool error:', err.message))

  /** connect-pg-simple's store whose `get` also reads the session's account, in the same query. */
  class SessionAndAccountStore extends PgStore {
    private pruning = false

    override get(sid: string, fn: (err: unknown, session?: SessionData | null) => void): void {
      // connect-pg-simple starts its pruning timer on its own get; this get replaces it, so start it here (the first
      // prune runs at once, then every interval).
      if (!this.pruning) {
        this.pruning = true
        this.pruneSessions()
      }
      sessionWithAccount(pool, sid, Math.ceil(Date.now() / 1000)).then(
        (found) => {
          if (!found) return fn(null, null)
          const loaded: LoadedSession = found.sess
          loaded[ACCOUNT] = found.account
          fn(null, loaded)
        },
        (err) => fn(err),
      )
    }

    override createSession(req: Request, sess: LoadedSession) {
      if (ACCOUNT in sess) {
        accountsRead.set(req, sess[ACCOUNT] ?? null)
        delete sess[ACCOUNT]
      }
      return super.createSession(req, sess)
    }
  }

  // rolling is off, so a session's expiry is fixed at sign-in and the store's touch would rewrite the same expiry on
  // every request: one UPDATE per autosave for nothing.
  const store = new SessionAndAccountStore({ pool, tableName: 'session', pruneSessionInterval: 15 * 60, disableTouch: true })
  const middleware = session({
    name: SESSION_COOKIE,
    store,
    secret: opts.secret,
    resave: false,
    saveUninitialized: false,
    rolling: false,
    cookie: { httpOnly: true, sameSite: 'lax', secure: opts.secure, maxAge: 8 * 60 * 60 * 1000, path: '/' },
  })
  async function close() {
    // Requests already past the HTTP server may still be reading their session: let them finish first.
    await waitUntilIdle(() => pool.waitingCount === 0 && pool.idleCount === pool.totalCount, 5000)
    await store.close()
    await pool.end()
  }
  return { middleware, close }
}
