import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  // The analyst answers each comment a reviewer returned the record with: a 'response' row points at the comment.
  await knex.raw('ALTER TABLE record_comments DROP CONSTRAINT record_comments_kind_check')
  await knex.raw("ALTER TABLE record_comments ADD CONSTRAINT record_comments_kind_check CHECK (kind IN ('comment', 'return', 'response'))")
  await knex.schema.alterTable('record_comments', (t) => {
    t.integer('reply_to').nullable().references('record_comments.id')
    t.string('outcome', 12).nullable().checkIn(['answered', 'not-changed'], 'record_comments_outcome_check')
  })
  await knex.raw(`ALTER TABLE record_comments ADD CONSTRAINT record_comments_response_check
    CHECK ((kind = 'response') = (reply_to IS NOT NULL AND outcome IS NOT NULL))`)
  await knex.raw(`CREATE UNIQUE INDEX record_comments_one_response ON record_comments (reply_to) WHERE kind = 'response'`)

  // A quantity the analyst leaves out of the prior record, with the reason; the record states it.
  await knex.schema.createTable('record_exclusions', (t) => {
    t.integer('quantity_id').primary().references('quantities.id').onDelete('CASCADE')
    t.text('reason').notNullable()
    t.integer('excluded_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('record_exclusions')
  await knex.raw('DROP INDEX IF EXISTS record_comments_one_response')
  await knex.raw('ALTER TABLE record_comments DROP CONSTRAINT IF EXISTS record_comments_response_check')
  await knex.schema.alterTable('record_comments', (t) => {
    t.dropColumn('outcome')
    t.dropColumn('reply_to')
  })
  await knex.raw("DELETE FROM record_comments WHERE kind = 'response'")
  await knex.raw('ALTER TABLE record_comments DROP CONSTRAINT record_comments_kind_check')
  await knex.raw("ALTER TABLE record_comments ADD CONSTRAINT record_comments_kind_check CHECK (kind IN ('comment', 'return'))")
}
