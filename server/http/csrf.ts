import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto'
import { csrfSync } from 'csrf-sync'
import type { Request, RequestHandler, Response } from 'express'

/** Cookie holding the signed token of a client that has not signed in. */
export const ANONYMOUS_CSRF_COOKIE = 'priorsmith.csrf'

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS'])
const headerToken = (req: Request) => req.get('x-csrf-token')

function cookieValue(req: Request, name: string): string | undefined {
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=')
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim())
  }
  return undefined
}

const sameText = (a: string, b: string) => a.length === b.length && timingSafeEqual(Buffer.from(a), Buffer.from(b))

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

  function anonymousToken(res: Response): string {
    const nonce = randomBytes(24).toString('base64url')
    const token = `${nonce}.${sign(nonce)}`
    res.cookie(ANONYMOUS_CSRF_COOKIE, token, { httpOnly: true, sameSite: 'strict', secure: opts.secure, path: '/api' })
    return token
  }

  function anonymousTokenValid(req: Request): boolean {
    const sent = headerToken(req)
    const kept = cookieValue(req, ANONYMOUS_CSRF_COOKIE)
    if (!sent || !kept || !sameText(sent, kept)) return false
    const [nonce, signature, ...rest] = sent.split('.')
    return rest.length === 0 && !!nonce && !!signature && sameText(signature, sign(nonce))
  }

  /** The token for this client: from its session once signed in, else a signed cookie token (no session stored). */
  function generateToken(req: Request, res: Response): string {
    return req.isAuthenticated() ? sync.generateToken(req) : anonymousToken(res)
  }

  const protection: RequestHandler = (req, res, next) => {
    if (SAFE_METHODS.has(req.method)) return next()
    if (req.isAuthenticated()) return sync.csrfSynchronisedProtection(req, res, next)
    return anonymousTokenValid(req) ? next() : next(sync.invalidCsrfTokenError)
  }

  return { protection, generateToken }
}
