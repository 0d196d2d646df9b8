import type { RoundBody, RoundUpdateBody } from '../../shared/schemas/rounds'
import type { MyRound, PanelMember, Round, RoundProgress, RoundSummary } from '../../shared/api/rounds'
import { supportBounds, type Support } from '../../shared/stats/index'
import type { User } from '../../shared/types/index'
import type { AppContext } from '../context'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import type { StudyAccess } from './access'
import { recordAudit } from './audit'
import { studyExpertLabels } from './expert-labels'
import { followQuantities } from './round-status'
import { dropLinksOutsideItems, linkProgress, listRoundLinks } from './links'
import { supportFromRow } from './quantities'
import { sendPanelInvitation, sendReminder } from './notify'

type RoundItemInput = RoundBody['items'][number]

interface RoundRow {
  id: number
  study_id: number
  number: number
  title: string
  briefing: string
  opens_at: Date
  closes_at: Date
  status: 'draft' | 'open' | 'closed' | 'reconciled'
  reminder_hours_before: number | null
  reminder_sent_at: Date | null
  time_zone: string
  calibration_position: 'before' | 'after'
  feedback_enabled: boolean
  ask_calibration: boolean
  practice_question: string
  practice_unit: string
  practice_answer: number
  opened_at: Date | null
  closed_at: Date | null
  version: number
  created_at: Date
  updated_at: Date
}

const iso = (d: Date | null) => (d ? d.toISOString() : null)

/** Edges of an interval method must lie inside the quantity's support. */
function checkEdgesInSupport(support: Support, edges: number[], index: number): Record<string, string> {
  const { lower: lo, upper: hi } = supportBounds(support)
  if (edges[0] < lo || edges[edges.length - 1] > hi) {
    return { [`items[${index}].edges`]: `Interval edges must lie within the quantity's support [${lo}, ${hi === Infinity ? '∞' : hi}]` }
  }
  return {}
}

async function validateItems(db: Db, studyId: number, items: RoundItemInput[]) {
  const ids = items.map((i) => i.quantityId)
  const rows = await db('quantities').where({ study_id: studyId }).whereIn('id', ids).select('id', 'support_kind', 'support_lower', 'support_upper')
  const byId = new Map(rows.map((r) => [r.id, supportFromRow(r)]))
  let fields: Record<string, string> = {}
  items.forEach((item, i) => {
    const support = byId.get(item.quantityId)
    if (!support) fields[`items[${i}].quantityId`] = 'Choose a quantity of this study'
    else if (item.edges) fields = { ...fields, ...checkEdgesInSupport(support, item.edges, i) }
  })
  if (Object.keys(fields).length) throw new HttpError(400, 'Some fields need attention', fields)
}

function itemRows(roundId: number, items: RoundItemInput[]) {
  return items.map((item, position) => ({
    round_id: roundId,
    quantity_id: item.quantityId,
    method: item.method,
    edges: item.edges ? JSON.stringify(item.edges) : null,
    chips: item.method === 'chip-grid' ? item.chips : null,
    ask_tails: !!item.askTails,
    position,
  }))
}

export async function createRound(db: Db, user: User, studyId: number, body: RoundBody) {
  await validateItems(db, studyId, body.items)
  const id = await db.transaction(async (trx) => {
    await trx.raw('SELECT id FROM studies WHERE id = ? FOR UPDATE', [studyId])
    const [{ max }] = await trx('rounds').where({ study_id: studyId }).max('number as max')
    const [row] = await trx('rounds').insert({
      study_id: studyId,
      number: (max ?? 0) + 1,
      title: body.title,
      briefing: body.briefing ?? '',
      opens_at: body.opensAt,
      closes_at: body.closesAt,
      reminder_hours_before: body.reminderHoursBefore ?? null,
      time_zone: body.timeZone,
      calibration_position: body.calibrationPosition,
      feedback_enabled: body.feedbackEnabled,
      ask_calibration: body.askCalibration,
      practice_question: body.practiceQuestion,
      practice_unit: body.practiceUnit,
      practice_answer: body.practiceAnswer,
    }).returning('id')
    await trx('round_items').insert(itemRows(row.id, body.items))
    await recordAudit(trx, { actorId: user.id, studyId, action: 'round.create', subject: `round:${row.id}`, details: { title: body.title, quantities: body.items.map((i) => i.quantityId) } })
    return row.id as number
  })
  return id
}

