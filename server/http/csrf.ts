import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto'
import { csrfSync } from 'csrf-sync'
import type { Request, RequestHandler, Response } from 'express'

/** Cookie holding the signed token of a client that has not signed in. */
export const ANONYMOUS_CSRF_COOKIE = 'priorsmith.csrf'

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])
const headerToken = (req: Request) => req.get('x-csrf-token')

/** The token cookie as sent (its value is base64url and a dot, so no decoding is needed). */
function cookieValue(req: Request, name: string): string | undefined {
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=')
    if (eq > 0 && part.slice(0, eq).trim() === name) return part.slice(eq + 1).trim()
  }
  return undefined
}

function sameText(a: string, b: string): boolean {
  const x = Buffer.from(a)
  const y = Buffer.from(b)
  return x.length === y.length && timingSafeEqual(x, y)
}

/**
 * CSRF protection in two forms. A signed-in session keeps a synchronizer token in its stored session (csrf-sync).
 * Before sign-in there is no session to keep it in, and storing one for every anonymous GET /api/auth/csrf would let
 * anyone fill the session table: such a client gets a random nonce signed with the session secret, both in the JSON
 * answer and in an HttpOnly SameSite=Strict cookie, and a write must send the same token in x-csrf-token (a signed
 * double submit: another site can neither read the token nor set the header, and cannot mint a signature).
 */
export function createCsrf(opts: { secret: string; secure: boolean }) {
  const sync = csrfSync({
    getTokenFromRequest: headerToken,
    errorConfig: { statusCode: 403, message: 'Invalid or missing CSRF token; reload the page and try again', code: 'EBADCSRFTOKEN' },
  })
  const sign = (nonce: string) => createHmac('sha256', opts.secret).update(`anonymous-csrf:${nonce}`).digest('base64url')

  const signed = (token: string | undefined): token is string => {
    const [nonce, signature, ...rest] = (token ?? '').split('.')
    return rest.length === 0 && !!nonce && !!signature && sameText(signature, sign(nonce))
  }

  /** The client's current token when its cookie holds a valid one (other tabs keep working), else a new one. */
  function anonymousToken(req: Request, res: Response): string {
    const kept = cookieValue(req, ANONYMOUS_CSRF_COOKIE)
    if (signed(kept)) return kept
    const nonce = randomBytes(24).toString('base64url')
    const token = `${nonce}.${sign(nonce)}`
    res.cookie(ANONYMOUS_CSRF_COOKIE, token, { httpOnly: true, sameSite: 'strict', secure: opts.secure, path: '/api' })
    return token
  }

  function anonymousTokenValid(req: Request): boolean {
    const sent = headerToken(req)
    const kept = cookieValue(req, ANONYMOUS_CSRF_COOKIE)
    return !!sent && !!kept && sameText(sent, kept) && signed(sent)
  }

  /** The token for this client: from its session once signed in, else a signed cookie token (no session stored). */
  function generateToken(req: Request, res: Response): string {
    return req.isAuthenticated() ? sync.generateToken(req) : anonymousToken(req, res)
  }

  const protection: RequestHandler = (req, res, next) => {
    if (SAFE_METHODS.has(req.method)) return next()
    if (req.isAuthenticated()) return sync.csrfSynchronisedProtection(req, res, next)
    return anonymousTokenValid(req) ? next() : next(sync.invalidCsrfTokenError)
  }

  return { protection, generateToken }
}
