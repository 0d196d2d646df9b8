import type { Knex } from 'knex'

/** The time zone (IANA name) in which a round's e-mails state its times; rounds made before it keep UTC. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('rounds', (t) => {
    t.string('time_zone', 64).notNullable().defaultTo('UTC')
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('rounds', (t) => {
    t.dropColumn('time_zone')
  })
}
