import { fitAnswer, type AnswerInput, type AnswerItem } from '../../shared/elicitation/answers'
import { chosenFit } from '../../shared/elicitation/fits'
import type { CalibrationAnswer, Judgement, JudgementSaved, JudgementVersion, RoundFeedback } from '../../shared/api/judgements'
import type { ElicitationMethod } from '../../shared/schemas/rounds'
import type { Family, FitResult, Support } from '../../shared/stats/index'
import { RATIONALE_MIN, type JudgementBody } from '../../shared/schemas/judgements'
import type { StudyRole, User } from '../../shared/types/index'
import type { Db } from '../db/knex'
import { HttpError } from '../http/http-error'
import { canAnalyse, studyAccess } from './access'
import { recordAudit, recordAuditAlone } from './audit'
import { calibrationAnsweredEarlier } from './invitations'
import { studyExpertLabels } from './expert-labels'
import { supportFromRow } from './quantities'
import { assertExpertOpens, roundRow } from './rounds'
import { refuseUnlessAnswering } from './round-status'
import { reopenLinkAnswers, submitLinkAnswers, unansweredLinks } from './links'

interface JudgementRow {
  id: number
  round_id: number
  quantity_id: number
  expert_id: number
  method: ElicitationMethod
  answer: AnswerInput
  rationale: string
  fits: FitResult[]
  chosen_family: Family | null
  status: 'draft' | 'submitted'
  version: number
  submitted_at: Date | null
  updated_at: Date
  expert_name?: string
}

function toJudgement(r: JudgementRow, withName: boolean): Judgement {
  return {
    id: r.id,
    roundId: r.round_id,
    quantityId: r.quantity_id,
    expertId: r.expert_id,
    ...(withName ? { expertName: r.expert_name } : {}),
    method: r.method,
    answer: r.answer,
    rationale: r.rationale,
    fits: r.fits,
    chosenFamily: r.chosen_family,
    status: r.status,
    version: r.version,
    submittedAt: r.submitted_at ? r.submitted_at.toISOString() : null,
    updatedAt: r.updated_at.toISOString(),
  }
}

/** What a save reads before writing: the caller's role in the round's study, the round, its panel and the item. */
export interface AnsweringRow {
  study_id: number
  study_role: StudyRole | null
  status: string
  closes_at: Date
  panel_id: number | null
  method: ElicitationMethod | null
  edges: number[] | null
  chips: number | null
  ask_tails: boolean
  support_kind: Support['kind']
  support_lower: number | null
  support_upper: number | null
}

/**
 * Everything a save checks before writing, in one query (autosave runs it every second or so per typing expert): the
 * caller's study membership (as accessVia reads it), the round is open, the user is on its panel, the quantity is one
 * of its items (none when `quantityId` is null). A missing round is refused here; the other refusals stay with the
 * callers, in accessVia's and answering's order: accessFromRow for the study, saveJudgement for the round and the item.
 */
export async function readForSave(db: Db, user: User, roundId: number, quantityId: number | null): Promise<AnsweringRow> {
  const { rows } = await db.raw(
    `SELECT r.study_id, m.study_role, r.status, r.closes_at, p.id AS panel_id, i.method, i.edges, i.chips, i.ask_tails,
            q.support_kind, q.support_lower, q.support_upper
       FROM rounds r
       LEFT JOIN study_members m ON m.study_id = r.study_id AND m.user_id = :userId
       LEFT JOIN round_panel p ON p.round_id = r.id AND p.user_id = :userId
       LEFT JOIN round_items i ON i.round_id = r.id AND i.quantity_id = :quantityId
       LEFT JOIN quantities q ON q.id = i.quantity_id
      WHERE r.id = :roundId
      LIMIT 1`,
    { userId: user.id, roundId, quantityId },
  )
  if (!rows[0]) throw new HttpError(404, 'Round not found')
  return rows[0]
}

