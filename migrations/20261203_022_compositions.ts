import type { Knex } from 'knex'

/**
 * A composition: 2–10 proportion quantities of one study whose shares add up to one (with an optional "other" share
 * that takes the rest), listed in order. Its joint prior is a Dirichlet fitted to the shares' reconciled marginals.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('compositions', (t) => {
    t.increments('id').primary()
    t.integer('study_id').notNullable().references('studies.id').onDelete('CASCADE')
    t.string('name', 120).notNullable()
    t.text('wording').notNullable()
    t.boolean('residual').notNullable().defaultTo(false)
    t.string('residual_label', 120).notNullable().defaultTo('')
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
    t.index(['study_id'])
  })
  await knex.schema.createTable('composition_shares', (t) => {
    t.integer('composition_id').notNullable().references('compositions.id').onDelete('CASCADE')
    t.integer('quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.integer('position').notNullable()
    t.primary(['composition_id', 'quantity_id'])
    t.unique(['composition_id', 'position'])
    t.index(['quantity_id'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('composition_shares')
  await knex.schema.dropTableIfExists('compositions')
}
