import type { Request, RequestHandler } from 'express'
import type { Role, User } from '../../shared/types/index'
import { HttpError } from '../http/http-error'

export function currentUser(req: Request): User {
  if (!req.user) throw new HttpError(401, 'Sign in to continue')
  return req.user as unknown as User
}

export const requireAuth: RequestHandler = (req, _res, next) => {
  if (!req.isAuthenticated()) return next(new HttpError(401, 'Sign in to continue'))
  next()
}

/** 401 when not signed in, 403 when the account's role is not one of `roles`. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.isAuthenticated()) return next(new HttpError(401, 'Sign in to continue'))
    const user = req.user as unknown as User
    if (!roles.includes(user.role)) return next(new HttpError(403, 'Your role does not allow this'))
    next()
  }
}
