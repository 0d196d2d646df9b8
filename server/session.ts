import connectPgSimple from 'connect-pg-simple'
import session from 'express-session'
import pg from 'pg'
import { waitUntilIdle } from './idle'

export const SESSION_COOKIE = 'priorsmith.sid'

/** Sessions stored in PostgreSQL (connect-pg-simple), on a pool of their own. */
export function createSessionMiddleware(opts: { databaseUrl: string; secret: string; secure: boolean }) {
  const PgStore = connectPgSimple(session)
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10 })
  pool.on('error', (err) => console.error('session pool error:', err.message))
  // rolling is off, so a session's expiry is fixed at sign-in and the store's touch would rewrite the same expiry on
  // every request: one UPDATE per autosave for nothing.
  const store = new PgStore({ pool, tableName: 'session', pruneSessionInterval: 15 * 60, disableTouch: true })
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
