import type { MailboxMessage, MailboxMessageDetail } from '@shared/api/mailbox'
import { api } from './client'

export type { MailboxMessage, MailboxMessageDetail } from '@shared/api/mailbox'

export const mailboxApi = {
  list: () => api.get<MailboxMessage[]>('/api/dev/mailbox'),
  get: (id: number) => api.get<MailboxMessageDetail>(`/api/dev/mailbox/${id}`),
}
