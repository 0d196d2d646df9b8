import { createHash } from 'node:crypto'
import type { Knex } from 'knex'
import { readCsvTable } from '../shared/elicitation/csv'
import { extractPilotData, type PilotMapping } from '../shared/elicitation/pilot'
import { canonicalJson } from '../server/services/audit'

const sha256 = (value: unknown) => createHash('sha256').update(canonicalJson(value)).digest('hex')

export async function up(knex: Knex): Promise<void> {
  // Which reconciled prior an analysis evaluated, so the record shows the analysis of its own final prior.
  await knex.schema.alterTable('impact_analyses', (t) => {
    t.string('prior_hash', 64).nullable()
    t.index(['quantity_id', 'prior_hash'])
  })
  const rows = await knex('impact_analyses').select('id', 'result')
  for (const r of rows) {
    const reconciled = (r.result?.candidates ?? []).find((c: { kind: string }) => c.kind === 'reconciled')
    if (reconciled) await knex('impact_analyses').where({ id: r.id }).update({ prior_hash: sha256(reconciled.prior) })
  }
  // Binomial pilot data keep their rows, so the evidence carries the per-row coefficients: read again from the stored file.
  const binomial = await knex('pilot_datasets').where({ model: 'binomial' }).select('id', 'csv', 'mapping')
  for (const d of binomial) {
    const { delimiter = ',', ...mapping } = d.mapping as PilotMapping & { delimiter?: string }
    const { rows, lines } = readCsvTable(d.csv, delimiter)
    try {
      const { data } = extractPilotData(rows, mapping as PilotMapping, lines)
      await knex('pilot_datasets').where({ id: d.id }).update({ data: JSON.stringify(data) })
    } catch {
      // A file stored before today's checks that they now refuse keeps its totals (the evidence then uses C(n, y)).
    }
  }
  // The analyst's reason for stating a final prior without an impact analysis, tied to that prior.
  await knex.schema.createTable('impact_not_run', (t) => {
    t.increments('id').primary()
    t.integer('quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.string('prior_hash', 64).notNullable()
    t.text('reason').notNullable()
    t.integer('created_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['quantity_id', 'prior_hash'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('impact_not_run')
  await knex.schema.alterTable('impact_analyses', (t) => {
    t.dropIndex(['quantity_id', 'prior_hash'])
    t.dropColumn('prior_hash')
  })
}
