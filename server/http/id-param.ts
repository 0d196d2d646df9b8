import { HttpError } from './http-error'

/** A positive integer route parameter, or null. */
export function idOrNull(value: unknown): number | null {
  const n = Number(value)
  return Number.isSafeInteger(n) && n > 0 ? n : null
}

/** Parses a positive integer route parameter, or answers 404. */
export function idParam(value: unknown, what = 'Resource'): number {
  const n = idOrNull(value)
  if (n === null) throw new HttpError(404, `${what} not found`)
  return n
}
