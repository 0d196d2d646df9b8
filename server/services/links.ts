import type { Knex } from 'knex'
import type { LinkAnswer, LinkAnswerVersion, RoundLink } from '../../shared/api/links'
import type { LinkProgress } from '../../shared/api/rounds'
import { defaultLinkWording } from '../../shared/elicitation/links'
import {
  LINK_ALREADY_LINKED_MESSAGE, LINK_DRAFT_ONLY_MESSAGE, LINK_NOT_IN_ROUND_MESSAGE, LINK_ORDER_MESSAGE, LINK_SAME_QUANTITY_MESSAGE,
  type LinkAnswerBody, type LinkBody,
} from '../../shared/schemas/links'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { canAnalyse, studyAccess } from './access'
import { recordAudit } from './audit'
import { studyExpertLabels } from './expert-labels'
import { refuseUnlessAnswering } from './round-status'

type Conn = Db | Knex.Transaction

interface LinkRow {
  id: number
  round_id: number
  first_quantity_id: number
  second_quantity_id: number
  wording: string
  position: number
  version: number
  created_at: Date
  updated_at: Date
  first_name: string
  first_symbol: string
  second_name: string
  second_symbol: string
}

interface LinkAnswerRow {
  id: number
  link_id: number
  expert_id: number
  probability: number | null
  rationale: string
  status: 'draft' | 'submitted'
  version: number
  submitted_at: Date | null
  updated_at: Date
  expert_name?: string
}

function toLink(r: LinkRow): RoundLink {
  return {
    id: r.id,
    roundId: r.round_id,
    first: { quantityId: r.first_quantity_id, name: r.first_name, symbol: r.first_symbol },
    second: { quantityId: r.second_quantity_id, name: r.second_name, symbol: r.second_symbol },
    wording: r.wording,
    position: r.position,
    version: r.version,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }
}

function toLinkAnswer(r: LinkAnswerRow, team: { name?: string; label: string } | null): LinkAnswer {
  return {
    id: r.id,
    linkId: r.link_id,
    expertId: r.expert_id,
    ...(team ? { expertName: team.name, expertLabel: team.label } : {}),
    probability: r.probability,
    rationale: r.rationale,
    status: r.status,
    version: r.version,
    submittedAt: r.submitted_at ? r.submitted_at.toISOString() : null,
    updatedAt: r.updated_at.toISOString(),
  }
}

const linkQuery = (db: Conn) => db('round_links as l')
  .join('quantities as a', 'a.id', 'l.first_quantity_id')
  .join('quantities as b', 'b.id', 'l.second_quantity_id')
  .select('l.*', 'a.name as first_name', 'a.symbol as first_symbol', 'b.name as second_name', 'b.symbol as second_symbol')

/** The links of a round in the analyst's order (what the round detail, reconciliation and the record read). */
export async function listRoundLinks(db: Conn, roundId: number): Promise<RoundLink[]> {
  const rows: LinkRow[] = await linkQuery(db).where('l.round_id', roundId).orderBy(['l.position', 'l.id'])
  return rows.map(toLink)
}

export async function getLink(db: Conn, id: number): Promise<RoundLink> {
  const row: LinkRow | undefined = await linkQuery(db).where('l.id', id).first()
  if (!row) throw new HttpError(404, 'Link not found')
  return toLink(row)
}

/** The round a link belongs to, for the access check of the routes that name a link: 404 when there is none. */
export async function roundOfLink(db: Db, id: number): Promise<number> {
  const row = await db('round_links').where({ id }).first('round_id')
  if (!row) throw new HttpError(404, 'Link not found')
  return row.round_id as number
}

/** Locks the round and refuses unless it is a draft: the experts of an open round must all read the same questions. */
async function lockDraftRound(trx: Knex.Transaction, roundId: number): Promise<{ study_id: number }> {
  const round = await trx('rounds').where({ id: roundId }).forUpdate().first('status', 'study_id')
  if (!round) throw new HttpError(404, 'Round not found')
  if (round.status !== 'draft') throw new HttpError(409, LINK_DRAFT_ONLY_MESSAGE)
  return round
}

/**
 * Both quantities must be items of the round, and the pair (in either order) not linked yet (`except`: the link
 * being edited). Returns the two quantities' names for the default wording.
 */
