import type { InvitationAcceptBody, InvitationAccepted, InvitationInfo } from '@shared/api/invitations'
import { api } from './client'

export type { InvitationAcceptBody, InvitationAccepted, InvitationInfo, InvitationState } from '@shared/api/invitations'

export const invitationsApi = {
  get: (token: string) => api.get<InvitationInfo>(`/api/invitations/${encodeURIComponent(token)}`),
  /** Creates the expert's account; the browser is signed in afterwards (fetch a new CSRF token). */
  accept: (token: string, body: InvitationAcceptBody) =>
    api.post<InvitationAccepted>(`/api/invitations/${encodeURIComponent(token)}/accept`, body),
}
