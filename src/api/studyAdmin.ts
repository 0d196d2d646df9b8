import type { AuditEvent } from '@shared/api/audit'
import type { OutboxMessage } from '@shared/api/outbox'
import type { DirectoryUser } from '@shared/api/users'
import { api } from './client'

export type { AuditEvent } from '@shared/api/audit'
export type { OutboxMessage, OutboxStatus } from '@shared/api/outbox'
export type { DirectoryUser } from '@shared/api/users'

export const studyAdminApi = {
  /** Newest first (analysts and reviewers). */
  audit: (studyId: number) => api.get<AuditEvent[]>(`/api/studies/${studyId}/audit`),
  /** The study's e-mail with delivery status (analysts). */
  outbox: (studyId: number) => api.get<OutboxMessage[]>(`/api/studies/${studyId}/outbox`),
  /** Enabled accounts to pick members from (analyst/admin accounts). */
  directory: () => api.get<DirectoryUser[]>('/api/users/directory'),
}
