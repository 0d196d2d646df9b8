/** Response shapes of GET /api/dev/mailbox: messages caught by the local SMTP fake (admin only, newest first). */

export interface MailboxAttachment {
  filename: string
  contentType: string
}

/** A row of the list. */
export interface MailboxMessage {
  id: number
  to: string
  from: string
  subject: string
  text: string
  html?: string
  receivedAt: string
  attachments: MailboxAttachment[]
}

/** GET /api/dev/mailbox/:id: the message with its headers and the attachments' content (base64). */
export interface MailboxMessageDetail extends Omit<MailboxMessage, 'attachments'> {
  toHeader: string
  messageId: string | null
  attachments: (MailboxAttachment & { content: string })[]
}
