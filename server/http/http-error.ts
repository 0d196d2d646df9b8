/** An error with an HTTP status and, for 400s, messages per field; `details` adds structured facts (a file's line and column…). */
export class HttpError extends Error {
  constructor(public status: number, message: string, public fields?: Record<string, string>, public details?: Record<string, unknown>) {
    super(message)
  }
}
