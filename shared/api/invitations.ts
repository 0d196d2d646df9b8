import type { User } from '../types/index'

/** Request and response shapes of the invitation routes, reached from the e-mailed link before the expert has an account. */

export type InvitationState = 'valid' | 'expired' | 'used' | 'revoked' | 'closed'

/** GET /api/invitations/:token: what the invitation page shows. */
export interface InvitationInfo {
  state: InvitationState
  /** The server's explanation when the link can no longer be used. */
  message: string | null
  email: string
  name: string
  studyTitle: string
  roundTitle: string
  roundId: number
  opensAt: string
  closesAt: string
  expiresAt: string
}

/** Body of POST /api/invitations/:token/accept. */
export interface InvitationAcceptBody {
  name: string
  password: string
}

/** Answer of POST /api/invitations/:token/accept: the new account, signed in, and the round to go to. */
export interface InvitationAccepted {
  user: User
  roundId: number
}
