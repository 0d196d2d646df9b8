import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  // How a quantity's judgements become one prior; every save also lands in reconciliation_versions.
  await knex.schema.createTable('reconciliations', (t) => {
    t.increments('id').primary()
    t.integer('quantity_id').notNullable().unique().references('quantities.id').onDelete('CASCADE')
    t.integer('round_id').nullable().references('rounds.id')
    t.string('method', 12).notNullable().checkIn(['linear', 'logarithmic', 'consensus'], 'reconciliations_method_check')
    t.string('weights_mode', 12).notNullable().checkIn(['equal', 'performance', 'custom'], 'reconciliations_weights_check')
    t.jsonb('weights').notNullable().defaultTo('[]')
    t.text('weights_reason').notNullable().defaultTo('')
    t.double('cutoff').notNullable().defaultTo(0)
    t.jsonb('excluded_experts').notNullable().defaultTo('[]')
    t.jsonb('consensus').nullable()
    t.string('family', 16).nullable()
    t.jsonb('distribution').nullable()
    t.jsonb('fits').notNullable().defaultTo('[]')
    t.jsonb('summary').nullable()
    t.boolean('adjusted').notNullable().defaultTo(false)
    t.text('adjust_reason').notNullable().defaultTo('')
    t.text('rationale').notNullable().defaultTo('')
    t.string('status', 12).notNullable().defaultTo('draft').checkIn(['draft', 'reconciled'], 'reconciliations_status_check')
    t.timestamp('reconciled_at', { useTz: true }).nullable()
    t.integer('reconciled_by').nullable().references('users.id')
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
  })
  await knex.schema.createTable('reconciliation_versions', (t) => {
    t.bigIncrements('id').primary()
    t.integer('reconciliation_id').notNullable().references('reconciliations.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.jsonb('snapshot').notNullable()
    t.integer('saved_by').notNullable().references('users.id')
    t.timestamp('saved_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['reconciliation_id', 'version'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('reconciliation_versions')
  await knex.schema.dropTableIfExists('reconciliations')
}
