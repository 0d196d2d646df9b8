import bcrypt from 'bcryptjs'
import type { InvitationAccepted, InvitationInfo, InvitationState } from '../../shared/api/invitations'
import type { Declaration, PracticeDone, PracticeFeedback, RoundEntry } from '../../shared/api/rounds'
import type { Point } from '../../shared/stats/types'
import type { DeclarationBody } from '../../shared/schemas/rounds'
import type { User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { recordAudit } from './audit'
import { hashToken } from './tokens'
import { findUserById } from './users'

const ROUND_OVER = ['closed', 'reconciled']

/** A used link says so first (its holder signs in); a link of a round that has ended is no longer any use. */
function stateOf(inv: { accepted_at: Date | null; revoked_at: Date | null; expires_at: Date }, roundStatus: string): InvitationState {
  if (inv.accepted_at) return 'used'
  if (inv.revoked_at) return 'revoked'
  if (ROUND_OVER.includes(roundStatus)) return 'closed'
  return inv.expires_at < new Date() ? 'expired' : 'valid'
}

async function invitationByToken(db: Db, token: string) {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) throw new HttpError(404, 'This invitation link is not valid')
  const row = await db('invitations as i').join('rounds as r', 'r.id', 'i.round_id').join('studies as s', 's.id', 'r.study_id')
    .where('i.token_hash', hashToken(token))
    .first('i.*', 'r.title as round_title', 'r.opens_at', 'r.closes_at', 'r.status as round_status', 's.title as study_title', 's.id as study_id')
  if (!row) throw new HttpError(404, 'This invitation link is not valid')
  return { row, state: stateOf(row, row.round_status) }
}

const STATE_MESSAGES: Record<Exclude<InvitationState, 'valid'>, string> = {
  used: 'This invitation link has already been used. Sign in with the password you chose.',
  revoked: 'This invitation link was withdrawn. Ask the analyst for a new one.',
  expired: 'This invitation link has expired. Ask the analyst to send a new one.',
  closed: 'This round has closed, so the invitation can no longer be used. Ask the analyst if you still want to take part.',
}

/** What the invitation page shows before the expert sets a password. */
export async function describeInvitation(db: Db, token: string): Promise<InvitationInfo> {
  const { row, state } = await invitationByToken(db, token)
  return {
    state,
    message: state === 'valid' ? null : STATE_MESSAGES[state],
    email: row.email,
    name: row.name,
    studyTitle: row.study_title,
    roundTitle: row.round_title,
    roundId: row.round_id,
    opensAt: row.opens_at.toISOString(),
    closesAt: row.closes_at.toISOString(),
    expiresAt: row.expires_at.toISOString(),
  }
}

/** Creates the expert's account from a valid invitation (single use, under a row lock) and returns it. */
export async function acceptInvitation(db: Db, token: string, body: { name: string; password: string }): Promise<InvitationAccepted> {
  const passwordHash = await bcrypt.hash(body.password, 10)
  const result = await db.transaction(async (trx) => {
    const inv = await trx('invitations').where({ token_hash: hashToken(token) }).forUpdate().first()
    if (!inv) throw new HttpError(404, 'This invitation link is not valid')
    // Read under a share lock: a round closing at this moment waits for the acceptance, or the acceptance sees it closed.
    const round = await trx('rounds').where({ id: inv.round_id }).forShare().first('study_id', 'status')
    const state = stateOf(inv, round.status)
    if (state !== 'valid') throw new HttpError(410, STATE_MESSAGES[state])
    if (await trx('users').whereRaw('lower(email) = lower(?)', [inv.email]).first('id')) {
      throw new HttpError(409, 'An account with this e-mail address already exists. Sign in instead.')
    }
    const [user] = await trx('users').insert({ email: inv.email.toLowerCase(), display_name: body.name, role: 'expert', password_hash: passwordHash }).returning('id')
    await trx('invitations').where({ id: inv.id }).update({ accepted_at: trx.fn.now(), accepted_user_id: user.id })
    await trx('round_panel').where({ id: inv.panel_id }).update({ user_id: user.id, name: body.name })
    await trx('study_members').insert({ study_id: round.study_id, user_id: user.id, study_role: 'expert' }).onConflict(['study_id', 'user_id']).ignore()
    await recordAudit(trx, { actorId: user.id, studyId: round.study_id, action: 'invitation.accept', subject: `round:${inv.round_id}` })
    return { userId: user.id as number, roundId: inv.round_id as number }
  })
  const user = await findUserById(db, result.userId)
  return { user: user!, roundId: result.roundId }
}

