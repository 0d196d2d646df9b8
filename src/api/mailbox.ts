import { api } from './client'

/** A message caught by the local SMTP fake (GET /api/dev/mailbox, admin only, newest first). */
export interface MailboxMessage {
  id: number
  to: string
  from?: string
  subject: string
  text: string
  html?: string
  receivedAt: string
  attachments: { filename: string; contentType: string }[]
}

export const mailboxApi = {
  list: () => api.get<MailboxMessage[]>('/api/dev/mailbox'),
  get: (id: number) => api.get<MailboxMessage>(`/api/dev/mailbox/${id}`),
}