export async function roundRow(db: Db, id: number): Promise<RoundRow> {
  const row: RoundRow | undefined = await db('rounds').where({ id }).first()
  if (!row) throw new HttpError(404, 'Round not found')
  return row
}

/** An expert opens a round only when on its panel and once it has left draft; everything else answers 403. */
export async function assertExpertOpens(db: Db, user: User, round: Pick<RoundRow, 'id' | 'status'>) {
  const me = await db('round_panel').where({ round_id: round.id, user_id: user.id }).first('id')
  if (!me || round.status === 'draft') throw new HttpError(403, 'You are not on the panel of this round')
}

/** A round as its reader may see it: analysts and reviewers get the panel; an expert only their own entry. */
export async function getRound(db: Db, access: StudyAccess, id: number): Promise<Round> {
  const r = await roundRow(db, id)
  const items = await db('round_items as i').join('quantities as q', 'q.id', 'i.quantity_id').where('i.round_id', id)
    .select('i.*', 'q.name', 'q.symbol', 'q.unit', 'q.question', 'q.support_kind', 'q.support_lower', 'q.support_upper', 'q.assumptions', 'q.evidence_notes')
    .orderBy('i.position')
  const isExpert = access.role === 'expert'
  if (isExpert) await assertExpertOpens(db, access.user, r)
  const panel = isExpert ? [] : await panelOf(db, id)
  const files = await db('evidence_files').whereIn('quantity_id', items.map((i) => i.quantity_id)).select('id', 'quantity_id', 'filename', 'mime_type', 'size_bytes').orderBy('id')
  return {
    id: r.id,
    studyId: r.study_id,
    number: r.number,
    title: r.title,
    briefing: r.briefing,
    opensAt: r.opens_at.toISOString(),
    closesAt: r.closes_at.toISOString(),
    status: r.status,
    reminderHoursBefore: r.reminder_hours_before,
    reminderSentAt: iso(r.reminder_sent_at),
    timeZone: r.time_zone,
    calibrationPosition: r.calibration_position,
    feedbackEnabled: r.feedback_enabled,
    askCalibration: r.ask_calibration,
    practice: { question: r.practice_question, unit: r.practice_unit, ...(isExpert ? {} : { answer: r.practice_answer }) },
    openedAt: iso(r.opened_at),
    closedAt: iso(r.closed_at),
    version: r.version,
    items: items.map((i) => ({
      quantityId: i.quantity_id,
      method: i.method,
      edges: i.edges ?? undefined,
      chips: i.chips ?? undefined,
      askTails: i.ask_tails,
      quantity: {
        id: i.quantity_id, name: i.name, symbol: i.symbol, unit: i.unit, question: i.question,
        support: supportFromRow(i), assumptions: i.assumptions, evidenceNotes: i.evidence_notes,
        files: files.filter((f) => f.quantity_id === i.quantity_id).map((f) => ({ id: f.id, filename: f.filename, mimeType: f.mime_type, sizeBytes: f.size_bytes })),
      },
    })),
    links: await listRoundLinks(db, id),
    panel,
  }
}

