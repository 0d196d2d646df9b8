import type { Knex } from 'knex'
import type { AuditEvent } from '../../shared/api/audit'
import type { QuantityStage, StudyDetail } from '../../shared/api/studies'
import type { Role, StudyRole, StudySummary, User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { studyExpertLabels } from './expert-labels'

interface StudyRow {
  id: number
  title: string
  context: string
  status: StudySummary['status']
  owner_id: number
  owner_name: string
  my_role: StudyRole | null
  member_count: number
  quantity_count: number
  version: number
  created_at: Date
  updated_at: Date
}

function studyQuery(db: Db, userId: number) {
  return db('studies as s')
    .join('users as o', 'o.id', 's.owner_id')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', '=', 's.id').andOn('m.user_id', '=', db.raw('?', [userId]))
    })
    .select(
      's.*',
      'o.display_name as owner_name',
      'm.study_role as my_role',
      db.raw('(SELECT count(*)::int FROM study_members sm WHERE sm.study_id = s.id) as member_count'),
      db.raw('(SELECT count(*)::int FROM quantities q WHERE q.study_id = s.id) as quantity_count'),
    )
}

function toSummary(r: StudyRow): StudySummary {
  return {
    id: r.id,
    title: r.title,
    context: r.context,
    status: r.status,
    ownerId: r.owner_id,
    ownerName: r.owner_name,
    myRole: r.my_role ?? 'admin',
    quantityCount: r.quantity_count,
    memberCount: r.member_count,
    version: r.version,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
  }
}

/** Studies the user belongs to (admins see every study), with the user's role in each. */
export async function listStudiesFor(db: Db, user: User): Promise<StudySummary[]> {
  const q = studyQuery(db, user.id).orderBy('s.updated_at', 'desc')
  if (user.role !== 'admin') q.whereNotNull('m.user_id')
  return (await q).map(toSummary)
}

export async function getStudySummary(db: Db, user: User, id: number): Promise<StudySummary> {
  const row = await studyQuery(db, user.id).where('s.id', id).first()
  if (!row) throw new HttpError(404, 'Study not found')
  return toSummary(row)
}

/** Overview: members, each quantity's stage, rounds. Experts see the panel's names only for themselves. */
export async function getStudyDetail(db: Db, user: User, id: number, role: StudyRole | 'admin'): Promise<StudyDetail> {
  const summary = await getStudySummary(db, user, id)
  const seesPeople = role !== 'expert'
  const members = await db('study_members as m').join('users as u', 'u.id', 'm.user_id').where('m.study_id', id)
    .select('u.id as userId', 'u.display_name as displayName', 'u.email', 'm.study_role as studyRole', 'm.added_at as addedAt').orderBy(['m.study_role', 'u.display_name'])
  const quantities = await db('quantities as q').where('q.study_id', id)
    .select('q.id', 'q.name', 'q.symbol', 'q.unit', 'q.support_kind as supportKind',
      db.raw(`EXISTS (SELECT 1 FROM judgements j WHERE j.quantity_id = q.id AND j.status = 'submitted') as judged`),
      db.raw(`EXISTS (SELECT 1 FROM reconciliations r WHERE r.quantity_id = q.id AND r.status = 'reconciled') as reconciled`))
    .orderBy(['q.position', 'q.id'])
  const rounds = await db('rounds').where({ study_id: id }).select('id', 'number', 'title', 'status', 'opens_at', 'closes_at').orderBy('number')
  return {
    ...summary,
    members: seesPeople ? members : members.filter((m) => m.userId === user.id || m.studyRole !== 'expert'),
    quantities: quantities.map((q) => ({ id: q.id, name: q.name, symbol: q.symbol, unit: q.unit, supportKind: q.supportKind, stage: (q.reconciled ? 'reconciled' : q.judged ? 'judged' : 'framed') as QuantityStage })),
    rounds: rounds.map((r) => ({ id: r.id, number: r.number, title: r.title, status: r.status, opensAt: r.opens_at.toISOString(), closesAt: r.closes_at.toISOString() })),
  }
}

export async function createStudy(db: Db, user: User, body: { title: string; context: string }): Promise<StudySummary> {
  const id = await db.transaction(async (trx) => {
    const [row] = await trx('studies').insert({ title: body.title, context: body.context, owner_id: user.id }).returning('id')
    await trx('study_members').insert({ study_id: row.id, user_id: user.id, study_role: 'analyst' })
    await recordAudit(trx, { actorId: user.id, studyId: row.id, action: 'study.create', subject: `study:${row.id}`, details: { title: body.title } })
    return row.id as number
  })
  return getStudySummary(db, user, id)
}

