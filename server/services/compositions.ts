import type { Knex } from 'knex'
import type { Composition, CompositionDirichlet, CompositionShare } from '../../shared/api/compositions'
import { compositionPrior } from '../../shared/elicitation/composition-prior'
import type { Distribution } from '../../shared/stats/index'
import { COMPOSITION_NOT_PROPORTION_MESSAGE, COMPOSITION_OTHER_STUDY_MESSAGE, DEFAULT_RESIDUAL_LABEL, type CompositionBody } from '../../shared/schemas/compositions'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'

interface CompositionRow {
  id: number
  study_id: number
  name: string
  wording: string
  residual: boolean
  residual_label: string
  version: number
  created_at: Date
  updated_at: Date
}

interface ShareRow {
  composition_id: number
  quantity_id: number
  position: number
  name: string
  symbol: string
}

export function toComposition(r: CompositionRow, shares: CompositionShare[]): Composition {
  return {
    id: r.id,
    studyId: r.study_id,
    name: r.name,
    wording: r.wording,
    shares,
    residual: r.residual,
    residualLabel: r.residual_label,
    version: r.version,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }
}

async function sharesOf(db: Db | Knex.Transaction, compositionIds: number[]): Promise<Map<number, CompositionShare[]>> {
  const map = new Map<number, CompositionShare[]>()
  if (compositionIds.length === 0) return map
  const rows: ShareRow[] = await db('composition_shares as s').join('quantities as q', 'q.id', 's.quantity_id')
    .whereIn('s.composition_id', compositionIds).orderBy(['s.composition_id', 's.position'])
    .select('s.composition_id', 's.quantity_id', 's.position', 'q.name', 'q.symbol')
  for (const r of rows) {
    const list = map.get(r.composition_id) ?? []
    list.push({ quantityId: r.quantity_id, name: r.name, symbol: r.symbol, position: r.position })
    map.set(r.composition_id, list)
  }
  return map
}

export async function listCompositions(db: Db, studyId: number): Promise<Composition[]> {
  const rows: CompositionRow[] = await db('compositions').where({ study_id: studyId }).orderBy('id')
  const shares = await sharesOf(db, rows.map((r) => r.id))
  return rows.map((r) => toComposition(r, shares.get(r.id) ?? []))
}

export async function getComposition(db: Db, id: number): Promise<Composition> {
  const row: CompositionRow | undefined = await db('compositions').where({ id }).first()
  if (!row) throw new HttpError(404, 'Composition not found')
  const shares = await sharesOf(db, [id])
  return toComposition(row, shares.get(id) ?? [])
}

/**
 * Every share must be a quantity of this study on the proportion scale. The whole list is checked and the first
 * problem reported on `quantityIds`, naming the quantity when it is the study's own (another study's is not named).
 */
async function assertShares(db: Db | Knex.Transaction, studyId: number, quantityIds: number[]): Promise<void> {
  const rows: { id: number; study_id: number; name: string; support_kind: string }[] =
    await db('quantities').whereIn('id', quantityIds).select('id', 'study_id', 'name', 'support_kind')
  const byId = new Map(rows.map((r) => [r.id, r]))
  for (const id of quantityIds) {
    const q = byId.get(id)
    if (!q || q.study_id !== studyId) throw new HttpError(400, COMPOSITION_OTHER_STUDY_MESSAGE, { quantityIds: COMPOSITION_OTHER_STUDY_MESSAGE })
    if (q.support_kind !== 'proportion') {
      const message = `“${q.name}” is not a proportion. ${COMPOSITION_NOT_PROPORTION_MESSAGE}.`
      throw new HttpError(400, message, { quantityIds: message })
    }
  }
}

function columns(body: CompositionBody) {
  return {
    name: body.name,
    wording: body.wording,
    residual: body.residual === true,
    residual_label: body.residual === true ? body.residualLabel || DEFAULT_RESIDUAL_LABEL : '',
  }
}

