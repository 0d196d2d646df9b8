import passport, { type PassportStatic } from 'passport'
import { Strategy as LocalStrategy } from 'passport-local'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { findUserById, verifyCredentials } from '../services/users'

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
  p.deserializeUser((id: number, done) => {
    findUserById(db, id).then(
      (user) => done(null, user && !user.disabled ? user : false),
      (err) => done(err),
    )
  })
  return p
}
