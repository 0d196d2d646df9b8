import { createHash } from 'node:crypto'
import type { Db } from '../db/knex'

export interface AuditInput {
  actorId: number | null
  studyId?: number | null
  action: string
  subject?: string | null
  details?: Record<string, unknown>
}

const GENESIS = '0'.repeat(64)

/** JSON with object keys sorted at every level, so jsonb's key reordering does not change the hash. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`
  }
  return JSON.stringify(value ?? null)
}

/** SHA-256 over the previous hash and the event's canonical fields: tampering breaks the chain. */
export function auditHash(prevHash: string, e: { at: string; actorId: number | null; studyId: number | null; action: string; subject: string | null; details: unknown }): string {
  const canonical = canonicalJson([prevHash, e.at, e.actorId, e.studyId, e.action, e.subject, e.details])
  return createHash('sha256').update(canonical).digest('hex')
}

/** Appends one event; a transaction-scoped advisory lock keeps the chain linear under concurrency. */
export async function recordAudit(db: Db, input: AuditInput): Promise<void> {
  await db.transaction(async (trx) => {
    await trx.raw('SELECT pg_advisory_xact_lock(?)', [7_240_001])
    const last = await trx('audit_events').select('hash').orderBy('id', 'desc').first()
    const prevHash: string = last?.hash ?? GENESIS
    const at = new Date().toISOString()
    const event = {
      at,
      actorId: input.actorId,
      studyId: input.studyId ?? null,
      action: input.action,
      subject: input.subject ?? null,
      details: input.details ?? {},
    }
    await trx('audit_events').insert({
      at,
      actor_id: event.actorId,
      study_id: event.studyId,
      action: event.action,
      subject: event.subject,
      details: canonicalJson(event.details),
      prev_hash: prevHash,
      hash: auditHash(prevHash, event),
    })
  })
}

/** Recomputes the chain; returns the id of the first broken event, or null when intact. */
export async function verifyAuditChain(db: Db): Promise<{ intact: boolean; events: number; brokenAt: number | null }> {
  const rows = await db('audit_events').select('*').orderBy('id')
  let prev = GENESIS
  for (const r of rows) {
    const expected = auditHash(prev, {
      at: new Date(r.at).toISOString(), actorId: r.actor_id, studyId: r.study_id, action: r.action, subject: r.subject, details: r.details,
    })
    if (r.prev_hash !== prev || r.hash !== expected) return { intact: false, events: rows.length, brokenAt: Number(r.id) }
    prev = r.hash
  }
  return { intact: true, events: rows.length, brokenAt: null }
}