/** The answered item and its quantity's support, or the refusal: round closed, user not on the panel, item not in the round. */
function answeringItem(row: AnsweringRow) {
  refuseUnlessAnswering(row, row.panel_id !== null)
  if (!row.method) throw new HttpError(404, 'This quantity is not part of the round')
  const item: AnswerItem = { method: row.method, edges: row.edges ?? undefined, chips: row.chips ?? undefined, askTails: row.ask_tails }
  return { studyId: row.study_id, item, support: supportFromRow(row) }
}

async function assertAnswering(db: Db, user: User, roundId: number) {
  const round = await roundRow(db, roundId)
  const member = await db('round_panel').where({ round_id: roundId, user_id: user.id }).first('id', 'submitted_at')
  refuseUnlessAnswering(round, !!member)
  return { round, member: member! }
}

/** The expert's own judgements, or every judgement with names for the study's analysts. */
export async function listJudgements(db: Db, roundId: number, viewer: { user: User; seesAll: boolean }): Promise<Judgement[]> {
  const q = db('judgements as j').join('users as u', 'u.id', 'j.expert_id').where('j.round_id', roundId).select('j.*', 'u.display_name as expert_name').orderBy(['j.quantity_id', 'j.expert_id'])
  if (!viewer.seesAll) q.where('j.expert_id', viewer.user.id)
  const rows: JudgementRow[] = await q
  return rows.map((r) => toJudgement(r, viewer.seesAll))
}

/**
 * Saves one draft answer: incoherent input → 400 with field errors; stale version → 409; a submitted
 * answer is frozen. The fits are recomputed here with the same engine the browser ran.
 */
export async function saveJudgement(db: Db, user: User, roundId: number, quantityId: number, body: JudgementBody, read: AnsweringRow): Promise<JudgementSaved & { studyId: number }> {
  const { studyId, item, support } = answeringItem(read)
  if (body.method !== item.method) throw new HttpError(400, 'This quantity uses another method in this round', { method: `This round uses the ${item.method} method here` })
  const input: AnswerInput = item.method === 'quantile'
    ? { lower: body.lower, upper: body.upper, points: body.points }
    : item.method === 'fixed-interval' ? { edges: body.edges ?? item.edges, probs: body.probs ?? [] } : { edges: body.edges ?? item.edges, chips: body.chips ?? [] }
  const { check, fits, fitMessage } = fitAnswer(item, input, support)
  if (Object.keys(check.problems).length) throw new HttpError(400, 'Some values need attention', check.problems)
  // A complete answer whose values no distribution can be fitted to (values near ±1e308) is refused, not stored fitless.
  if (check.complete && fits.length === 0 && (check.points?.length ?? 0) >= 2) {
    const field = item.method === 'quantile' ? 'points' : item.method === 'fixed-interval' ? 'probs' : 'chips'
    throw new HttpError(400, fitMessage ?? 'No distribution can be fitted to these values', { [field]: fitMessage ?? 'No distribution can be fitted to these values' })
  }
  const chosen = body.chosenFamily ?? null
  if (chosen && !fits.some((f) => f.distribution.family === chosen)) {
    throw new HttpError(400, 'That family was not fitted to this answer', { chosenFamily: 'Choose one of the fitted families' })
  }
  const stored = { method: item.method, answer: JSON.stringify(input), rationale: body.rationale ?? '', fits: JSON.stringify(fits), chosen_family: chosen }
  const saved = await writeDraft(db, { roundId, quantityId, expertId: user.id }, stored, body.version)
  if (!saved) throw await refusalFor(db, { roundId, quantityId, expertId: user.id })
  return { judgement: toJudgement(saved, false), fits, complete: check.complete, fitMessage, studyId }
}

interface DraftKey { roundId: number; quantityId: number; expertId: number }
interface DraftValues { method: string; answer: string; rationale: string; fits: string; chosen_family: string | null }

/**
 * Writes the draft and its version row in one statement, so a save is atomic without a transaction's extra round
 * trips: version 0 inserts (nothing if the row already exists), version n updates only a draft still at version n.
 * Returns undefined when nothing was written; refusalFor says why.
 */
