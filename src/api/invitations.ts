import type { User } from '@shared/types'
import { api } from './client'

export type InvitationState = 'valid' | 'expired' | 'used' | 'revoked' | 'closed'

/** GET /api/invitations/:token: what the invitation page shows before the expert has an account. */
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

export const invitationsApi = {
  get: (token: string) => api.get<InvitationInfo>(`/api/invitations/${encodeURIComponent(token)}`),
  /** Creates the expert's account; the browser is signed in afterwards (fetch a new CSRF token). */
  accept: (token: string, body: { name: string; password: string }) =>
    api.post<{ user: User; roundId: number }>(`/api/invitations/${encodeURIComponent(token)}/accept`, body),
}
