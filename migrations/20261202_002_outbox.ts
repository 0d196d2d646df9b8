import type { Knex } from 'knex'

/** Every e-mail passes through this table before a background worker delivers it (server/mail). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('outbox_messages', (t) => {
    t.increments('id').primary()
    t.integer('study_id').nullable().references('studies.id').onDelete('SET NULL')
    // No foreign key: the rounds table arrives in a later migration.
    t.integer('round_id').nullable()
    t.string('kind', 40).notNullable()
    t.string('to_address', 254).notNullable()
    t.string('to_name', 100).nullable()
    t.string('subject', 300).notNullable()
    t.text('text_body').notNullable()
    t.text('html_body').nullable()
    t.text('ics').nullable()
    t.string('status', 16).notNullable().defaultTo('queued')
      .checkIn(['queued', 'sending', 'sent', 'failed'], 'outbox_messages_status_check')
    t.integer('attempts').notNullable().defaultTo(0)
    t.text('last_error').nullable()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('sent_at', { useTz: true }).nullable()
    t.string('message_id', 255).nullable()
    t.index(['status', 'created_at'], 'outbox_messages_status_created_idx')
    t.index(['study_id', 'created_at'], 'outbox_messages_study_created_idx')
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('outbox_messages')
}
