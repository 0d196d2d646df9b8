import type { Knex } from 'knex'

/**
 * Writes a round link and the experts' submitted answers straight into the tables, for suites that test what happens to
 * links after the round (reconciliation, joint draws) without going through the expert's question.
 */
export async function insertLink(db: Knex, roundId: number, firstQuantityId: number, secondQuantityId: number, answers: { expertId: number; probability: number }[]): Promise<number> {
  const [link] = await db('round_links').insert({
    round_id: roundId, first_quantity_id: firstQuantityId, second_quantity_id: secondQuantityId,
    wording: 'Suppose the first turned out above your middle value. How likely is it that the second is also above yours?',
  }).returning('id')
  for (const a of answers) {
    const [answer] = await db('link_answers').insert({
      link_id: link.id, expert_id: a.expertId, probability: a.probability, rationale: 'Both follow the same winter pressure pattern.',
      status: 'submitted', submitted_at: new Date(),
    }).returning('id')
    await db('link_answer_versions').insert({ link_answer_id: answer.id, version: 1, probability: a.probability, rationale: 'Both follow the same winter pressure pattern.', status: 'submitted', saved_by: a.expertId })
  }
  return link.id as number
}