async function writeDraft(db: Db, key: DraftKey, v: DraftValues, version: number): Promise<JudgementRow | undefined> {
  const values = [v.method, v.answer, v.rationale, v.fits, v.chosen_family]
  const keep = `INSERT INTO judgement_versions (judgement_id, version, answer, rationale, fits, chosen_family, status, saved_by)
    SELECT id, version, answer, rationale, fits, chosen_family, 'draft', ? FROM saved`
  const result = version === 0
    ? await db.raw(`WITH saved AS (
        INSERT INTO judgements (method, answer, rationale, fits, chosen_family, round_id, quantity_id, expert_id, version)
        VALUES (?, ?::jsonb, ?, ?::jsonb, ?, ?, ?, ?, 1)
        ON CONFLICT (round_id, quantity_id, expert_id) DO NOTHING RETURNING *
      ), kept AS (${keep}) SELECT * FROM saved`, [...values, key.roundId, key.quantityId, key.expertId, key.expertId])
    : await db.raw(`WITH saved AS (
        UPDATE judgements SET method = ?, answer = ?::jsonb, rationale = ?, fits = ?::jsonb, chosen_family = ?, version = version + 1, updated_at = now()
        WHERE round_id = ? AND quantity_id = ? AND expert_id = ? AND status = 'draft' AND version = ?
        RETURNING *
      ), kept AS (${keep}) SELECT * FROM saved`, [...values, key.roundId, key.quantityId, key.expertId, version, key.expertId])
  return result.rows[0]
}

/** Why writeDraft wrote nothing: the answer is submitted, was saved elsewhere since, or does not exist. */
async function refusalFor(db: Db, key: DraftKey): Promise<HttpError> {
  const current: Pick<JudgementRow, 'status'> | undefined = await db('judgements').where({ round_id: key.roundId, quantity_id: key.quantityId, expert_id: key.expertId }).first('status')
  if (!current) return new HttpError(409, 'This answer was removed or never saved; reload')
  if (current.status === 'submitted') return new HttpError(409, 'You have submitted this round; ask the analyst to reopen it to change an answer')
  return new HttpError(409, 'This answer was saved from another window or device since you loaded it; reload to continue from the newer version')
}

/** Freezes every answer of the expert in this round; all must be complete, with a rationale. */
export async function submitRound(db: Db, user: User, roundId: number) {
  const { round, member } = await assertAnswering(db, user, roundId)
  if (member.submitted_at) throw new HttpError(409, 'You have already submitted this round')
  const items = await db('round_items as i').join('quantities as q', 'q.id', 'i.quantity_id').where('i.round_id', roundId).select('i.quantity_id', 'q.name').orderBy('i.position')
  const judgements: JudgementRow[] = await db('judgements').where({ round_id: roundId, expert_id: user.id })
  const fields: Record<string, string> = {}
  for (const item of items) {
    const j = judgements.find((x) => x.quantity_id === item.quantity_id)
    if (!j || j.fits.length === 0) fields[`quantity.${item.quantity_id}`] = `${item.name}: complete your answer`
    else if (j.rationale.trim().length < RATIONALE_MIN) fields[`quantity.${item.quantity_id}`] = `${item.name}: say in a sentence or two what evidence drove your judgement`
  }
  if (round.ask_calibration) {
    const questions = await db('calibration_questions').where({ study_id: round.study_id }).select('id', 'position').orderBy(['position', 'id'])
    // Asked once per study: an answer from an earlier round counts.
    const answered = new Set([
      ...(await db('calibration_answers').where({ round_id: roundId, expert_id: user.id }).pluck('question_id')),
      ...(await calibrationAnsweredEarlier(db, user.id, round)),
    ])
    questions.forEach((q, i) => {
      if (!answered.has(q.id)) fields[`calibration.${q.id}`] = `Calibration question ${i + 1}: give your 5 %, 50 % and 95 % values`
    })
  }
  Object.assign(fields, await unansweredLinks(db, user, roundId))
  if (Object.keys(fields).length) throw new HttpError(400, 'Some answers are not complete yet', fields)
  await db.transaction(async (trx) => {
    // Two submits at once: the second waits here and finds the round already submitted.
    const locked = await trx('round_panel').where({ id: member.id }).forUpdate().first('submitted_at')
    if (locked.submitted_at) throw new HttpError(409, 'You have already submitted this round')
    for (const j of judgements) {
      await trx('judgements').where({ id: j.id }).update({ status: 'submitted', submitted_at: trx.fn.now(), version: j.version + 1, updated_at: trx.fn.now() })
      await trx('judgement_versions').insert({
        judgement_id: j.id, version: j.version + 1, answer: JSON.stringify(j.answer), rationale: j.rationale, fits: JSON.stringify(j.fits), chosen_family: j.chosen_family, status: 'submitted', saved_by: user.id,
      })
    }
    const linkAnswers = await submitLinkAnswers(trx, user, roundId)
    await trx('round_panel').where({ id: member.id }).update({ submitted_at: trx.fn.now() })
    await recordAudit(trx, { actorId: user.id, studyId: round.study_id, action: 'round.submit', subject: `round:${roundId}`, details: { judgements: judgements.length, ...(linkAnswers ? { linkAnswers } : {}) } })
  })
}

