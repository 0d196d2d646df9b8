/** Response shape of the study outbox route, returned by the server's listing and read by the client. */

export type OutboxStatus = 'queued' | 'sending' | 'sent' | 'failed'

export interface OutboxMessage {
  id: number
  kind: string
  to: string
  toName: string | null
  /** The study-wide label of the expert the message went to; null for anyone not on the study's panels. */
  expertLabel: string | null
  subject: string
  status: OutboxStatus
  attempts: number
  lastError: string | null
  createdAt: string
  sentAt: string | null
}