async function writeShares(trx: Knex.Transaction, compositionId: number, quantityIds: number[]): Promise<void> {
  await trx('composition_shares').where({ composition_id: compositionId }).delete()
  await trx('composition_shares').insert(quantityIds.map((quantityId, i) => ({ composition_id: compositionId, quantity_id: quantityId, position: i + 1 })))
}

export async function createComposition(db: Db, user: User, studyId: number, body: CompositionBody): Promise<Composition> {
  const id = await db.transaction(async (trx) => {
    await assertShares(trx, studyId, body.quantityIds)
    const [r] = await trx('compositions').insert({ ...columns(body), study_id: studyId }).returning('id')
    await writeShares(trx, r.id, body.quantityIds)
    await recordAudit(trx, {
      actorId: user.id, studyId, action: 'composition.create', subject: `composition:${r.id}`,
      details: { name: body.name, quantityIds: body.quantityIds, residual: body.residual === true },
    })
    return r.id as number
  })
  return getComposition(db, id)
}

export async function updateComposition(db: Db, user: User, id: number, body: CompositionBody & { version: number }): Promise<Composition> {
  await db.transaction(async (trx) => {
    const before: CompositionRow | undefined = await trx('compositions').where({ id }).forUpdate().first()
    if (!before) throw new HttpError(404, 'Composition not found')
    await assertShares(trx, before.study_id, body.quantityIds)
    const n = await trx('compositions').where({ id, version: body.version }).update({ ...columns(body), version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this composition since you opened it; reload to see their version')
    const beforeIds = (await trx('composition_shares').where({ composition_id: id }).orderBy('position').select('quantity_id')).map((r) => r.quantity_id as number)
    await writeShares(trx, id, body.quantityIds)
    await recordAudit(trx, {
      actorId: user.id, studyId: before.study_id, action: 'composition.update', subject: `composition:${id}`,
      details: { before: { name: before.name, quantityIds: beforeIds, residual: before.residual }, after: { name: body.name, quantityIds: body.quantityIds, residual: body.residual === true } },
    })
  })
  return getComposition(db, id)
}

export async function deleteComposition(db: Db, user: User, id: number): Promise<void> {
  await db.transaction(async (trx) => {
    const before: CompositionRow | undefined = await trx('compositions').where({ id }).forUpdate().first()
    if (!before) throw new HttpError(404, 'Composition not found')
    await trx('compositions').where({ id }).delete()
    await recordAudit(trx, { actorId: user.id, studyId: before.study_id, action: 'composition.delete', subject: `composition:${id}`, details: { name: before.name } })
  })
}

/** The names of the compositions a quantity is a share of (a share must stay on the proportion scale). */
export async function compositionsOfQuantity(db: Db | Knex.Transaction, quantityId: number): Promise<string[]> {
  const rows = await db('composition_shares as s').join('compositions as c', 'c.id', 's.composition_id').where('s.quantity_id', quantityId).orderBy('c.id').select('c.name')
  return rows.map((r) => r.name as string)
}

/** The composition's Dirichlet from its shares' reconciled priors (a share not reconciled yet holds it back). */
export async function compositionDirichlet(db: Db, id: number): Promise<CompositionDirichlet> {
  const c = await getComposition(db, id)
  const recs: { quantity_id: number; status: string; distribution: Distribution | null }[] = await db('reconciliations')
    .whereIn('quantity_id', c.shares.map((s) => s.quantityId)).select('quantity_id', 'status', 'distribution')
  const finals = new Map(recs.filter((r) => r.status === 'reconciled' && r.distribution).map((r) => [r.quantity_id, r.distribution as Distribution]))
  const shares = c.shares.map((s) => ({ quantityId: s.quantityId, name: s.name, symbol: s.symbol, prior: finals.get(s.quantityId) ?? null }))
  return { compositionId: c.id, name: c.name, residual: c.residual, ...compositionPrior(c.name, shares, c.residual ? c.residualLabel : null) }
}