async function panelOf(db: Db, roundId: number): Promise<PanelMember[]> {
  const { study_id: studyId } = await db('rounds').where({ id: roundId }).first('study_id')
  const labels = await studyExpertLabels(db, studyId)
  const rows = await db('round_panel as p').where('p.round_id', roundId)
    .leftJoin('invitations as i', function () {
      this.on('i.panel_id', '=', 'p.id').andOnNull('i.revoked_at')
    })
    .select('p.*', 'i.id as invitation_id', 'i.expires_at', 'i.accepted_at', 'i.created_at as invited_at')
    .orderBy('p.id')
  return rows.map((p) => ({
    id: p.id,
    email: p.email,
    name: p.name,
    label: labels.ofPanelMember({ userId: p.user_id, email: p.email }),
    userId: p.user_id,
    notifiedAt: iso(p.notified_at),
    firstOpenedAt: iso(p.first_opened_at),
    submittedAt: iso(p.submitted_at),
    invitation: p.invitation_id
      ? { id: p.invitation_id, invitedAt: iso(p.invited_at), expiresAt: iso(p.expires_at), acceptedAt: iso(p.accepted_at), expired: !p.accepted_at && p.expires_at < new Date() }
      : null,
  }))
}

export async function listRounds(db: Db, access: StudyAccess): Promise<RoundSummary[]> {
  const q = db('rounds as r').where('r.study_id', access.studyId)
    .select('r.id', 'r.number', 'r.title', 'r.status', 'r.opens_at', 'r.closes_at',
      db.raw('(SELECT count(*)::int FROM round_panel p WHERE p.round_id = r.id) as panel_size'),
      db.raw('(SELECT count(*)::int FROM round_panel p WHERE p.round_id = r.id AND p.submitted_at IS NOT NULL) as submitted'),
      db.raw('(SELECT count(*)::int FROM round_items i WHERE i.round_id = r.id) as item_count'))
    .orderBy('r.number')
  if (access.role === 'expert') {
    q.whereNot('r.status', 'draft').whereExists(db('round_panel as p').whereRaw('p.round_id = r.id').where('p.user_id', access.user.id))
  }
  const rows = await q
  return rows.map((r) => ({
    id: r.id, number: r.number, title: r.title, status: r.status, opensAt: r.opens_at.toISOString(), closesAt: r.closes_at.toISOString(),
    panelSize: r.panel_size, submitted: r.submitted, itemCount: r.item_count,
  }))
}

/** Rounds the signed-in expert is on, across studies, for their start page: only of studies they are still an expert of. */
export async function listMyRounds(db: Db, user: User): Promise<MyRound[]> {
  const rows = await db('round_panel as p').join('rounds as r', 'r.id', 'p.round_id').join('studies as s', 's.id', 'r.study_id')
    .join('study_members as m', (j) => j.on('m.study_id', '=', 'r.study_id').andOn('m.user_id', '=', 'p.user_id'))
    .where('p.user_id', user.id).where('m.study_role', 'expert').whereNot('r.status', 'draft')
    .select('r.id', 'r.title', 'r.status', 'r.opens_at', 'r.closes_at', 's.id as study_id', 's.title as study_title', 'p.submitted_at')
    .orderBy('r.closes_at')
  return rows.map((r) => ({ id: r.id, title: r.title, status: r.status, opensAt: r.opens_at.toISOString(), closesAt: r.closes_at.toISOString(), studyId: r.study_id, studyTitle: r.study_title, submittedAt: iso(r.submitted_at) }))
}