type DeclarationRow = {
  round_id: number
  expertise: string
  interests: 'none' | 'described'
  interests_text: string
  seen_pilot_data: boolean
  practice_points: PracticeDone['points']
  practice_fit: PracticeDone['fit']
  practice_completed_at: Date | null
  updated_at: Date
}

const declarationOf = (d: DeclarationRow): Declaration => ({
  expertise: d.expertise, interests: d.interests, interestsText: d.interests_text, seenPilotData: d.seen_pilot_data, savedAt: d.updated_at.toISOString(),
})
const practiceOf = (d: DeclarationRow): PracticeDone | null =>
  d.practice_completed_at ? { points: d.practice_points, fit: d.practice_fit, completedAt: d.practice_completed_at.toISOString() } : null

/** The expert's latest declaration in an earlier round of the same study, with that round's number and title. */
async function earlierDeclaration(db: Db, userId: number, round: { study_id: number; number: number }) {
  const row: (DeclarationRow & { number: number; title: string }) | undefined = await db('declarations as d').join('rounds as r', 'r.id', 'd.round_id')
    .where({ 'r.study_id': round.study_id, 'd.user_id': userId }).where('r.number', '<', round.number)
    .orderBy('r.number', 'desc').first('d.*', 'r.number', 'r.title')
  return row ?? null
}

/** Calibration questions the expert answered in an earlier round of the study: asked once per study. */
export async function calibrationAnsweredEarlier(db: Db, userId: number, round: { id: number; study_id: number; number: number }): Promise<number[]> {
  const ids: number[] = await db('calibration_answers as a').join('rounds as r', 'r.id', 'a.round_id')
    .where({ 'r.study_id': round.study_id, 'a.expert_id': userId }).where('r.number', '<', round.number)
    .distinct('a.question_id').pluck('a.question_id')
  return ids.sort((a, b) => a - b)
}

/**
 * The expert's entry state for a round: first visit is stamped; declaration and practice status. In a later round
 * of the same study, what the expert declared and practised last time comes back as `earlier`, to confirm or edit
 * ("still true?") rather than to answer again.
 */
export async function roundEntry(db: Db, user: User, roundId: number): Promise<RoundEntry> {
  const member = await db('round_panel').where({ round_id: roundId, user_id: user.id }).first()
  if (!member) throw new HttpError(403, 'You are not on the panel of this round')
  if (!member.first_opened_at) await db('round_panel').where({ id: member.id }).update({ first_opened_at: db.fn.now() })
  const round = await db('rounds').where({ id: roundId }).first('id', 'study_id', 'number')
  const d: DeclarationRow | undefined = await db('declarations').where({ round_id: roundId, user_id: user.id }).first()
  const before = d ? null : await earlierDeclaration(db, user.id, round)
  const pilotData: string[] = await db('pilot_datasets').where({ study_id: round.study_id }).distinct('name').orderBy('name').pluck('name')
  return {
    declaration: d ? declarationOf(d) : null,
    practice: d ? practiceOf(d) : null,
    earlier: before ? { roundNumber: before.number, roundTitle: before.title, declaration: declarationOf(before), practice: practiceOf(before) } : null,
    /** Names of the study's pilot data sets, so that the declaration can name them. */
    pilotData,
    calibrationAnsweredEarlier: await calibrationAnsweredEarlier(db, user.id, round),
    submittedAt: member.submitted_at ? member.submitted_at.toISOString() : null,
  }
}

