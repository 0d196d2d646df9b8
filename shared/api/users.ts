import type { Role } from '../types/index'

/** Response shapes of the user and session routes, returned by the server and read by the client. */

export type { User } from '../types/index'

/** A row of GET /api/users/directory: enabled accounts analysts pick members from, no more than a name, e-mail and role. */
export interface DirectoryUser {
  id: number
  displayName: string
  email: string
  role: Role
}

/** GET /api/auth/csrf. */
export interface CsrfToken {
  token: string
}

/** GET /api/config: what the client needs to know about this installation. */
export interface AppConfig {
  /** Whether the local mail fake runs (admins then get a Mailbox page). */
  devMailbox: boolean
}

/** GET /api/health. */
export interface HealthStatus {
  ok: boolean
  db: boolean
}
