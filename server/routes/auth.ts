import { Router } from 'express'
import type { PassportStatic } from 'passport'
import { signInSchema } from '../../shared/schemas/auth'
import type { CsrfToken, User } from '../../shared/api/users'
import { currentUser, requireAuth } from '../auth/guards'
import type { SignInGuard } from '../auth/sign-in-guard'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { validateBody } from '../http/validate-body'
import { recordAuditAlone } from '../services/audit'
import { SESSION_COOKIE } from '../session'

export function authRouter(db: Db, passport: PassportStatic, opts: { guard: SignInGuard; generateCsrfToken: (req: import('express').Request, res: import('express').Response) => string }): Router {
  const r = Router()

  r.get('/csrf', (req, res) => {
    res.json({ token: opts.generateCsrfToken(req, res) } satisfies CsrfToken)
  })

  r.post('/sign-in', ...opts.guard.limiters, async (req, res, next) => {
    await validateBody(signInSchema, req.body)
    passport.authenticate('local', (err: unknown, user: User | false) => {
      if (err) return next(err)
      if (!user) {
        // Counted in the bounded failure log: an anonymous flood must not grow the permanent audit chain.
        opts.guard.recordFailure(req).then(() => next(new HttpError(401, 'E-mail or password is incorrect')), next)
        return
      }
      // passport 0.7 regenerates the session id here, which also drops the pre-sign-in CSRF token.
      req.logIn(user, (loginErr) => {
        if (loginErr) return next(loginErr)
        recordAuditAlone(db, { actorId: user.id, action: 'auth.sign-in' }).then(() => res.json(user), next)
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
        recordAuditAlone(db, { actorId: user.id, action: 'auth.sign-out' }).then(() => res.status(204).end(), next)
      })
    })
  })

  r.get('/me', requireAuth, (req, res) => {
    res.json(currentUser(req))
  })

  return r
}
