import type {
  LinkCorrelationSource, LinkedSetView, LinkExpertCorrelation, LinkReconciliationSaved, LinkReconciliationView, StudyLinkedQuantities,
} from '../../shared/api/link-reconciliation'
import {
  correlationRepair, linkedComponents, linkedSetCode, linkedSetMatrix, linkPoolWeights, type ReconciliationWeights,
} from '../../shared/elicitation/linked-sets'
import type { JointDrawsQuery, LinkReconciliationBody } from '../../shared/schemas/link-reconciliation'
import {
  conditionalFromCopulaCorrelation, copulaCorrelationFromConditional, poolCorrelations, type Distribution,
} from '../../shared/stats/index'
import type { User } from '../../shared/types/index'
import type { JointDrawsTask } from '../compute/tasks'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { studyExpertLabels } from './expert-labels'
import { weightedExpertIds } from './reconciliation'

interface LinkRow {
  id: number
  round_id: number
  round_number: number
  round_title: string
  first_quantity_id: number
  second_quantity_id: number
  wording: string
  answered: boolean
}

interface DecisionRow {
  id: number
  link_id: number
  decision: 'confirm' | 'override'
  correlation: number
  pooled_correlation: number | null
  reason: string
  decided_by_name: string
  decided_at: Date
  version: number
}

/**
 * The link each linked pair of the study is reconciled from: of the rounds that linked the pair, the latest in which an
 * expert submitted an answer, else the latest. Listed in round order, then the round's own order.
 */
async function studyLinks(db: Db, studyId: number): Promise<LinkRow[]> {
  const rows: LinkRow[] = await db('round_links as l').join('rounds as r', 'r.id', 'l.round_id').where('r.study_id', studyId)
    .select('l.id', 'l.round_id', 'r.number as round_number', 'r.title as round_title', 'l.first_quantity_id', 'l.second_quantity_id', 'l.wording',
      db.raw(`EXISTS (SELECT 1 FROM link_answers a WHERE a.link_id = l.id AND a.status = 'submitted' AND a.probability IS NOT NULL) AS answered`))
    .orderBy([{ column: 'r.number', order: 'desc' }, { column: 'l.position' }, { column: 'l.id' }])
  const chosen = new Map<string, LinkRow>()
  for (const r of rows) {
    const key = [r.first_quantity_id, r.second_quantity_id].sort((a, b) => a - b).join(':')
    const held = chosen.get(key)
    if (!held || (!held.answered && r.answered)) chosen.set(key, r)
  }
  const order = new Map(rows.map((r, i) => [r.id, i]))
  return [...chosen.values()].sort((a, b) => a.round_number - b.round_number || order.get(a.id)! - order.get(b.id)!)
}

/** Each reconciled quantity's final prior and its experts' normalised weights (equal over the included experts for a consensus). */
async function reconciledQuantities(db: Db, quantityIds: number[]) {
  const recs = await db('reconciliations').whereIn('quantity_id', quantityIds).where({ status: 'reconciled' })
    .select('quantity_id', 'round_id', 'method', 'weights', 'excluded_experts', 'distribution')
  const out = new Map<number, { distribution: Distribution; weights: ReconciliationWeights }>()
  for (const rec of recs) {
    const experts = await weightedExpertIds(db, rec)
    const given: number[] = rec.method !== 'consensus' && rec.weights.length === experts.length ? rec.weights : experts.map(() => 1)
    const total = given.reduce((s, w) => s + w, 0)
    out.set(rec.quantity_id, { distribution: rec.distribution, weights: new Map(experts.map((id, i) => [id, total > 0 ? given[i] / total : 0])) })
  }
  return out
}

function toSaved(r: DecisionRow): LinkReconciliationSaved {
  return {
    decision: r.decision, correlation: r.correlation, pooledCorrelation: r.pooled_correlation, reason: r.reason,
    decidedBy: r.decided_by_name, decidedAt: r.decided_at.toISOString(), version: r.version,
  }
}

/**
 * Every link of the study at reconciliation — the experts' correlations, their pool on Fisher's z scale with the weights
 * of the two quantities' reconciliations, the analyst's decision — and the linked sets they make: each set's correlation
 * matrix, whether it holds together, its repair, the reconciled priors it uses and its model code. The prior record reads this.
 */
