import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'

/** Demo-only password for every seeded account (listed in the README). */
export const DEMO_PASSWORD = 'priorsmith-demo'

export const DEMO_USERS = [
  { email: 'admin@kestrel.example', display_name: 'Alex Morgan', role: 'admin' },
  { email: 'analyst@kestrel.example', display_name: 'Priya Natarajan', role: 'analyst' },
  { email: 'expert1@kestrel.example', display_name: 'Tomasz Wierzbicki', role: 'expert' },
  { email: 'expert2@kestrel.example', display_name: 'Helen Okafor', role: 'expert' },
  { email: 'expert3@kestrel.example', display_name: 'Rafael Duarte', role: 'expert' },
  { email: 'reviewer@kestrel.example', display_name: 'Ingrid Solberg', role: 'reviewer' },
] as const

export const DEMO_STUDY_TITLE = 'Kestrel Valley Water Board: cast-iron mains renewal'

/** Seeds the invented Kestrel Valley Water Board scenario once; a second run changes nothing. */
export async function seedDemo(knex: Knex): Promise<boolean> {
  const existing = await knex('users').where({ email: 'admin@kestrel.example' }).first()
  if (existing) return false
  const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 10)
  await knex.transaction(async (trx) => {
    const users = await trx('users')
      .insert(DEMO_USERS.map((u) => ({ ...u, password_hash: passwordHash })))
      .returning(['id', 'email', 'role'])
    const byEmail = new Map(users.map((u: { id: number; email: string; role: string }) => [u.email, u]))
    const analyst = byEmail.get('analyst@kestrel.example')!
    const [study] = await trx('studies')
      .insert({
        title: DEMO_STUDY_TITLE,
        context:
          'The Kestrel Valley Water Board must decide how many kilometres of old cast-iron mains to renew in the next five-year plan, ' +
          'whether to offer households a leak-alert scheme, and whether to extend pressure management to more districts. ' +
          'Pilot data are scarce, so the cost-benefit model needs priors for the burst rate of old cast-iron mains, ' +
          'the share of households that would join the leak-alert scheme, and the mean reduction in night-time flow after pressure management.',
        status: 'framing',
        owner_id: analyst.id,
      })
      .returning(['id'])
    const members = [
      { email: 'analyst@kestrel.example', study_role: 'analyst' },
      { email: 'expert1@kestrel.example', study_role: 'expert' },
      { email: 'expert2@kestrel.example', study_role: 'expert' },
      { email: 'expert3@kestrel.example', study_role: 'expert' },
      { email: 'reviewer@kestrel.example', study_role: 'reviewer' },
    ]
    await trx('study_members').insert(members.map((m) => ({ study_id: study.id, user_id: byEmail.get(m.email)!.id, study_role: m.study_role })))
  })
  return true
}