export async function updateRound(db: Db, user: User, id: number, body: RoundUpdateBody) {
  const r = await roundRow(db, id)
  if (r.status === 'closed' || r.status === 'reconciled') throw new HttpError(409, 'This round is closed; schedule a new round instead')
  const changes: Record<string, unknown> = {}
  const fields: Record<string, string> = {}
  if (r.status === 'open') {
    // Once experts are answering, only the window, briefing and reminder may change.
    for (const k of ['items', 'opensAt', 'calibrationPosition', 'feedbackEnabled', 'askCalibration', 'practiceQuestion', 'practiceUnit', 'practiceAnswer'] as const) {
      if (body[k] !== undefined) fields[k] = 'Cannot change while the round is open'
    }
    if (body.closesAt && body.closesAt.getTime() <= Date.now()) fields.closesAt = 'To end the round now, close it; an extension must be in the future'
  }
  const opensAt = body.opensAt ?? r.opens_at
  const closesAt = body.closesAt ?? r.closes_at
  if (closesAt.getTime() <= opensAt.getTime()) fields.closesAt = 'The round must close after it opens'
  if (Object.keys(fields).length) throw new HttpError(400, 'Some fields need attention', fields)
  if (body.items) await validateItems(db, r.study_id, body.items)

  const map: [keyof RoundUpdateBody, string][] = [
    ['title', 'title'], ['briefing', 'briefing'], ['opensAt', 'opens_at'], ['closesAt', 'closes_at'], ['reminderHoursBefore', 'reminder_hours_before'], ['timeZone', 'time_zone'],
    ['calibrationPosition', 'calibration_position'], ['feedbackEnabled', 'feedback_enabled'], ['askCalibration', 'ask_calibration'], ['practiceQuestion', 'practice_question'],
    ['practiceUnit', 'practice_unit'], ['practiceAnswer', 'practice_answer'],
  ]
  for (const [k, col] of map) if (body[k] !== undefined) changes[col] = body[k]
  if (body.closesAt && r.reminder_sent_at && body.closesAt > r.closes_at) changes.reminder_sent_at = null

  const extended = r.status === 'open' && body.closesAt && body.closesAt.getTime() !== r.closes_at.getTime()
  await db.transaction(async (trx) => {
    const n = await trx('rounds').where({ id, version: body.version }).update({ ...changes, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'Someone else changed this round since you opened it; reload to see their version')
    if (body.items) {
      await trx('round_items').where({ round_id: id }).delete()
      await trx('round_items').insert(itemRows(id, body.items))
      await dropLinksOutsideItems(trx, user, r.study_id, id, body.items.map((i) => i.quantityId))
    }
    await recordAudit(trx, {
      actorId: user.id, studyId: r.study_id, action: extended ? 'round.extend' : 'round.update', subject: `round:${id}`,
      details: { changed: Object.keys(changes), ...(extended ? { closesAtBefore: r.closes_at.toISOString(), closesAtAfter: body.closesAt!.toISOString() } : {}) },
    })
  })
}

/** draft → open: notifies every panel member (invitation or notice), all in one transaction with the outbox rows. */
export async function openRound(ctx: AppContext, user: User, id: number) {
  const { db } = ctx
  const r = await roundRow(db, id)
  if (r.status !== 'draft') throw new HttpError(409, `The round is already ${r.status}`)
  if (r.closes_at.getTime() <= Date.now()) throw new HttpError(400, 'The closing time has passed; move it later before opening', { closesAt: 'Must be in the future' })
  const outboxIds = await db.transaction(async (trx) => {
    const panel = await trx('round_panel').where({ round_id: id }).select('*')
    if (panel.length === 0) throw new HttpError(400, 'Add at least one expert to the panel before opening', { panel: 'Add at least one expert' })
    const n = await trx('rounds').where({ id, status: 'draft' }).update({ status: 'open', opened_at: trx.fn.now(), version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'The round changed while opening; reload')
    await trx('studies').where({ id: r.study_id, status: 'framing' }).update({ status: 'eliciting', updated_at: trx.fn.now() })
    const ids: number[] = []
    for (const member of panel) ids.push(await sendPanelInvitation(trx, ctx, user, r, member))
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'round.open', subject: `round:${id}`, details: { notified: ids.length } })
    return ids
  })
  await ctx.kickMail(outboxIds)
}