export async function studyLinkedQuantities(db: Db, studyId: number): Promise<StudyLinkedQuantities> {
  const links = await studyLinks(db, studyId)
  if (links.length === 0) return { links: [], sets: [] }
  const linkIds = links.map((l) => l.id)
  const quantities: { id: number; name: string; symbol: string }[] = await db('quantities').where({ study_id: studyId }).orderBy(['position', 'id']).select('id', 'name', 'symbol')
  const quantity = new Map(quantities.map((q) => [q.id, q]))
  const answers: { link_id: number; expert_id: number; display_name: string; probability: number; rationale: string }[] = await db('link_answers as a')
    .join('users as u', 'u.id', 'a.expert_id').whereIn('a.link_id', linkIds).where('a.status', 'submitted').whereNotNull('a.probability')
    .orderBy(['a.link_id', 'a.expert_id']).select('a.link_id', 'a.expert_id', 'u.display_name', 'a.probability', 'a.rationale')
  const decisions: DecisionRow[] = await db('link_reconciliations as d').join('users as u', 'u.id', 'd.decided_by').whereIn('d.link_id', linkIds)
    .select('d.*', 'u.display_name as decided_by_name')
  const decisionOf = new Map(decisions.map((d) => [d.link_id, d]))
  const reconciled = await reconciledQuantities(db, [...new Set(links.flatMap((l) => [l.first_quantity_id, l.second_quantity_id]))])
  const labels = await studyExpertLabels(db, studyId)
  const side = (id: number) => ({ quantityId: id, name: quantity.get(id)!.name, symbol: quantity.get(id)!.symbol })

  const views: LinkReconciliationView[] = links.map((l) => {
    const given = answers.filter((a) => a.link_id === l.id)
    const { weights, rule } = linkPoolWeights(given.map((a) => a.expert_id), reconciled.get(l.first_quantity_id)?.weights ?? null, reconciled.get(l.second_quantity_id)?.weights ?? null)
    const experts: LinkExpertCorrelation[] = given.map((a, i) => ({
      expertId: a.expert_id, label: labels.ofUser(a.expert_id), name: a.display_name, probability: a.probability, rationale: a.rationale,
      correlation: copulaCorrelationFromConditional(a.probability), weight: weights[i],
    }))
    const weighted = experts.filter((e) => e.weight > 0)
    const pooled = weighted.length ? poolCorrelations(weighted.map((e) => e.correlation), weighted.map((e) => e.weight)) : null
    const d = decisionOf.get(l.id)
    const saved = d ? toSaved(d) : null
    const source: LinkCorrelationSource = saved ? (saved.decision === 'confirm' ? 'confirmed' : 'overridden') : pooled !== null ? 'pooled' : 'none'
    const correlations = experts.map((e) => e.correlation)
    return {
      linkId: l.id, roundId: l.round_id, roundNumber: l.round_number, roundTitle: l.round_title,
      first: side(l.first_quantity_id), second: side(l.second_quantity_id), wording: l.wording,
      answers: experts, weightRule: rule, pooledCorrelation: pooled, pooledProbability: pooled === null ? null : conditionalFromCopulaCorrelation(pooled),
      spread: correlations.length ? { min: Math.min(...correlations), max: Math.max(...correlations) } : null,
      saved, stale: saved?.decision === 'confirm' && saved.correlation !== pooled,
      correlation: saved ? saved.correlation : pooled ?? 0, source,
    }
  })

  const components = linkedComponents(quantities.map((q) => q.id), views.map((v) => [v.first.quantityId, v.second.quantityId]))
  const sets: LinkedSetView[] = components.map((ids) => {
    const inSet = views.filter((v) => ids.includes(v.first.quantityId))
    const { matrix, unlinked } = linkedSetMatrix(ids, inSet.map((v) => ({ first: v.first.quantityId, second: v.second.quantityId, correlation: v.correlation })))
    const check = correlationRepair(matrix)
    const marginals = ids.map((id) => ({ ...side(id), distribution: reconciled.get(id)?.distribution ?? null }))
    const waitingFor = marginals.filter((m) => !m.distribution).map((m) => m.name)
    return {
      marginals, linkIds: inSet.map((v) => v.linkId), matrix,
      unlinkedPairs: unlinked.map(([a, b]) => ({ first: quantity.get(a)!.name, second: quantity.get(b)!.name })),
      ...check, decided: inSet.every((v) => v.saved !== null), waitingFor,
      modelCode: waitingFor.length ? [] : linkedSetCode(marginals.map((m) => ({ symbol: m.symbol, distribution: m.distribution! })), check.jointMatrix),
    }
  })
  return { links: views, sets }
}

