import { ApiError, errorMessage } from '@/api/client'

/**
 * Puts the server's field errors (400 `fields`) on the form fields it knows and returns the
 * message to show above the form, or null when every problem landed on a field.
 */
export function applyServerErrors<F extends string>(
  error: unknown,
  knownFields: readonly F[],
  setFieldError: (field: F, message: string) => void,
): string | null {
  if (!(error instanceof ApiError)) return errorMessage(error)
  const unplaced: string[] = []
  for (const [field, message] of Object.entries(error.fields)) {
    if ((knownFields as readonly string[]).includes(field)) setFieldError(field as F, message)
    else unplaced.push(message)
  }
  if (Object.keys(error.fields).length > 0 && unplaced.length === 0) return null
  return [error.message, ...unplaced].join(' ')
}
