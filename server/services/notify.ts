import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { roundCalendarFile } from '../mail/calendar'
import { queueMail } from '../mail/outbox'
import { invitationMessage, reminderMessage, roundNoticeMessage } from '../mail/templates'
import { hashToken, INVITATION_DAYS, newToken } from './tokens'

interface RoundLike {
  id: number
  study_id: number
  title: string
  briefing: string
  opens_at: Date
  closes_at: Date
  /** IANA zone in which the e-mails state the round's times. */
  time_zone: string
}
interface PanelLike {
  id: number
  email: string
  name: string
  user_id: number | null
}

async function roundFacts(trx: Knex.Transaction, round: RoundLike) {
  const study = await trx('studies').where({ id: round.study_id }).first('title', 'owner_id')
  const quantities = await trx('round_items as i').join('quantities as q', 'q.id', 'i.quantity_id').where('i.round_id', round.id).orderBy('i.position').pluck('q.name')
  return { studyTitle: study.title as string, ownerId: study.owner_id as number, quantities: quantities as string[] }
}

function calendarFor(round: RoundLike, studyTitle: string, url: string): string {
  return roundCalendarFile({
    title: `Priorsmith: ${round.title}`,
    description: `Answering window for "${round.title}" (${studyTitle}). ${url}`,
    start: round.opens_at,
    end: round.closes_at,
    url,
    uid: `round-${round.id}@priorsmith`,
  })
}

/** A fresh single-use token for a panel member without an account; any earlier unused link stops working. */
async function freshInvitationToken(trx: Knex.Transaction, createdBy: number, round: RoundLike, member: PanelLike) {
  await trx('invitations').where({ panel_id: member.id }).whereNull('accepted_at').whereNull('revoked_at').update({ revoked_at: trx.fn.now() })
  const token = newToken()
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 24 * 3600 * 1000)
  await trx('invitations').insert({
    round_id: round.id, panel_id: member.id, email: member.email, name: member.name, token_hash: hashToken(token), expires_at: expiresAt, created_by: createdBy,
  })
  return { token, expiresAt }
}

/** Invitation (no account yet) or notice (account holder) for one panel member; returns the outbox id. */
export async function sendPanelInvitation(trx: Knex.Transaction, ctx: AppContext, actor: { id: number; displayName: string }, round: RoundLike, member: PanelLike): Promise<number> {
  const facts = await roundFacts(trx, round)
  const common = {
    expertName: member.name, studyTitle: facts.studyTitle, roundTitle: round.title, opensAt: round.opens_at, closesAt: round.closes_at,
    publicUrl: ctx.publicUrl, quantities: facts.quantities, analystName: actor.displayName, briefing: round.briefing, timeZone: round.time_zone,
  }
  let message
  let url: string
  if (member.user_id) {
    message = roundNoticeMessage({ ...common, roundId: round.id })
    url = `${ctx.publicUrl}/answer/${round.id}`
  } else {
    const { token, expiresAt } = await freshInvitationToken(trx, actor.id, round, member)
    message = invitationMessage({ ...common, token, linkExpiresAt: expiresAt })
    url = `${ctx.publicUrl}/invite/${token}`
  }
  await trx('round_panel').where({ id: member.id }).update({ notified_at: trx.fn.now() })
  return queueMail(trx, {
    to: member.email, toName: member.name, ...message, ics: calendarFor(round, facts.studyTitle, url),
    kind: member.user_id ? 'round-notice' : 'invitation', studyId: round.study_id, roundId: round.id,
  })
}

/** Reminder for a panel member who has not submitted; one who never accepted gets a new invitation link. */
export async function sendReminder(trx: Knex.Transaction, ctx: AppContext, round: RoundLike, member: PanelLike): Promise<number> {
  if (!member.user_id) {
    const facts = await roundFacts(trx, round)
    return sendPanelInvitation(trx, ctx, { id: facts.ownerId, displayName: '' }, round, member)
  }
  const facts = await roundFacts(trx, round)
  const answered = await trx('judgements').where({ round_id: round.id, expert_id: member.user_id }).count<{ n: string }[]>('* as n')
  const message = reminderMessage({
    expertName: member.name, studyTitle: facts.studyTitle, roundTitle: round.title, roundId: round.id, closesAt: round.closes_at,
    publicUrl: ctx.publicUrl, answered: Number(answered[0].n), total: facts.quantities.length, timeZone: round.time_zone,
  })
  return queueMail(trx, { to: member.email, toName: member.name, ...message, kind: 'reminder', studyId: round.study_id, roundId: round.id })
}
