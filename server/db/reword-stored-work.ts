import { createHash } from 'node:crypto'
import type { Knex } from 'knex'
import { canonicalJson, recordAudit } from '../services/audit'

type Json = any

const contentHash = (content: unknown) => createHash('sha256').update(canonicalJson(content)).digest('hex')

/** How a rewording migration rewrites stored JSON, and the reason its audit events give. */
export interface StoredRewording {
  impactInput(input: Json): Json
  impactResult(result: Json): Json
  recordContent(content: Json): Json
  reason: string
}

/**
 * Rewrites stored impact analyses and stored record snapshots in today's words. A rewritten snapshot (signed-off ones
 * too) gets its new content hash, and its study's audit chain a `record.reworded` event naming the old and new hash;
 * rows the rewording leaves unchanged are not touched, so a second run changes nothing.
 */
export async function rewordStoredWork(knex: Knex, rewording: StoredRewording): Promise<void> {
  const runs = await knex('impact_analyses').select('id', 'input', 'result')
  for (const run of runs) {
    const input = rewording.impactInput(run.input)
    const result = rewording.impactResult(run.result)
    if (canonicalJson(input) === canonicalJson(run.input) && canonicalJson(result) === canonicalJson(run.result)) continue
    await knex('impact_analyses').where({ id: run.id }).update({ input: JSON.stringify(input), result: JSON.stringify(result) })
  }

  const records = await knex('prior_records').whereNotNull('content').select('id', 'study_id', 'version', 'status', 'content', 'content_hash')
  const changed = records.map((r) => ({ ...r, next: rewording.recordContent(r.content) })).filter((r) => canonicalJson(r.next) !== canonicalJson(r.content))
  if (changed.length === 0) return
  // Signed-off snapshots are frozen by a trigger; a rewording is the only change let through, and it is audited.
  await knex.raw('ALTER TABLE prior_records DISABLE TRIGGER prior_records_frozen')
  for (const r of changed) {
    const hash = contentHash(r.next)
    await knex('prior_records').where({ id: r.id }).update({ content: JSON.stringify(r.next), content_hash: hash })
    await recordAudit(knex as Knex.Transaction, {
      actorId: null, studyId: r.study_id, action: 'record.reworded', subject: `record:v${r.version}`,
      details: { reason: rewording.reason, status: r.status, previousContentHash: r.content_hash, contentHash: hash },
    })
  }
  await knex.raw('ALTER TABLE prior_records ENABLE TRIGGER prior_records_frozen')
}
