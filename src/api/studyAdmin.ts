import type { Role } from '@shared/types'
import type { OutboxMessage } from '@shared/api/outbox'
import { api } from './client'

export type { OutboxMessage, OutboxStatus } from '@shared/api/outbox'

export interface AuditEvent {
  id: number
  at: string
  action: string
  subject: string | null
  details: Record<string, unknown> | null
  actorName: string
  hash: string
}

export interface DirectoryUser {
  id: number
  displayName: string
  email: string
  role: Role
}

export const studyAdminApi = {
  /** Newest first (analysts and reviewers). */
  audit: (studyId: number) => api.get<AuditEvent[]>(`/api/studies/${studyId}/audit`),
  /** The study's e-mail with delivery status (analysts). */
  outbox: (studyId: number) => api.get<OutboxMessage[]>(`/api/studies/${studyId}/outbox`),
  /** Enabled accounts to pick members from (analyst/admin accounts). */
  directory: () => api.get<DirectoryUser[]>('/api/users/directory'),
}
