import type { Knex } from 'knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'

/**
 * A closed round is reconciled once every quantity it asked has a reconciled prior, and closed again when one of them
 * is reopened. Run inside the transaction that changed a reconciliation or closed the round, so the status and its
 * audit event commit with the change.
 */
export async function followQuantities(trx: Knex.Transaction, actorId: number | null, where: { quantityId: number } | { roundIds: number[] }): Promise<void> {
  const rounds = await trx('rounds as r').whereIn('r.status', ['closed', 'reconciled'])
    .modify((q) => {
      if ('quantityId' in where) q.whereExists(trx('round_items as i').whereRaw('i.round_id = r.id').where('i.quantity_id', where.quantityId))
      else q.whereIn('r.id', where.roundIds)
    })
    .select('r.id', 'r.study_id', 'r.status',
      trx.raw(`NOT EXISTS (SELECT 1 FROM round_items i LEFT JOIN reconciliations c ON c.quantity_id = i.quantity_id
        WHERE i.round_id = r.id AND (c.status IS DISTINCT FROM 'reconciled')) AS all_reconciled`))
    .forUpdate('r')
  for (const r of rounds) {
    const to = r.all_reconciled ? 'reconciled' : 'closed'
    if (to === r.status) continue
    await trx('rounds').where({ id: r.id }).update({ status: to, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    await recordAudit(trx, { actorId, studyId: r.study_id, action: 'round.status', subject: `round:${r.id}`, details: { roundId: r.id, from: r.status, to } })
  }
}

/** The refusals of every answering call, in their order: a closed round first, then a user not on its panel. */
export function refuseUnlessAnswering(round: { status: string; closes_at: Date }, onPanel: boolean): void {
  if (round.status !== 'open' || round.closes_at.getTime() <= Date.now()) throw new HttpError(409, 'This round is closed; answers can no longer change')
  if (!onPanel) throw new HttpError(403, 'You are not on the panel of this round')
}