async function checkPair(trx: Knex.Transaction, roundId: number, body: LinkBody, except: number | null): Promise<[string, string]> {
  const items: { quantity_id: number; name: string }[] = await trx('round_items as i').join('quantities as q', 'q.id', 'i.quantity_id')
    .where('i.round_id', roundId).whereIn('i.quantity_id', [body.firstQuantityId, body.secondQuantityId]).select('i.quantity_id', 'q.name')
  const nameOf = new Map(items.map((i) => [i.quantity_id, i.name]))
  const fields: Record<string, string> = {}
  if (!nameOf.has(body.firstQuantityId)) fields.firstQuantityId = LINK_NOT_IN_ROUND_MESSAGE
  if (!nameOf.has(body.secondQuantityId)) fields.secondQuantityId = LINK_NOT_IN_ROUND_MESSAGE
  if (body.firstQuantityId === body.secondQuantityId) fields.secondQuantityId = LINK_SAME_QUANTITY_MESSAGE
  if (Object.keys(fields).length) throw new HttpError(400, 'Some fields need attention', fields)
  const pair = [body.firstQuantityId, body.secondQuantityId]
  const taken = await trx('round_links').where({ round_id: roundId }).whereIn('first_quantity_id', pair).whereIn('second_quantity_id', pair)
    .modify((q) => { if (except !== null) q.whereNot('id', except) }).first('id')
  if (taken) throw new HttpError(400, LINK_ALREADY_LINKED_MESSAGE, { secondQuantityId: LINK_ALREADY_LINKED_MESSAGE })
  return [nameOf.get(body.firstQuantityId)!, nameOf.get(body.secondQuantityId)!]
}

const linkColumns = (body: LinkBody, names: [string, string]) => ({
  first_quantity_id: body.firstQuantityId,
  second_quantity_id: body.secondQuantityId,
  wording: body.wording?.trim() || defaultLinkWording(names[0], names[1]),
})

export async function createLink(db: Db, user: User, roundId: number, body: LinkBody): Promise<RoundLink> {
  const id = await db.transaction(async (trx) => {
    const round = await lockDraftRound(trx, roundId)
    const names = await checkPair(trx, roundId, body, null)
    const [{ max }] = await trx('round_links').where({ round_id: roundId }).max('position as max')
    const [row] = await trx('round_links').insert({ ...linkColumns(body, names), round_id: roundId, position: (max ?? 0) + 1 }).returning('id')
    await recordAudit(trx, {
      actorId: user.id, studyId: round.study_id, action: 'link.create', subject: `round:${roundId}`,
      details: { linkId: row.id, firstQuantityId: body.firstQuantityId, secondQuantityId: body.secondQuantityId },
    })
    return row.id as number
  })
  return getLink(db, id)
}