/**
 * Confirms a link's pooled correlation or overrides it with a value and a reason; the decision, its version and its audit
 * event commit together, and a decision taken on a stale version answers 409.
 */
export async function decideLink(db: Db, user: User, studyId: number, linkId: number, body: LinkReconciliationBody): Promise<LinkReconciliationView> {
  const find = async () => (await studyLinkedQuantities(db, studyId)).links.find((l) => l.linkId === linkId)
  const view = await find()
  // A pair linked in several rounds is reconciled from one of its links (studyLinks).
  if (!view) throw new HttpError(409, 'This pair is reconciled from its link in another round (the latest with answers); open that one')
  if (body.decision === 'confirm' && view.pooledCorrelation === null)
    throw new HttpError(400, 'There is no pooled correlation to confirm', { decision: 'No expert with weight has answered this question yet: override with a value and a reason instead' })
  const correlation = body.decision === 'confirm' ? view.pooledCorrelation! : body.correlation!
  const row = { decision: body.decision, correlation, pooled_correlation: view.pooledCorrelation, reason: body.decision === 'override' ? body.reason : '', decided_by: user.id }
  await db.transaction(async (trx) => {
    const existing = await trx('link_reconciliations').where({ link_id: linkId }).forUpdate().first()
    let saved
    if (!existing) {
      if (body.version !== 0) throw new HttpError(409, 'This link’s correlation was never decided; reload')
      ;[saved] = await trx('link_reconciliations').insert({ ...row, link_id: linkId, version: 1 }).returning('*')
    } else {
      if (existing.version !== body.version) throw new HttpError(409, 'Another analyst decided this correlation since you opened it; reload to see their decision')
      ;[saved] = await trx('link_reconciliations').where({ id: existing.id }).update({ ...row, decided_at: trx.fn.now(), version: existing.version + 1, updated_at: trx.fn.now() }).returning('*')
    }
    await trx('link_reconciliation_versions').insert({ link_reconciliation_id: saved.id, version: saved.version, snapshot: JSON.stringify(row), saved_by: user.id })
    await recordAudit(trx, {
      actorId: user.id, studyId, action: `link.${body.decision}`, subject: `link:${linkId}`,
      details: { correlation, pooledCorrelation: view.pooledCorrelation, reason: row.reason, version: saved.version },
    })
  })
  return (await find())!
}

/** The linked set a quantity belongs to, refused with 409 when it has none or a quantity of it is not reconciled yet. */
async function readySetOf(db: Db, studyId: number, quantityId: number): Promise<LinkedSetView> {
  const { sets } = await studyLinkedQuantities(db, studyId)
  const set = sets.find((s) => s.marginals.some((m) => m.quantityId === quantityId))
  if (!set) throw new HttpError(409, 'This quantity is not linked to another one')
  if (set.waitingFor.length) throw new HttpError(409, `Joint draws need every linked quantity reconciled; still open: ${set.waitingFor.join(', ')}`)
  return set
}

/** Computes joint draws as CSV text (computeJointDraws), on a compute thread in the app. */
export type JointDrawsComputer = (task: JointDrawsTask) => Promise<string>

/**
 * n seeded joint draws of the quantity's linked set as CSV (computeJointDraws): one column per quantity named by its
 * symbol, the same bytes for the same seed. Up to 100,000 draws take seconds, so `compute` runs them off the event loop.
 */
export async function jointDrawsCsv(db: Db, compute: JointDrawsComputer, studyId: number, quantityId: number, query: JointDrawsQuery): Promise<{ csv: string; symbols: string[] }> {
  const set = await readySetOf(db, studyId, quantityId)
  const symbols = set.marginals.map((m) => m.symbol)
  const csv = await compute({ symbols, marginals: set.marginals.map((m) => m.distribution!), matrix: set.jointMatrix, n: query.n, seed: query.seed })
  return { csv, symbols }
}
