import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  // Uploaded pilot data: the file as received, its column mapping and the extracted likelihood data. Never edited: a new upload is a new version.
  await knex.schema.createTable('pilot_datasets', (t) => {
    t.increments('id').primary()
    t.integer('study_id').notNullable().references('studies.id').onDelete('CASCADE')
    t.integer('quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.string('name', 200).notNullable()
    t.string('filename', 200).notNullable()
    t.string('model', 24).notNullable().checkIn(['normal-known-sigma', 'normal', 'binomial', 'poisson'], 'pilot_datasets_model_check')
    t.jsonb('mapping').notNullable()
    t.text('csv').notNullable()
    t.string('sha256', 64).notNullable()
    t.integer('row_count').notNullable()
    t.jsonb('data').notNullable()
    t.jsonb('summary').notNullable()
    t.integer('uploaded_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['quantity_id', 'version'])
  })
  await knex.schema.createTable('impact_analyses', (t) => {
    t.increments('id').primary()
    t.integer('quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.integer('dataset_id').notNullable().references('pilot_datasets.id').onDelete('CASCADE')
    t.string('input_hash', 64).notNullable()
    t.jsonb('input').notNullable()
    t.jsonb('result').notNullable()
    t.integer('created_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.index(['quantity_id', 'input_hash'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('impact_analyses')
  await knex.schema.dropTableIfExists('pilot_datasets')
}