/** The analyst reopens an expert's submitted answers (history kept; the reason is audited). */
export async function reopenSubmission(db: Db, analyst: User, roundId: number, expertId: number, reason: string) {
  const round = await roundRow(db, roundId)
  if (round.status !== 'open') throw new HttpError(409, 'Only answers in an open round can be reopened; extend the round first')
  const member = await db('round_panel').where({ round_id: roundId, user_id: expertId }).first('id', 'submitted_at')
  if (!member) throw new HttpError(404, 'This expert is not on the panel')
  if (!member.submitted_at) throw new HttpError(409, 'This expert has not submitted')
  await db.transaction(async (trx) => {
    await trx('judgements').where({ round_id: roundId, expert_id: expertId }).update({ status: 'draft', submitted_at: null, version: trx.raw('version + 1'), updated_at: trx.fn.now() })
    await reopenLinkAnswers(trx, roundId, expertId)
    await trx('round_panel').where({ id: member.id }).update({ submitted_at: null })
    await recordAudit(trx, { actorId: analyst.id, studyId: round.study_id, action: 'round.reopen', subject: `round:${roundId}`, details: { expertId, reason } })
  })
}

/** Every saved version of one judgement, oldest first, for the study team or the expert who gave it. */
export async function judgementHistory(db: Db, user: User, judgementId: number): Promise<JudgementVersion[]> {
  const j = await db('judgements as j').join('rounds as r', 'r.id', 'j.round_id').where('j.id', judgementId).first('j.expert_id', 'r.study_id')
  if (!j) throw new HttpError(404, 'Judgement not found')
  const access = await studyAccess(db, user, j.study_id)
  if (!canAnalyse(access) && access.role !== 'reviewer' && j.expert_id !== user.id) throw new HttpError(403, 'You can only see your own answers')
  const rows = await db('judgement_versions as v').join('users as u', 'u.id', 'v.saved_by').where('v.judgement_id', judgementId)
    .select('v.version', 'v.answer', 'v.rationale', 'v.fits', 'v.chosen_family', 'v.status', 'v.saved_at', 'u.display_name as saved_by').orderBy('v.version')
  return rows.map((r) => ({ version: r.version, answer: r.answer, rationale: r.rationale, fits: r.fits, chosenFamily: r.chosen_family, status: r.status, savedAt: r.saved_at.toISOString(), savedBy: r.saved_by }))
}

export async function listCalibrationAnswers(db: Db, roundId: number, viewer: { user: User; seesAll: boolean }): Promise<CalibrationAnswer[]> {
  const q = db('calibration_answers as a').join('users as u', 'u.id', 'a.expert_id').where('a.round_id', roundId)
    .select('a.question_id', 'a.expert_id', 'u.display_name as expert_name', 'a.q05', 'a.q50', 'a.q95', 'a.version', 'a.updated_at').orderBy(['a.question_id', 'a.expert_id'])
  if (!viewer.seesAll) q.where('a.expert_id', viewer.user.id)
  const rows = await q
  return rows.map((r) => ({
    questionId: r.question_id, expertId: r.expert_id, ...(viewer.seesAll ? { expertName: r.expert_name } : {}),
    q05: r.q05, q50: r.q50, q95: r.q95, version: r.version, updatedAt: r.updated_at.toISOString(),
  }))
}