/** A first declaration in this round takes along the practice answer of an earlier round: practice is once per study. */
async function earlierPractice(db: Db, userId: number, roundId: number) {
  const round = await db('rounds').where({ id: roundId }).first('study_id', 'number')
  const row = await db('declarations as d').join('rounds as r', 'r.id', 'd.round_id')
    .where({ 'r.study_id': round.study_id, 'd.user_id': userId }).where('r.number', '<', round.number).whereNotNull('d.practice_completed_at')
    .orderBy('r.number', 'desc').first('d.practice_points', 'd.practice_fit', 'd.practice_completed_at')
  return row
    ? { practice_points: JSON.stringify(row.practice_points), practice_fit: JSON.stringify(row.practice_fit), practice_completed_at: row.practice_completed_at }
    : {}
}

export async function saveDeclaration(db: Db, user: User, roundId: number, studyId: number, body: DeclarationBody): Promise<RoundEntry> {
  const member = await db('round_panel').where({ round_id: roundId, user_id: user.id }).first('id')
  if (!member) throw new HttpError(403, 'You are not on the panel of this round')
  const practice = await earlierPractice(db, user.id, roundId)
  await db.transaction(async (trx) => {
    await trx('declarations').insert({
      round_id: roundId, user_id: user.id, expertise: body.expertise, interests: body.interests,
      interests_text: body.interests === 'described' ? body.interestsText : '', seen_pilot_data: body.seenPilotData,
      ...practice,
    }).onConflict(['round_id', 'user_id']).merge(['expertise', 'interests', 'interests_text', 'seen_pilot_data', 'updated_at'])
    await recordAudit(trx, { actorId: user.id, studyId, action: 'declaration.save', subject: `round:${roundId}`, details: { interests: body.interests, seenPilotData: body.seenPilotData } })
  })
  return roundEntry(db, user, roundId)
}

/** "Still true": the expert's declaration (and practice) of an earlier round of the study, kept for this round as it was. */
export async function confirmEarlierDeclaration(db: Db, user: User, roundId: number, studyId: number): Promise<RoundEntry> {
  const member = await db('round_panel').where({ round_id: roundId, user_id: user.id }).first('id')
  if (!member) throw new HttpError(403, 'You are not on the panel of this round')
  const round = await db('rounds').where({ id: roundId }).first('study_id', 'number')
  const before = await earlierDeclaration(db, user.id, round)
  if (!before) throw new HttpError(409, 'There is no declaration from an earlier round of this study to confirm; fill in the form')
  await db.transaction(async (trx) => {
    const n = await trx('declarations').insert({
      round_id: roundId, user_id: user.id, expertise: before.expertise, interests: before.interests, interests_text: before.interests_text,
      seen_pilot_data: before.seen_pilot_data, ...(await earlierPractice(trx, user.id, roundId)),
    }).onConflict(['round_id', 'user_id']).ignore().returning('id')
    if (n.length === 0) return
    await recordAudit(trx, { actorId: user.id, studyId, action: 'declaration.confirm', subject: `round:${roundId}`, details: { fromRound: before.number } })
  })
  return roundEntry(db, user, roundId)
}

export async function savePractice(db: Db, user: User, roundId: number, studyId: number, points: Point[], fit: PracticeFeedback): Promise<RoundEntry> {
  await db.transaction(async (trx) => {
    const n = await trx('declarations').where({ round_id: roundId, user_id: user.id })
      .update({ practice_points: JSON.stringify(points), practice_fit: JSON.stringify(fit), practice_completed_at: trx.fn.now(), updated_at: trx.fn.now() })
    if (n === 0) throw new HttpError(400, 'Complete the declaration first', { declaration: 'Complete the declaration first' })
    await recordAudit(trx, { actorId: user.id, studyId, action: 'practice.complete', subject: `round:${roundId}` })
  })
  return roundEntry(db, user, roundId)
}
