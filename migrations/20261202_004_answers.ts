import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('rounds', (t) => {
    t.boolean('ask_calibration').notNullable().defaultTo(true)
  })
  // An expert's 5 %, 50 %, 95 % values for one calibration question in one round.
  await knex.schema.createTable('calibration_answers', (t) => {
    t.increments('id').primary()
    t.integer('round_id').notNullable().references('rounds.id').onDelete('CASCADE')
    t.integer('question_id').notNullable().references('calibration_questions.id').onDelete('CASCADE')
    t.integer('expert_id').notNullable().references('users.id')
    t.double('q05').notNullable()
    t.double('q50').notNullable()
    t.double('q95').notNullable()
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
    t.unique(['round_id', 'question_id', 'expert_id'])
  })
  await knex.raw('ALTER TABLE calibration_answers ADD CONSTRAINT calibration_answers_order_check CHECK (q05 < q50 AND q50 < q95)')
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('calibration_answers')
  await knex.schema.alterTable('rounds', (t) => {
    t.dropColumn('ask_calibration')
  })
}
