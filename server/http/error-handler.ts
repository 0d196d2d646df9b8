import type { ErrorRequestHandler, RequestHandler } from 'express'
import { EngineInputError } from '../../shared/stats/errors'
import { HttpError } from './http-error'
import { UNSTORABLE_MESSAGE } from './validate-body'

export const notFoundApi: RequestHandler = (_req, _res, next) => next(new HttpError(404, 'No such API route'))

/** Connection-level failures (server down, restarting, or dropping connections), as opposed to a bad query. */
function isDatabaseUnavailable(err: { code?: string; message?: string } | undefined): boolean {
  const code = err?.code ?? ''
  return ['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', '57P01', '57P02', '57P03', '08000', '08003', '08006', '08001', '08004'].includes(code)
    || /Connection terminated|connect ECONNREFUSED|Knex: Timeout acquiring a connection|the database system is (starting up|shutting down)/i.test(err?.message ?? '')
}

const UNIQUE_VIOLATION = '23505'
/** PostgreSQL refusing text: an invalid byte sequence (a NUL) or a character it cannot represent. */
const UNSTORABLE_CODES = ['22021', '22P05']

/** Two requests racing past a check-then-insert meet a unique key: the loser hears why, by constraint. */
const UNIQUE_MESSAGES: Record<string, { message: string; field?: string }> = {
  quantities_study_symbol_ci_idx: { message: 'Another quantity in this study uses this symbol', field: 'symbol' },
  quantities_study_id_symbol_unique: { message: 'Another quantity in this study uses this symbol', field: 'symbol' },
  round_panel_round_id_email_unique: { message: 'This expert was added to the panel at the same moment', field: 'email' },
  calibration_answers_round_id_question_id_expert_id_unique: { message: 'This answer was saved from another window or device at the same moment; reload to continue from it' },
  judgements_round_id_quantity_id_expert_id_unique: { message: 'This answer was saved from another window or device at the same moment; reload to continue from it' },
  judgement_versions_judgement_id_version_unique: { message: 'Your answers were submitted from another window or device at the same moment' },
  users_email_lower_idx: { message: 'This e-mail address is already registered', field: 'email' },
  link_reconciliations_link_id_unique: { message: 'Another analyst decided this correlation at the same moment; reload to see their decision' },
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
  if (err instanceof EngineInputError) {
    res.status(400).json({ error: { message: err.message, fields: { [err.field]: err.message } } })
    return
  }
  if (err?.code === UNIQUE_VIOLATION) {
    const known = UNIQUE_MESSAGES[String(err.constraint)]
    res.status(409).json({ error: { message: known?.message ?? 'The same thing was saved by another request at the same moment; reload and try again', ...(known?.field ? { fields: { [known.field]: known.message } } : {}) } })
    return
  }
  if (UNSTORABLE_CODES.includes(err?.code)) {
    res.status(400).json({ error: { message: UNSTORABLE_MESSAGE } })
    return
  }
  if (isDatabaseUnavailable(err)) {
    res.status(503).setHeader('Retry-After', '2').json({ error: { message: 'The database is unavailable for a moment; nothing was saved. Try again shortly.' } })
    return
  }
  console.error(err)
  res.status(500).json({ error: { message: 'Something went wrong on the server; nothing was changed' } })
}