export async function closeRound(db: Db, user: User, id: number) {
  const r = await roundRow(db, id)
  if (r.status !== 'open') throw new HttpError(409, r.status === 'draft' ? 'The round has not been opened' : `The round is already ${r.status}`)
  await db.transaction(async (trx) => {
    const n = await trx('rounds').where({ id, status: 'open' }).update({ status: 'closed', closed_at: trx.fn.now(), version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(409, 'The round was closed at the same moment')
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'round.close', subject: `round:${id}`, details: { early: r.closes_at.getTime() > Date.now() } })
    await followQuantities(trx, user.id, { roundIds: [id] })
  })
}

/** Adds an expert to the panel by e-mail. When the round is open they are notified at once. */
export async function addPanelMember(ctx: AppContext, user: User, roundId: number, body: { email: string; name: string }) {
  const { db } = ctx
  const r = await roundRow(db, roundId)
  if (r.status === 'closed' || r.status === 'reconciled') throw new HttpError(409, 'This round is closed')
  const email = body.email.toLowerCase()
  const account = await db('users').whereRaw('lower(email) = ?', [email]).first('id', 'role', 'disabled', 'display_name')
  if (account?.disabled) throw new HttpError(400, 'This account is disabled', { email: 'This account is disabled; ask an admin' })
  if (account && account.role !== 'expert') throw new HttpError(400, `This address belongs to a ${account.role} account`, { email: 'Only expert accounts can sit on a panel' })
  if (await db('round_panel').where({ round_id: roundId, email }).first('id')) throw new HttpError(400, 'Already on this panel', { email: 'This expert is already on the panel' })
  const outboxIds = await db.transaction(async (trx) => {
    const [member] = await trx('round_panel').insert({ round_id: roundId, email, name: account?.display_name ?? body.name, user_id: account?.id ?? null }).returning('*')
    if (account) {
      // Held until commit, so an admin's change of this account's role waits and then sees the new membership.
      const held = await trx('users').where({ id: account.id }).forShare().first('role')
      if (held.role !== 'expert') throw new HttpError(400, `This address belongs to a ${held.role} account`, { email: 'Only expert accounts can sit on a panel' })
      await trx('study_members').insert({ study_id: r.study_id, user_id: account.id, study_role: 'expert' }).onConflict(['study_id', 'user_id']).ignore()
    }
    const ids = r.status === 'open' ? [await sendPanelInvitation(trx, ctx, user, r, member)] : []
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'panel.add', subject: `round:${roundId}`, details: { email, hasAccount: !!account, notified: ids.length > 0 } })
    return ids
  })
  await ctx.kickMail(outboxIds)
}

export async function removePanelMember(db: Db, user: User, roundId: number, panelId: number) {
  const r = await roundRow(db, roundId)
  const member = await db('round_panel').where({ id: panelId, round_id: roundId }).first()
  if (!member) throw new HttpError(404, 'Panel member not found')
  if (member.user_id && (await db('judgements').where({ round_id: roundId, expert_id: member.user_id }).first('id'))) {
    throw new HttpError(409, 'This expert has already answered; their judgements stay in the record')
  }
  await db.transaction(async (trx) => {
    await trx('round_panel').where({ id: panelId }).delete()
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'panel.remove', subject: `round:${roundId}`, details: { email: member.email } })
  })
}

/** Resend: a new single-use link replaces the old one (or a fresh notice for an account holder). */
export async function resendInvitation(ctx: AppContext, user: User, roundId: number, panelId: number) {
  const { db } = ctx
  const r = await roundRow(db, roundId)
  if (r.status !== 'open') throw new HttpError(409, 'Invitations are sent while the round is open')
  const member = await db('round_panel').where({ id: panelId, round_id: roundId }).first()
  if (!member) throw new HttpError(404, 'Panel member not found')
  const ids = await db.transaction(async (trx) => {
    const id = await sendPanelInvitation(trx, ctx, user, r, member)
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'invitation.resend', subject: `round:${roundId}`, details: { email: member.email } })
    return [id]
  })
  await ctx.kickMail(ids)
}

