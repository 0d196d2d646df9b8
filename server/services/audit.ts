import { createHash } from 'node:crypto'
import type { Knex } from 'knex'
import type { AuditChainCheck } from '../../shared/api/audit'
import type { Db } from '../db/knex'

export interface AuditInput {
  actorId: number | null
  studyId?: number | null
  action: string
  subject?: string | null
  details?: Record<string, unknown>
}

const GENESIS = '0'.repeat(64)
/** Advisory-lock class of the audit chains; the second key is the study id (0 for events outside any study). */
export const AUDIT_LOCK_CLASS = 7_240_001

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

const ofChain = (q: Knex.QueryBuilder, studyId: number | null) => (studyId === null ? q.whereNull('study_id') : q.where('study_id', studyId))

/** The newest event's hash of one study's chain (null: the chain of events outside any study). */
export async function auditHead(db: Db, studyId: number | null): Promise<string | null> {
  const last = await ofChain(db('audit_events').select('hash'), studyId).orderBy('id', 'desc').first()
  return last?.hash ?? null
}

/**
 * Appends one event inside the caller's transaction, so a change and its event commit together or not at all.
 * Each study has its own chain, kept linear by a transaction-scoped advisory lock on that study alone: work in one
 * study never waits for another's, and events outside any study (sign-ins, accounts) form a chain of their own.
 */
export async function recordAudit(trx: Knex.Transaction, input: AuditInput): Promise<void> {
  const studyId = input.studyId ?? null
  await trx.raw('SELECT pg_advisory_xact_lock(?, ?)', [AUDIT_LOCK_CLASS, studyId ?? 0])
  const prevHash = (await auditHead(trx, studyId)) ?? GENESIS
  const at = new Date().toISOString()
  const event = { at, actorId: input.actorId, studyId, action: input.action, subject: input.subject ?? null, details: input.details ?? {} }
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
}

/** Records one event in a transaction of its own, for events that accompany no other write (sign-in, sign-out). */
export function recordAuditAlone(db: Db, input: AuditInput): Promise<void> {
  return db.transaction((trx) => recordAudit(trx, input))
}

/**
 * Recomputes one study's chain (or the chain of events outside any study); returns the id of the first broken event.
 * Events written before the chains were split per study link to the event just before them in the whole table; such a
 * link is accepted too, and checked against that event.
 */
export async function verifyAuditChain(db: Db, studyId: number | null): Promise<AuditChainCheck> {
  const rows: Record<string, any>[] = await ofChain(db('audit_events').select('*'), studyId).orderBy('id')
  const hashOk = (r: Record<string, any>) => r.hash === auditHash(r.prev_hash, {
    at: new Date(r.at).toISOString(), actorId: r.actor_id, studyId: r.study_id, action: r.action, subject: r.subject, details: r.details,
  })
  const unlinked = rows.filter((r, i) => r.prev_hash !== (i === 0 ? GENESIS : rows[i - 1].hash))
  const predecessors = new Map<number, string>()
  if (unlinked.length) {
    const found = await db.raw(`SELECT a.id, (SELECT b.hash FROM audit_events b WHERE b.id < a.id ORDER BY b.id DESC LIMIT 1) AS prev
      FROM audit_events a WHERE a.id = ANY(?)`, [unlinked.map((r) => r.id)])
    for (const f of found.rows) predecessors.set(Number(f.id), f.prev ?? GENESIS)
  }
  for (const r of rows) {
    const linked = !unlinked.includes(r) || predecessors.get(Number(r.id)) === r.prev_hash
    if (!linked || !hashOk(r)) return { intact: false, events: rows.length, brokenAt: Number(r.id) }
  }
  return { intact: true, events: rows.length, brokenAt: null }
}
