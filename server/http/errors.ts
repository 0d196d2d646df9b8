import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ValidationError, type AnyObjectSchema, type InferType } from 'yup'

/** An error with an HTTP status and, for 400s, messages per field; `details` adds structured facts (a file's line and column…). */
export class HttpError extends Error {
  constructor(public status: number, message: string, public fields?: Record<string, string>, public details?: Record<string, unknown>) {
    super(message)
  }
}

interface Description {
  type: string
  fields?: Record<string, Description>
  innerType?: Description
}

const SHAPE_MESSAGES: Record<string, string> = { string: 'Must be text', object: 'Must be an object', array: 'Must be a list', number: 'Must be a number', boolean: 'Must be true or false' }

/**
 * Finds values whose JSON shape cannot be what the schema expects (an array where text belongs, an object where a
 * number belongs…) before yup sees them: yup's transforms assume the right shape and would throw instead of reporting.
 */
function shapeErrors(d: Description, value: unknown, path: string, out: Record<string, string>): void {
  if (value === undefined || value === null) return
  const isObject = typeof value === 'object' && !Array.isArray(value)
  const ok = d.type === 'string' ? typeof value !== 'object' : d.type === 'number' || d.type === 'boolean' || d.type === 'date' ? typeof value !== 'object'
    : d.type === 'object' ? isObject : d.type === 'array' ? Array.isArray(value) : true
  if (!ok) {
    out[path || '_'] ??= SHAPE_MESSAGES[d.type] ?? 'Has the wrong type'
    return
  }
  if (d.type === 'object' && d.fields) {
    for (const [k, child] of Object.entries(d.fields)) shapeErrors(child, (value as Record<string, unknown>)[k], path ? `${path}.${k}` : k, out)
  } else if (d.type === 'array' && d.innerType) {
    ;(value as unknown[]).forEach((v, i) => shapeErrors(d.innerType!, v, `${path}[${i}]`, out))
  }
}

const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype'])

/** Keys that could reach an object's prototype are refused wherever they appear (prototype pollution). */
function forbiddenKeys(value: unknown, path: string, out: Record<string, string>, depth = 0): void {
  if (depth > 20 || value === null || typeof value !== 'object') return
  for (const key of Object.keys(value)) {
    const where = Array.isArray(value) ? `${path}[${key}]` : path ? `${path}.${key}` : key
    if (FORBIDDEN_KEYS.has(key)) out[where] = 'This field name is not accepted'
    else forbiddenKeys((value as Record<string, unknown>)[key], where, out, depth + 1)
  }
}

/** Validates a body with a shared yup schema; throws 400 with one message per field. */
export async function validateBody<S extends AnyObjectSchema>(schema: S, body: unknown): Promise<InferType<S>> {
  if (body === null || typeof body !== 'object' || Array.isArray(body)) {
    throw new HttpError(400, 'The request body must be a JSON object')
  }
  const shape: Record<string, string> = {}
  forbiddenKeys(body, '', shape)
  if (Object.keys(shape).length) throw new HttpError(400, 'Some fields need attention', shape)
  shapeErrors(schema.describe() as unknown as Description, body, '', shape)
  if (Object.keys(shape).length) throw new HttpError(400, 'Some fields need attention', shape)
  try {
    return await schema.validate(body, { abortEarly: false, stripUnknown: false })
  } catch (err) {
    if (err instanceof ValidationError) {
      const fields: Record<string, string> = {}
      for (const e of err.inner.length ? err.inner : [err]) {
        const key = e.path || (e.type === 'noUnknown' ? String(e.params?.unknown ?? '_') : '_')
        fields[key] ??= e.message
      }
      throw new HttpError(400, 'Some fields need attention', fields)
    }
    throw err
  }
}

/** Parses a positive integer route parameter, or answers 404. */
export function idParam(value: unknown, what = 'Resource'): number {
  const n = Number(value)
  if (!Number.isSafeInteger(n) || n <= 0) throw new HttpError(404, `${what} not found`)
  return n
}

export const notFoundApi: RequestHandler = (_req, _res, next) => next(new HttpError(404, 'No such API route'))

/** Connection-level failures (server down, restarting, or dropping connections), as opposed to a bad query. */
function isDatabaseUnavailable(err: { code?: string; message?: string } | undefined): boolean {
  const code = err?.code ?? ''
  return ['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', '57P01', '57P02', '57P03', '08000', '08003', '08006', '08001', '08004'].includes(code)
    || /Connection terminated|connect ECONNREFUSED|Knex: Timeout acquiring a connection|the database system is (starting up|shutting down)/i.test(err?.message ?? '')
}

/** The one error handler: every error leaves as `{ error: { message, fields?, …details } }`. */
export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  if (err instanceof HttpError) {
    res.status(err.status).json({ error: { ...err.details, message: err.message, ...(err.fields ? { fields: err.fields } : {}) } })
    return
  }
  const status = typeof err?.status === 'number' ? err.status : typeof err?.statusCode === 'number' ? err.statusCode : 500
  if (err?.type === 'entity.parse.failed') {
    res.status(400).json({ error: { message: 'The request body is not valid JSON' } })
    return
  }
  if (err?.type === 'entity.too.large') {
    res.status(413).json({ error: { message: 'The request body is too large' } })
    return
  }
  // zlib's own words ("incorrect header check") mean nothing to the sender.
  if (typeof err?.code === 'string' && err.code.startsWith('Z_')) {
    res.status(400).json({ error: { message: 'The request body is marked as compressed but could not be decompressed' } })
    return
  }
  if (err?.type === 'encoding.unsupported') {
    res.status(415).json({ error: { message: 'The request body’s Content-Encoding is not supported; send it plain, or gzip or deflate encoded' } })
    return
  }
  if (err?.code === 'EBADCSRFTOKEN' || (status === 403 && /csrf/i.test(String(err?.message)))) {
    res.status(403).json({ error: { message: 'Invalid or missing CSRF token; reload the page and try again' } })
    return
  }
  if (status >= 400 && status < 500) {
    res.status(status).json({ error: { message: String(err.message || 'Bad request') } })
    return
  }
  if (isDatabaseUnavailable(err)) {
    res.status(503).setHeader('Retry-After', '2').json({ error: { message: 'The database is unavailable for a moment; nothing was saved. Try again shortly.' } })
    return
  }
  console.error(err)
  res.status(500).json({ error: { message: 'Something went wrong on the server; nothing was changed' } })
}
