import type { Knex } from 'knex'
import { BIDI_CONTROLS } from '../../shared/schemas/users'
import type { OutboxMessage } from '../../shared/api/outbox'

export type MailKind = 'invitation' | 'round-notice' | 'reminder' | 'test' | (string & {})

/** One e-mail to queue; bodies come from ./templates. */
export interface OutgoingMail {
  to: string
  toName?: string | null
  subject: string
  text: string
  html?: string | null
  /** iCalendar file content (./calendar), attached as round.ics. */
  ics?: string | null
  kind: MailKind
  studyId?: number | null
  roundId?: number | null
}

export const OUTBOX_TABLE = 'outbox_messages'

/** Header values must stay on one line, and read as they are (no text-direction controls from names stored earlier). */
const oneLine = (s: string) => s.replace(/[\r\n\t]+/g, ' ').replace(BIDI_CONTROLS, '').trim()

const ADDRESS = /^[^\s@<>",;]+@[^\s@<>",;]+\.[^\s@<>",;]+$/

/**
 * Inserts a 'queued' outbox row and returns its id. Pass the caller's transaction so the message
 * commits (or rolls back) with the change that caused it; after the commit, wake the worker with
 * `mailer.kick([id])` (the sweeper delivers it anyway if the kick is lost).
 */
export async function queueMail(db: Knex | Knex.Transaction, msg: OutgoingMail): Promise<number> {
  const to = oneLine(msg.to)
  if (!ADDRESS.test(to) || to.length > 254) throw new Error(`queueMail: not a valid e-mail address: ${JSON.stringify(msg.to)}`)
  const subject = oneLine(msg.subject)
  if (!subject || subject.length > 300) throw new Error('queueMail: the subject must have 1 to 300 characters')
  if (!msg.kind || msg.kind.length > 40) throw new Error('queueMail: kind must have 1 to 40 characters')
  if (!msg.text) throw new Error('queueMail: the text body is empty')
  const toName = msg.toName ? oneLine(msg.toName).slice(0, 100) || null : null
  const [row] = await db(OUTBOX_TABLE)
    .insert({
      study_id: msg.studyId ?? null,
      round_id: msg.roundId ?? null,
      kind: msg.kind,
      to_address: to,
      to_name: toName,
      subject,
      text_body: msg.text,
      html_body: msg.html ?? null,
      ics: msg.ics ?? null,
      status: 'queued',
    })
    .returning('id')
  return typeof row === 'object' ? Number(row.id) : Number(row)
}

const iso = (d: Date | string | null): string | null => (d == null ? null : new Date(d).toISOString())

/** Outbox rows newest first, for the analyst's view: filter by study (`null`: mail tied to no study) and/or round; `{}` lists all. */
export async function listOutbox(
  db: Knex,
  filter: { studyId?: number | null; roundId?: number; limit?: number } = {},
): Promise<OutboxMessage[]> {
  const q = db(OUTBOX_TABLE)
    .select('id', 'kind', 'to_address', 'to_name', 'subject', 'status', 'attempts', 'last_error', 'created_at', 'sent_at')
    .orderBy([{ column: 'created_at', order: 'desc' }, { column: 'id', order: 'desc' }])
    .limit(filter.limit ?? 500)
  if (filter.studyId !== undefined) {
    if (filter.studyId === null) q.whereNull('study_id')
    else q.where('study_id', filter.studyId)
  }
  if (filter.roundId !== undefined) q.where('round_id', filter.roundId)
  const rows = await q
  return rows.map((r) => ({
    id: r.id,
    kind: r.kind,
    to: r.to_address,
    toName: r.to_name,
    expertLabel: null,
    subject: r.subject,
    status: r.status,
    attempts: r.attempts,
    lastError: r.last_error,
    createdAt: iso(r.created_at)!,
    sentAt: iso(r.sent_at),
  }))
}

/**
 * Puts 'failed' messages back in the queue (an analyst's "try again"); returns the ids it changed.
 * Kick them afterwards. Attempts and the last error are kept, so the history stays visible.
 */
export async function requeueFailed(db: Knex | Knex.Transaction, ids: number[]): Promise<number[]> {
  if (!ids.length) return []
  const rows: { id: number }[] = await db(OUTBOX_TABLE).whereIn('id', ids).andWhere('status', 'failed').update({ status: 'queued' }).returning('id')
  return rows.map((r) => r.id)
}
