import { labelExperts } from '../../shared/record/expert-labels'
import type { Db } from '../db/knex'

export interface StudyExpertLabels {
  /** The label of an expert with an account (judgements, declarations, reconciliation). */
  ofUser(userId: number): string
  /** The label of a panel member, account or not (progress of a round). */
  ofPanelMember(member: { userId: number | null; email: string }): string
  /** Whether an account is one of the study's experts (on a panel, or with an answer). */
  isExpert(userId: number): boolean
  /** The label of the expert an e-mail address belongs to (the outbox), or null for anyone not on a panel. */
  ofAddress(email: string): string | null
}

const keyOf = (userId: number | null, email: string) => (userId ? `user:${userId}` : `email:${email.toLowerCase()}`)

/**
 * The study's expert labels, in the order each expert first joined one of its panels (the lowest panel row id).
 * Experts who answered without a panel row (none in normal use) follow in the order of their first answer.
 */
export async function studyExpertLabels(db: Db, studyId: number): Promise<StudyExpertLabels> {
  const panel = await db('round_panel as p').join('rounds as r', 'r.id', 'p.round_id').where('r.study_id', studyId)
    .select('p.user_id', 'p.email').orderBy('p.id')
  const answered = await db('judgements as j').join('rounds as r', 'r.id', 'j.round_id').where('r.study_id', studyId)
    .groupBy('j.expert_id').select('j.expert_id').min('j.id as first').orderBy('first')
  // A row still waiting for its invitee counts as the account that later rows of the same address belong to.
  const accountOf = new Map(panel.filter((p) => p.user_id).map((p) => [String(p.email).toLowerCase(), p.user_id as number]))
  const rowKey = (userId: number | null, email: string) => keyOf(userId ?? accountOf.get(email.toLowerCase()) ?? null, email)
  const labels = labelExperts([
    ...panel.map((p) => rowKey(p.user_id, p.email)),
    ...answered.map((a) => keyOf(a.expert_id, '')),
  ])
  const lookup = (key: string) => labels.get(key) ?? 'Expert ?'
  const addresses = new Map(panel.map((p) => [String(p.email).toLowerCase(), rowKey(p.user_id, p.email)]))
  return {
    ofUser: (userId) => lookup(keyOf(userId, '')),
    ofPanelMember: (m) => lookup(rowKey(m.userId, m.email)),
    isExpert: (userId) => labels.has(keyOf(userId, '')),
    ofAddress: (email) => {
      const key = addresses.get(email.toLowerCase())
      return key ? lookup(key) : null
    },
  }
}
