import type { Knex } from 'knex'

/**
 * The analyst's decision on a link's correlation at reconciliation: confirm the experts' pooled value, or override it
 * with a value and a reason. The record uses the decided value. Every save lands in link_reconciliation_versions.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('link_reconciliations', (t) => {
    t.increments('id').primary()
    t.integer('link_id').notNullable().unique().references('round_links.id').onDelete('CASCADE')
    t.string('decision', 12).notNullable().checkIn(['confirm', 'override'], 'link_reconciliations_decision_check')
    // The Gaussian-copula correlation decided on; for a confirmation, the pooled value at the time.
    t.double('correlation').notNullable()
    // The experts' pooled correlation when the decision was taken (null when nobody had answered).
    t.double('pooled_correlation').nullable()
    t.text('reason').notNullable().defaultTo('')
    t.integer('decided_by').notNullable().references('users.id')
    t.timestamp('decided_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
  })
  await knex.raw('ALTER TABLE link_reconciliations ADD CONSTRAINT link_reconciliations_correlation_check CHECK (correlation > -1 AND correlation < 1)')
  await knex.schema.createTable('link_reconciliation_versions', (t) => {
    t.bigIncrements('id').primary()
    t.integer('link_reconciliation_id').notNullable().references('link_reconciliations.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.jsonb('snapshot').notNullable()
    t.integer('saved_by').notNullable().references('users.id')
    t.timestamp('saved_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['link_reconciliation_id', 'version'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('link_reconciliation_versions')
  await knex.schema.dropTableIfExists('link_reconciliations')
}
