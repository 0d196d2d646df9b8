import type { Request } from 'express'
import passport, { type PassportStatic } from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { findUserById, verifyCredentials } from '../services/users'
import { accountReadWithSession } from '../session'

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface User {
      id: number
    }
  }
}

/** A passport instance per app, so tests can build several apps on different databases. */
export function createPassport(db: Db): PassportStatic {
  const p = new passport.Passport() as unknown as PassportStatic
  p.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
      verifyCredentials(db, email, password).then(
        (user) => done(null, user ?? false),
        (err) => done(err),
      )
    }),
  )
  p.serializeUser((user, done) => done(null, (user as User).id))
  p.deserializeUser((req: Request, id: number, done: (err: unknown, user?: Express.User | false) => void) => {
    // The session store read the account with the session (one query a request); otherwise read it here.
    const read = accountReadWithSession(req)
    if (read !== undefined && (read === null || read.id === id)) return done(null, read && !read.disabled ? read : false)
    findUserById(db, id).then(
      (user) => done(null, user && !user.disabled ? user : false),
      (err) => done(err),
    )
  })
  return p
}
