import { Router } from 'express'
import rateLimit, { ipKeyGenerator } from 'express-rate-limit'
import type { PassportStatic } from 'passport'
import { signInSchema } from '../../shared/schemas/auth'
import type { User } from '../../shared/types/index'
import { currentUser, requireAuth } from '../auth/guards'
import type { Db } from '../db/knex'
import { HttpError, validateBody } from '../http/errors'
import { recordAudit } from '../services/audit'
import { SESSION_COOKIE } from '../session'

export function authRouter(db: Db, passport: PassportStatic, opts: { signInLimitPerWindow: number; generateCsrfToken: (req: import('express').Request, res: import('express').Response) => string }): Router {
  const r = Router()

  // Counts attempts per client address and e-mail, so one noisy user does not lock out a shared office.
  const signInLimiter = rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: opts.signInLimitPerWindow,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String(req.body?.email ?? '').toLowerCase()}`,
    handler: (_req, res) => {
      res.status(429).json({ error: { message: 'Too many sign-in attempts. Wait 15 minutes and try again.' } })
    },
  })

  r.get('/csrf', (req, res) => {
    res.json({ token: opts.generateCsrfToken(req, res) })
  })

  r.post('/sign-in', signInLimiter, async (req, res, next) => {
    await validateBody(signInSchema, req.body)
    passport.authenticate('local', (err: unknown, user: User | false) => {
      if (err) return next(err)
      if (!user) {
        recordAudit(db, { actorId: null, action: 'auth.sign-in-failed', details: { email: String(req.body.email).toLowerCase() } }).catch(next)
        return next(new HttpError(401, 'E-mail or password is incorrect'))
      }
      // passport 0.7 regenerates the session id here, which also drops the pre-sign-in CSRF token.
      req.logIn(user, (loginErr) => {
        if (loginErr) return next(loginErr)
        recordAudit(db, { actorId: user.id, action: 'auth.sign-in' }).then(() => res.json(user), next)
      })
    })(req, res, next)
  })

  r.post('/sign-out', requireAuth, (req, res, next) => {
    const user = currentUser(req)
    req.logout((err) => {
      if (err) return next(err)
      req.session.destroy((destroyErr) => {
        if (destroyErr) return next(destroyErr)
        res.clearCookie(SESSION_COOKIE, { path: '/' })
        recordAudit(db, { actorId: user.id, action: 'auth.sign-out' }).then(() => res.status(204).end(), next)
      })
    })
  })

  r.get('/me', requireAuth, (req, res) => {
    res.json(currentUser(req))
  })

  return r
}