export async function updateLink(db: Db, user: User, id: number, body: LinkBody & { version: number }): Promise<RoundLink> {
  await db.transaction(async (trx) => {
    const before = await trx('round_links').where({ id }).first()
    if (!before) throw new HttpError(404, 'Link not found')
    const round = await lockDraftRound(trx, before.round_id)
    const names = await checkPair(trx, before.round_id, body, id)
    const n = await trx('round_links').where({ id, version: body.version })
      .update({ ...linkColumns(body, names), version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this link since you opened it; reload to see their version')
    await recordAudit(trx, {
      actorId: user.id, studyId: round.study_id, action: 'link.update', subject: `round:${before.round_id}`,
      details: {
        linkId: id,
        before: { firstQuantityId: before.first_quantity_id, secondQuantityId: before.second_quantity_id, wording: before.wording },
        after: { firstQuantityId: body.firstQuantityId, secondQuantityId: body.secondQuantityId, wording: linkColumns(body, names).wording },
      },
    })
  })
  return getLink(db, id)
}

export async function deleteLink(db: Db, user: User, id: number): Promise<void> {
  await db.transaction(async (trx) => {
    const before = await trx('round_links').where({ id }).first()
    if (!before) throw new HttpError(404, 'Link not found')
    const round = await lockDraftRound(trx, before.round_id)
    await trx('round_links').where({ id }).delete()
    await recordAudit(trx, {
      actorId: user.id, studyId: round.study_id, action: 'link.delete', subject: `round:${before.round_id}`,
      details: { linkId: id, firstQuantityId: before.first_quantity_id, secondQuantityId: before.second_quantity_id },
    })
  })
}

/** Puts the round's links in the given order; the list must name every link of the round exactly once. */
export async function reorderLinks(db: Db, user: User, roundId: number, linkIds: number[]): Promise<RoundLink[]> {
  await db.transaction(async (trx) => {
    const round = await lockDraftRound(trx, roundId)
    const current: number[] = await trx('round_links').where({ round_id: roundId }).orderBy(['position', 'id']).pluck('id')
    if (current.length !== linkIds.length || !current.every((id) => linkIds.includes(id))) {
      throw new HttpError(400, LINK_ORDER_MESSAGE, { linkIds: LINK_ORDER_MESSAGE })
    }
    for (const [i, id] of linkIds.entries()) {
      await trx('round_links').where({ id }).update({ position: i + 1, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    }
    await recordAudit(trx, { actorId: user.id, studyId: round.study_id, action: 'link.reorder', subject: `round:${roundId}`, details: { before: current, after: linkIds } })
  })
  return listRoundLinks(db, roundId)
}

/**
 * A round's items changed (still a draft): links whose quantities are no longer asked go, each with its audit event,
 * in the transaction of the change.
 */
export async function dropLinksOutsideItems(trx: Knex.Transaction, user: User, studyId: number, roundId: number, quantityIds: number[]): Promise<void> {
  const gone = await trx('round_links').where({ round_id: roundId })
    .where((q) => q.whereNotIn('first_quantity_id', quantityIds).orWhereNotIn('second_quantity_id', quantityIds)).select('id', 'first_quantity_id', 'second_quantity_id')
  for (const l of gone) {
    await trx('round_links').where({ id: l.id }).delete()
    await recordAudit(trx, {
      actorId: user.id, studyId, action: 'link.delete', subject: `round:${roundId}`,
      details: { linkId: l.id, firstQuantityId: l.first_quantity_id, secondQuantityId: l.second_quantity_id, reason: 'quantity no longer in the round' },
    })
  }
}

/** The expert's own answers to the round's links, or every answer with names and labels for the study team. */
export async function listLinkAnswers(db: Db, roundId: number, viewer: { user: User; seesAll: boolean }): Promise<LinkAnswer[]> {
  const q = db('link_answers as a').join('round_links as l', 'l.id', 'a.link_id').join('users as u', 'u.id', 'a.expert_id')
    .where('l.round_id', roundId).select('a.*', 'u.display_name as expert_name').orderBy(['l.position', 'l.id', 'a.expert_id'])
  if (!viewer.seesAll) q.where('a.expert_id', viewer.user.id)
  const rows: LinkAnswerRow[] = await q
  if (!viewer.seesAll) return rows.map((r) => toLinkAnswer(r, null))
  const { study_id: studyId } = await db('rounds').where({ id: roundId }).first('study_id')
  const labels = await studyExpertLabels(db, studyId)
  return rows.map((r) => toLinkAnswer(r, { name: r.expert_name, label: labels.ofUser(r.expert_id) }))
}

/**
 * Saves one draft answer to a link's question: the round is open and the expert on its panel; stale version → 409;
 * a submitted answer is frozen until the analyst reopens it. Every save lands in link_answer_versions.
 */
export async function saveLinkAnswer(db: Db, user: User, roundId: number, linkId: number, body: LinkAnswerBody): Promise<LinkAnswer> {
  return db.transaction(async (trx) => {
    const round = await trx('rounds').where({ id: roundId }).first('status', 'closes_at')
    if (!round) throw new HttpError(404, 'Round not found')
    const member = await trx('round_panel').where({ round_id: roundId, user_id: user.id }).first('submitted_at')
    refuseUnlessAnswering(round, !!member)
    const link = await trx('round_links').where({ id: linkId, round_id: roundId }).first('id')
    if (!link) throw new HttpError(404, 'This link is not part of the round')
    const existing: LinkAnswerRow | undefined = await trx('link_answers').where({ link_id: linkId, expert_id: user.id }).forUpdate().first()
    if (member.submitted_at || existing?.status === 'submitted') throw new HttpError(409, 'You have submitted this round; ask the analyst to reopen it to change an answer')
    const values = { probability: body.probability ?? null, rationale: body.rationale ?? '' }
    let saved: LinkAnswerRow
    if (!existing) {
      if (body.version !== 0) throw new HttpError(409, 'This answer was removed or never saved; reload')
      ;[saved] = await trx('link_answers').insert({ ...values, link_id: linkId, expert_id: user.id }).returning('*')
    } else {
      if (existing.version !== body.version) throw new HttpError(409, 'This answer was saved from another window or device since you loaded it; reload to continue from the newer version')
      ;[saved] = await trx('link_answers').where({ id: existing.id }).update({ ...values, version: existing.version + 1, updated_at: trx.fn.now() }).returning('*')
    }
    await trx('link_answer_versions').insert({ link_answer_id: saved.id, version: saved.version, ...values, status: 'draft', saved_by: user.id })
    return toLinkAnswer(saved, null)
  })
}

/** The round's links the expert has not given a chance for yet, as submit's field errors ("link.<id>"). */
export async function unansweredLinks(db: Db, user: User, roundId: number): Promise<Record<string, string>> {
  const rows = await linkQuery(db).where('l.round_id', roundId)
    .leftJoin('link_answers as ans', (j) => j.on('ans.link_id', '=', 'l.id').andOn('ans.expert_id', '=', db.raw('?', [user.id])))
    .select('ans.probability').orderBy(['l.position', 'l.id'])
  const fields: Record<string, string> = {}
  for (const r of rows as (LinkRow & { probability: number | null })[]) {
    if (r.probability === null) fields[`link.${r.id}`] = `${r.first_name} and ${r.second_name}: say how likely the second is above your middle value when the first is`
  }
  return fields
}

/** Freezes the expert's link answers with their round submission (inside its transaction), one version row each. */
export async function submitLinkAnswers(trx: Knex.Transaction, user: User, roundId: number): Promise<number> {
  const rows: LinkAnswerRow[] = await trx('link_answers as a').join('round_links as l', 'l.id', 'a.link_id')
    .where({ 'l.round_id': roundId, 'a.expert_id': user.id }).select('a.*')
  for (const a of rows) {
    await trx('link_answers').where({ id: a.id }).update({ status: 'submitted', submitted_at: trx.fn.now(), version: a.version + 1, updated_at: trx.fn.now() })
    await trx('link_answer_versions').insert({ link_answer_id: a.id, version: a.version + 1, probability: a.probability, rationale: a.rationale, status: 'submitted', saved_by: user.id })
  }
  return rows.length
}

/** The analyst reopened the expert's submission: their link answers become drafts again (inside its transaction). */
export async function reopenLinkAnswers(trx: Knex.Transaction, roundId: number, expertId: number): Promise<void> {
  await trx('link_answers').where({ expert_id: expertId }).whereIn('link_id', trx('round_links').where({ round_id: roundId }).select('id'))
    .update({ status: 'draft', submitted_at: null, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
}

/** Every saved version of one link answer, oldest first, for the study team or the expert who gave it. */
export async function linkAnswerHistory(db: Db, user: User, answerId: number): Promise<LinkAnswerVersion[]> {
  const a = await db('link_answers as a').join('round_links as l', 'l.id', 'a.link_id').join('rounds as r', 'r.id', 'l.round_id')
    .where('a.id', answerId).first('a.expert_id', 'r.study_id')
  if (!a) throw new HttpError(404, 'Answer not found')
  const access = await studyAccess(db, user, a.study_id)
  if (!canAnalyse(access) && access.role !== 'reviewer' && a.expert_id !== user.id) throw new HttpError(403, 'You can only see your own answers')
  const rows = await db('link_answer_versions as v').join('users as u', 'u.id', 'v.saved_by').where('v.link_answer_id', answerId)
    .select('v.version', 'v.probability', 'v.rationale', 'v.status', 'v.saved_at', 'u.display_name as saved_by').orderBy('v.version')
  return rows.map((r) => ({ version: r.version, probability: r.probability, rationale: r.rationale, status: r.status, savedAt: r.saved_at.toISOString(), savedBy: r.saved_by }))
}

/** Per link of the round, how many experts have given a chance and how many submitted it (counts only, no values). */
export async function linkProgress(db: Db, roundId: number): Promise<LinkProgress[]> {
  const rows = await linkQuery(db).where('l.round_id', roundId)
    .select(
      db.raw('(SELECT count(*)::int FROM link_answers x WHERE x.link_id = l.id AND x.probability IS NOT NULL) AS answered'),
      db.raw(`(SELECT count(*)::int FROM link_answers x WHERE x.link_id = l.id AND x.status = 'submitted') AS submitted`),
    ).orderBy(['l.position', 'l.id'])
  return rows.map((r: LinkRow & { answered: number; submitted: number }) => {
    const { first, second } = toLink(r)
    return { linkId: r.id, first, second, answered: r.answered, submitted: r.submitted }
  })
}