export async function revokeInvitation(db: Db, user: User, roundId: number, panelId: number) {
  const r = await roundRow(db, roundId)
  await db.transaction(async (trx) => {
    const n = await trx('invitations').where({ panel_id: panelId, round_id: roundId }).whereNull('revoked_at').whereNull('accepted_at').update({ revoked_at: trx.fn.now() })
    if (n === 0) throw new HttpError(404, 'No open invitation for this panel member')
    await recordAudit(trx, { actorId: user.id, studyId: r.study_id, action: 'invitation.revoke', subject: `round:${roundId}`, details: { panelId } })
  })
}

/** Who opened, who submitted, per quantity. */
export async function roundProgress(db: Db, roundId: number): Promise<RoundProgress> {
  const items = await db('round_items as i').join('quantities as q', 'q.id', 'i.quantity_id').where('i.round_id', roundId).select('i.quantity_id', 'q.name', 'q.symbol').orderBy('i.position')
  const panel = await panelOf(db, roundId)
  const judgements = await db('judgements').where({ round_id: roundId }).select('quantity_id', 'expert_id', 'status', 'updated_at')
  const { study_id: studyId } = await db('rounds').where({ id: roundId }).first('study_id')
  const labels = await studyExpertLabels(db, studyId)
  return {
    quantities: items.map((i) => ({ id: i.quantity_id, name: i.name, symbol: i.symbol })),
    links: await linkProgress(db, roundId),
    experts: panel.map((p) => ({
      panelId: p.id,
      label: labels.ofPanelMember({ userId: p.userId, email: p.email }),
      name: p.name,
      email: p.email,
      hasAccount: !!p.userId,
      invitation: p.invitation,
      notifiedAt: p.notifiedAt,
      firstOpenedAt: p.firstOpenedAt,
      submittedAt: p.submittedAt,
      quantities: items.map((i) => {
        const j = judgements.find((x) => x.quantity_id === i.quantity_id && x.expert_id === p.userId)
        return { quantityId: i.quantity_id, status: j ? j.status : 'not started', updatedAt: j ? j.updated_at.toISOString() : null }
      }),
    })),
  }
}

/** Sends due reminders and closes rounds past their closing time; safe to run from several instances. */
export async function runRoundSchedule(ctx: AppContext, now = new Date()) {
  const { db } = ctx
  const closed = await db.transaction(async (trx) => {
    const rows = await trx('rounds').where('status', 'open').where('closes_at', '<=', now)
      .update({ status: 'closed', closed_at: now, version: trx.raw('version + 1'), updated_at: now }).returning(['id', 'study_id'])
    for (const r of rows) await recordAudit(trx, { actorId: null, studyId: r.study_id, action: 'round.close', subject: `round:${r.id}`, details: { automatic: true } })
    if (rows.length) await followQuantities(trx, null, { roundIds: rows.map((r) => r.id) })
    return rows
  })

  const outboxIds: number[] = []
  await db.transaction(async (trx) => {
    const due: RoundRow[] = await trx('rounds').where('status', 'open').whereNull('reminder_sent_at').whereNotNull('reminder_hours_before')
      .whereRaw(`closes_at - make_interval(hours => reminder_hours_before) <= ?`, [now]).forUpdate().skipLocked().select('*')
    for (const r of due) {
      const pending = await trx('round_panel').where({ round_id: r.id }).whereNull('submitted_at').select('*')
      for (const member of pending) outboxIds.push(await sendReminder(trx, ctx, r, member))
      await trx('rounds').where({ id: r.id }).update({ reminder_sent_at: now })
      await recordAudit(trx, { actorId: null, studyId: r.study_id, action: 'round.reminders', subject: `round:${r.id}`, details: { sent: pending.length } })
    }
  })
  await ctx.kickMail(outboxIds)
  return { closed: closed.length, reminders: outboxIds.length }
}