/** Optimistic update: a stale version answers 409 and changes nothing. */
export async function updateStudy(db: Db, user: User, id: number, body: { title: string; context: string; version: number }): Promise<StudySummary> {
  await db.transaction(async (trx) => {
    const before = await trx('studies').where({ id }).first('title', 'context', 'version')
    if (!before) throw new HttpError(404, 'Study not found')
    const n = await trx('studies').where({ id, version: body.version })
      .update({ title: body.title, context: body.context, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this study since you opened it; reload to see their version')
    await recordAudit(trx, { actorId: user.id, studyId: id, action: 'study.update', subject: `study:${id}`, details: { before: { title: before.title }, after: { title: body.title }, contextChanged: before.context !== body.context } })
  })
  return getStudySummary(db, user, id)
}

/** Which account roles may hold each study role: the rule for adding a member and for changing an account's role. */
export const ACCOUNT_ROLES_FOR: Record<StudyRole, readonly Role[]> = { analyst: ['analyst', 'admin'], expert: ['expert'], reviewer: ['reviewer', 'analyst', 'admin'] }

/**
 * Takes the study's row lock (membership changes of one study run one at a time) and refuses a change that would
 * take the owner out of the analyst role or leave the study without an analyst. `next` null is a removal.
 */
async function guardMembershipChange(trx: Knex.Transaction, studyId: number, userId: number, next: StudyRole | null) {
  const study = await trx('studies').where({ id: studyId }).forUpdate().first('owner_id')
  if (!study) throw new HttpError(404, 'Study not found')
  if (next === 'analyst') return
  if (study.owner_id === userId) {
    if (next === null) throw new HttpError(400, 'The study owner cannot be removed')
    throw new HttpError(400, 'The study’s owner stays its analyst', { studyRole: 'The study’s owner stays its analyst' })
  }
  const current = await trx('study_members').where({ study_id: studyId, user_id: userId }).first('study_role')
  if (current?.study_role !== 'analyst') return
  const [{ others }] = await trx('study_members').where({ study_id: studyId, study_role: 'analyst' }).whereNot({ user_id: userId }).count('* as others')
  if (Number(others) === 0) {
    throw new HttpError(400, 'A study needs at least one analyst; add another analyst first', next === null ? undefined : { studyRole: 'The study’s last analyst stays one' })
  }
}

export async function addMember(db: Db, actor: User, studyId: number, userId: number, studyRole: StudyRole) {
  await db.transaction(async (trx) => {
    // The account's row is held (shared) until commit, so an admin's role change cannot slip in between.
    const target = await trx('users').where({ id: userId }).forShare().first('id', 'role', 'disabled')
    if (!target) throw new HttpError(400, 'Choose an existing user', { userId: 'No such user' })
    if (target.disabled) throw new HttpError(400, 'This account is disabled', { userId: 'This account is disabled' })
    if (!ACCOUNT_ROLES_FOR[studyRole].includes(target.role)) {
      throw new HttpError(400, `A ${target.role} account cannot be this study's ${studyRole}`, { studyRole: `Not for a ${target.role} account` })
    }
    await guardMembershipChange(trx, studyId, userId, studyRole)
    const before = await trx('study_members').where({ study_id: studyId, user_id: userId }).first('study_role')
    await trx('study_members').insert({ study_id: studyId, user_id: userId, study_role: studyRole }).onConflict(['study_id', 'user_id']).merge(['study_role'])
    await recordAudit(trx, { actorId: actor.id, studyId, action: 'study.member', subject: `user:${userId}`, details: { before: before?.study_role ?? null, after: studyRole } })
  })
}

export async function removeMember(db: Db, actor: User, studyId: number, userId: number) {
  await db.transaction(async (trx) => {
    await guardMembershipChange(trx, studyId, userId, null)
    const n = await trx('study_members').where({ study_id: studyId, user_id: userId }).delete()
    if (n === 0) throw new HttpError(404, 'Not a member of this study')
    await recordAudit(trx, { actorId: actor.id, studyId, action: 'study.member-remove', subject: `user:${userId}` })
  })
}

/**
 * The study's audit trail, newest first. An expert of the study acts under their study-wide label, with the name
 * beside it only for those who run the panel (`withNames`: analysts and admins).
 */
export async function studyAudit(db: Db, studyId: number, options: { withNames: boolean }, limit = 200): Promise<AuditEvent[]> {
  const rows = await db('audit_events as a').leftJoin('users as u', 'u.id', 'a.actor_id').where('a.study_id', studyId)
    .select('a.id', 'a.at', 'a.action', 'a.subject', 'a.details', 'a.hash', 'a.actor_id', 'u.display_name as actorName').orderBy('a.id', 'desc').limit(limit)
  const labels = await studyExpertLabels(db, studyId)
  const actor = (id: number | null, name: string | null) => {
    if (!id || !name) return name ?? 'system'
    if (!labels.isExpert(id)) return name
    return options.withNames ? `${labels.ofUser(id)} (${name})` : labels.ofUser(id)
  }
  return rows.map((r) => ({ id: Number(r.id), at: new Date(r.at).toISOString(), action: r.action, subject: r.subject, details: r.details, actorName: actor(r.actor_id, r.actorName), hash: r.hash }))
}
