import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'
import Papa from 'papaparse'
import { extractPilotData, type PilotMapping } from '../shared/elicitation/pilot'

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

export const DEMO_QUANTITIES = [
  {
    name: 'Burst rate of old cast-iron mains',
    symbol: 'burst_rate',
    unit: 'bursts per 100 km per year',
    question:
      'Over the five years 2027–2031, what will be the average number of bursts per 100 km per year on the Board’s cast-iron mains laid before 1960, if no further renewal takes place?',
    support_kind: 'positive',
    assumptions: 'Pressure regime as in 2025; winters similar to the last ten years; no renewal beyond work already contracted.',
    evidence_notes: 'Burst logs 2015–2025 for 412 km of pre-1960 cast iron; neighbouring boards report 8–20 bursts per 100 km per year for similar stock.',
  },
  {
    name: 'Leak-alert scheme uptake',
    symbol: 'alert_uptake',
    unit: 'share of households',
    question:
      'If the Board offers every household in the valley a free leak-alert meter with a one-page letter, what share of households will have joined the scheme twelve months after the offer?',
    support_kind: 'proportion',
    assumptions: 'One letter and one reminder; no financial incentive beyond the free meter.',
    evidence_notes: 'A pilot survey asked 120 households in two districts whether they would join.',
  },
  {
    name: 'Night-flow reduction after pressure management',
    symbol: 'night_flow_cut',
    unit: 'L/s per district',
    question:
      'In a district metered area where pressure-reducing valves lower average night pressure by about 15 m, what will be the mean reduction in minimum night flow, in litres per second, one year after installation?',
    support_kind: 'real',
    assumptions: 'District of 2,000–4,000 connections; valves set and maintained as specified.',
    evidence_notes: 'Eight pilot districts measured before and after installation in 2024–2025.',
  },
] as const

export const DEMO_CALIBRATION = [
  { question: 'How many bursts were recorded on the Board’s pre-1960 cast-iron mains in 2024?', unit: 'bursts', true_value: 61 },
  { question: 'What was the average minimum night flow in district KV-07 in March 2025?', unit: 'L/s', true_value: 7.4 },
  { question: 'What share of households in the valley had a smart water meter at the end of 2025?', unit: '%', true_value: 18 },
  { question: 'How many kilometres of cast-iron main did the Board renew in 2020–2024?', unit: 'km', true_value: 37 },
]

/** Invented pilot data, one file per quantity (seeds/pilot/). */
export const DEMO_PILOT: { symbol: string; file: string; name: string; mapping: PilotMapping }[] = [
  { symbol: 'burst_rate', file: 'burst-logs.csv', name: 'Burst logs 2025, eight districts', mapping: { model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure_100km_years' } },
  { symbol: 'alert_uptake', file: 'leak-alert-survey.csv', name: 'Leak-alert pilot survey, 120 households', mapping: { model: 'binomial', binaryColumn: 'would_join' } },
  { symbol: 'night_flow_cut', file: 'night-flow-pilot.csv', name: 'Pressure-management pilot, eight districts', mapping: { model: 'normal-known-sigma', valueColumn: 'reduction_l_per_s', sigma: 1.5 } },
]

/** Seeds the invented Kestrel Valley Water Board scenario; each part once, so a second run changes nothing. */
export async function seedDemo(knex: Knex): Promise<boolean> {
  const existing = await knex('users').where({ email: 'admin@kestrel.example' }).first()
  if (existing) return seedStudyContent(knex)
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
  await seedStudyContent(knex)
  return true
}

/** Quantities and calibration questions of the demo study, when it has none yet. */
async function seedStudyContent(knex: Knex): Promise<boolean> {
  const study = await knex('studies').where({ title: DEMO_STUDY_TITLE }).first('id')
  if (!study) return false
  let changed = false
  if (!(await knex('quantities').where({ study_id: study.id }).first('id'))) {
    await knex('quantities').insert(DEMO_QUANTITIES.map((q, i) => ({ ...q, study_id: study.id, position: i + 1 })))
    changed = true
  }
  if (!(await knex('calibration_questions').where({ study_id: study.id }).first('id'))) {
    await knex('calibration_questions').insert(DEMO_CALIBRATION.map((q, i) => ({ ...q, study_id: study.id, position: i + 1 })))
    changed = true
  }
  if (!(await knex('pilot_datasets').where({ study_id: study.id }).first('id'))) {
    const analyst = await knex('users').where({ email: 'analyst@kestrel.example' }).first('id')
    for (const p of DEMO_PILOT) {
      const quantity = await knex('quantities').where({ study_id: study.id, symbol: p.symbol }).first('id')
      if (!quantity) continue
      const csv = readFileSync(new URL(`./pilot/${p.file}`, import.meta.url), 'utf8')
      const { data, summary } = extractPilotData(Papa.parse<string[]>(csv, { delimiter: ',', skipEmptyLines: 'greedy' }).data, p.mapping)
      await knex('pilot_datasets').insert({
        study_id: study.id, quantity_id: quantity.id, version: 1, name: p.name, filename: p.file, model: p.mapping.model,
        mapping: JSON.stringify({ ...p.mapping, delimiter: ',' }), csv, sha256: createHash('sha256').update(csv).digest('hex'),
        row_count: summary.rows, data: JSON.stringify(data), summary: JSON.stringify(summary), uploaded_by: analyst.id,
      })
    }
    changed = true
  }
  return changed
}
