import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  // Each study's audit events form a chain of their own: the newest event of a study is found by this index.
  await knex.raw('CREATE INDEX audit_events_study_chain_idx ON audit_events (study_id, id)')

  // Sign-in attempt counters shared by every app instance (express-rate-limit's store); keys are SHA-256 digests.
  await knex.schema.createTable('rate_limit_hits', (t) => {
    t.string('key', 80).primary()
    t.integer('hits').notNullable()
    t.timestamp('reset_at', { useTz: true }).notNullable().index()
  })

  // Failed sign-ins, kept apart from the audit chain and counted per hour, address and e-mail: the rate limits cap
  // how many rows an address can add, and rows older than the retention period are deleted.
  await knex.schema.createTable('sign_in_failures', (t) => {
    t.timestamp('hour', { useTz: true }).notNullable()
    t.string('address', 64).notNullable()
    t.string('email', 254).notNullable()
    t.integer('attempts').notNullable()
    t.timestamp('last_at', { useTz: true }).notNullable()
    t.primary(['hour', 'address', 'email'])
  })

  // Symbols are compared without regard to case (the model code would clash): two created at once cannot both land.
  await knex.raw('CREATE UNIQUE INDEX quantities_study_symbol_ci_idx ON quantities (study_id, lower(symbol))')
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP INDEX IF EXISTS quantities_study_symbol_ci_idx')
  await knex.schema.dropTableIfExists('sign_in_failures')
  await knex.schema.dropTableIfExists('rate_limit_hits')
  await knex.raw('DROP INDEX IF EXISTS audit_events_study_chain_idx')
}
