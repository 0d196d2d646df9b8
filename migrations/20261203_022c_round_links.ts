import type { Knex } from 'knex'

/**
 * A link: two quantities asked in one round that may move together. Experts answer a conditional question about
 * the pair ("Suppose the first turned out above your middle value: how likely is the second also above yours?");
 * the probability becomes a Gaussian-copula correlation. Every save of an answer lands in link_answer_versions.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('round_links', (t) => {
    t.increments('id').primary()
    t.integer('round_id').notNullable().references('rounds.id').onDelete('CASCADE')
    // The condition is on the first quantity and the question is about the second: the order is the wording's.
    t.integer('first_quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.integer('second_quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.text('wording').notNullable()
    t.integer('position').notNullable().defaultTo(0)
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
    t.index(['round_id'])
  })
  await knex.raw('ALTER TABLE round_links ADD CONSTRAINT round_links_distinct_check CHECK (first_quantity_id <> second_quantity_id)')
  // A pair is linked once per round, in whichever order it was asked.
  await knex.raw(
    'CREATE UNIQUE INDEX round_links_pair_unique ON round_links (round_id, LEAST(first_quantity_id, second_quantity_id), GREATEST(first_quantity_id, second_quantity_id))',
  )

  await knex.schema.createTable('link_answers', (t) => {
    t.increments('id').primary()
    t.integer('link_id').notNullable().references('round_links.id').onDelete('CASCADE')
    t.integer('expert_id').notNullable().references('users.id')
    t.double('probability').nullable()
    t.text('rationale').notNullable().defaultTo('')
    t.string('status', 12).notNullable().defaultTo('draft').checkIn(['draft', 'submitted'], 'link_answers_status_check')
    t.integer('version').notNullable().defaultTo(1)
    t.timestamp('submitted_at', { useTz: true }).nullable()
    t.timestamps(true, true)
    t.unique(['link_id', 'expert_id'])
  })
  await knex.raw('ALTER TABLE link_answers ADD CONSTRAINT link_answers_probability_check CHECK (probability IS NULL OR (probability > 0 AND probability < 1))')
  await knex.schema.createTable('link_answer_versions', (t) => {
    t.bigIncrements('id').primary()
    t.integer('link_answer_id').notNullable().references('link_answers.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.double('probability').nullable()
    t.text('rationale').notNullable()
    t.string('status', 12).notNullable()
    t.integer('saved_by').notNullable().references('users.id')
    t.timestamp('saved_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['link_answer_id', 'version'])
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('link_answer_versions')
  await knex.schema.dropTableIfExists('link_answers')
  await knex.schema.dropTableIfExists('round_links')
}
