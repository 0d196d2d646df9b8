import connectPgSimple from 'connect-pg-simple'
import session from 'express-session'
import pg from 'pg'

export const SESSION_COOKIE = 'priorsmith.sid'

/** Sessions stored in PostgreSQL (connect-pg-simple), on a pool of their own. */
export function createSessionMiddleware(opts: { databaseUrl: string; secret: string; secure: boolean }) {
  const PgStore = connectPgSimple(session)
  const pool = new pg.Pool({ connectionString: opts.databaseUrl, max: 10 })
  pool.on('error', (err) => console.error('session pool error:', err.message))
  const store = new PgStore({ pool, tableName: 'session', pruneSessionInterval: 15 * 60 })
  const middleware = session({
    name: SESSION_COOKIE,
    store,
    secret: opts.secret,
    resave: false,
    saveUninitialized: false,
    rolling: false,
    cookie: { httpOnly: true, sameSite: 'lax', secure: opts.secure, maxAge: 8 * 60 * 60 * 1000, path: '/' },
  })
  return { middleware, close: async () => { await store.close(); await pool.end() } }
}
