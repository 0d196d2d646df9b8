/** Response shapes of the audit trail: GET /api/studies/:id/audit and the record's chain check and change history. */

export interface AuditEvent {
  id: number
  at: string
  action: string
  subject: string | null
  details: Record<string, unknown> | null
  actorName: string
  hash: string
}

/** Whether a study's hash chain is unbroken, and where it breaks first. */
export interface AuditChainCheck {
  intact: boolean
  events: number
  brokenAt: number | null
}

/** An audit event in words: `what` for the action, `subjectText` for what it concerns (experts by label unless names are shown). */
export interface ChangeHistoryEntry {
  at: string
  action: string
  what: string
  subject: string | null
  subjectText: string
  actor: string
  hash: string
}
