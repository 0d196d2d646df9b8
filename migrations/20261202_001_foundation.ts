import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary()
    t.string('email', 254).notNullable().unique()
    t.string('display_name', 100).notNullable()
    t.string('role', 16).notNullable().checkIn(['admin', 'analyst', 'expert', 'reviewer'], 'users_role_check')
    t.string('password_hash', 100).notNullable()
    t.boolean('disabled').notNullable().defaultTo(false)
    t.timestamps(true, true)
  })
  await knex.raw('CREATE UNIQUE INDEX users_email_lower_idx ON users (lower(email))')

  // Session table as connect-pg-simple expects it.
  await knex.raw(`
    CREATE TABLE "session" (
      "sid" varchar NOT NULL COLLATE "default" PRIMARY KEY,
      "sess" json NOT NULL,
      "expire" timestamp(6) NOT NULL
    )`)
  await knex.raw('CREATE INDEX "IDX_session_expire" ON "session" ("expire")')

  await knex.schema.createTable('studies', (t) => {
    t.increments('id').primary()
    t.string('title', 200).notNullable()
    t.text('context').notNullable()
    t.string('status', 16).notNullable().defaultTo('framing').checkIn(['framing', 'eliciting', 'reconciling', 'recorded'], 'studies_status_check')
    t.integer('owner_id').notNullable().references('users.id')
    t.integer('version').notNullable().defaultTo(1)
    t.timestamps(true, true)
  })

  await knex.schema.createTable('study_members', (t) => {
    t.integer('study_id').notNullable().references('studies.id').onDelete('CASCADE')
    t.integer('user_id').notNullable().references('users.id')
    t.string('study_role', 16).notNullable().checkIn(['analyst', 'expert', 'reviewer'], 'study_members_role_check')
    t.timestamp('added_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.primary(['study_id', 'user_id'])
  })

  // Append-only audit log; each event stores the hash of the one before it.
  await knex.schema.createTable('audit_events', (t) => {
    t.bigIncrements('id').primary()
    t.timestamp('at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.integer('actor_id').nullable().references('users.id')
    t.integer('study_id').nullable().references('studies.id')
    t.string('action', 64).notNullable()
    t.string('subject', 64).nullable()
    t.jsonb('details').notNullable().defaultTo('{}')
    t.string('prev_hash', 64).notNullable()
    t.string('hash', 64).notNullable().unique()
  })
  await knex.raw(`
    CREATE FUNCTION audit_events_append_only() RETURNS trigger AS $$
    BEGIN RAISE EXCEPTION 'audit_events is append-only'; END; $$ LANGUAGE plpgsql`)
  await knex.raw(`
    CREATE TRIGGER audit_events_no_change BEFORE UPDATE OR DELETE ON audit_events
    FOR EACH ROW EXECUTE FUNCTION audit_events_append_only()`)
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP TRIGGER IF EXISTS audit_events_no_change ON audit_events')
  await knex.raw('DROP FUNCTION IF EXISTS audit_events_append_only()')
  await knex.schema.dropTableIfExists('audit_events')
  await knex.schema.dropTableIfExists('study_members')
  await knex.schema.dropTableIfExists('studies')
  await knex.schema.dropTableIfExists('session')
  await knex.schema.dropTableIfExists('users')
}
