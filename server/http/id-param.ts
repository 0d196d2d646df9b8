import { HttpError } from './http-error'

/** Parses a positive integer route parameter, or answers 404. */
export function idParam(value: unknown, what = 'Resource'): number {
  const n = Number(value)
  if (!Number.isSafeInteger(n) || n <= 0) throw new HttpError(404, `${what} not found`)
  return n
}
