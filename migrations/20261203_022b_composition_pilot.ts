import type { Knex } from 'knex'

/**
 * Multinomial pilot data of a composition (counts per share, as recorded) and the latest impact analysis of its
 * Dirichlet on each dataset. A dataset is never edited: a new upload is a new version.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('composition_datasets', (t) => {
    t.increments('id').primary()
    t.integer('composition_id').notNullable().references('compositions.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.string('name', 200).notNullable()
    t.string('filename', 200).notNullable()
    t.jsonb('mapping').notNullable()
    t.text('csv').notNullable()
    t.string('sha256', 64).notNullable()
    t.integer('row_count').notNullable()
    t.jsonb('data').notNullable()
    t.jsonb('summary').notNullable()
    t.integer('uploaded_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['composition_id', 'version'])
  })
  await knex.schema.createTable('composition_analyses', (t) => {
    t.increments('id').primary()
    t.integer('composition_id').notNullable().references('compositions.id').onDelete('CASCADE')
    t.integer('dataset_id').notNullable().references('composition_datasets.id').onDelete('CASCADE')
    t.jsonb('result').notNullable()
    t.integer('created_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['composition_id'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('composition_analyses')
  await knex.schema.dropTableIfExists('composition_datasets')
}