export async function saveCalibrationAnswer(db: Db, user: User, roundId: number, questionId: number, body: { q05: number; q50: number; q95: number; version: number }): Promise<CalibrationAnswer> {
  const { round, member } = await assertAnswering(db, user, roundId)
  if (member.submitted_at) throw new HttpError(409, 'You have submitted this round; ask the analyst to reopen it to change an answer')
  if (!round.ask_calibration) throw new HttpError(400, 'This round asks no calibration questions')
  const q = await db('calibration_questions').where({ id: questionId, study_id: round.study_id }).first('id')
  if (!q) throw new HttpError(404, 'Calibration question not found')
  return db.transaction(async (trx) => {
    const existing = await trx('calibration_answers').where({ round_id: roundId, question_id: questionId, expert_id: user.id }).forUpdate().first()
    const values = { q05: body.q05, q50: body.q50, q95: body.q95 }
    if (!existing) {
      if (body.version !== 0) throw new HttpError(409, 'This answer was never saved; reload')
      const [row] = await trx('calibration_answers').insert({ ...values, round_id: roundId, question_id: questionId, expert_id: user.id }).returning('*')
      return { questionId, ...values, version: row.version }
    }
    if (existing.version !== body.version) throw new HttpError(409, 'This answer was saved from another window or device since you loaded it; reload')
    const [row] = await trx('calibration_answers').where({ id: existing.id }).update({ ...values, version: existing.version + 1, updated_at: trx.fn.now() }).returning('*')
    return { questionId, ...values, version: row.version }
  })
}

/**
 * For a feedback round: per quantity, the latest earlier closed round of the study that asked it, the expert's own
 * fitted answer there, and the other experts' submitted fits under the study's expert labels (the same on every screen).
 */
export async function feedbackFor(db: Db, user: User, roundId: number): Promise<RoundFeedback[]> {
  const round = await roundRow(db, roundId)
  await assertExpertOpens(db, user, round)
  await recordAuditAlone(db, { actorId: user.id, studyId: round.study_id, action: 'feedback.view', subject: `round:${roundId}` })
  if (!round.feedback_enabled) throw new HttpError(404, 'This round shows no feedback from earlier rounds')
  const items = await db('round_items').where({ round_id: roundId }).pluck('quantity_id')
  const labels = await studyExpertLabels(db, round.study_id)
  const out: RoundFeedback[] = []
  for (const quantityId of items) {
    // Only a round that has closed: while a round is open its answers are still changing and private to each expert.
    const prev = await db('rounds as r').join('round_items as i', 'i.round_id', 'r.id')
      .where({ 'r.study_id': round.study_id, 'i.quantity_id': quantityId }).where('r.number', '<', round.number).whereIn('r.status', ['closed', 'reconciled'])
      .orderBy('r.number', 'desc').first('r.id', 'r.number')
    if (!prev) {
      out.push({ quantityId, previousRound: null, mine: null, others: [] })
      continue
    }
    const rows: JudgementRow[] = await db('judgements').where({ round_id: prev.id, quantity_id: quantityId, status: 'submitted' }).orderBy('expert_id')
    const pick = (j: JudgementRow) => chosenFit(j.fits, j.chosen_family)?.distribution ?? null
    const mine = rows.find((j) => j.expert_id === user.id)
    out.push({
      quantityId,
      previousRound: { id: prev.id, number: prev.number },
      mine: mine ? { answer: mine.answer, distribution: pick(mine), rationale: mine.rationale } : null,
      others: rows.filter((j) => j.expert_id !== user.id).map((j) => ({ label: labels.ofUser(j.expert_id), distribution: pick(j), rationale: j.rationale })),
    })
  }
  return out
}
