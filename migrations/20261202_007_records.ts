import type { Knex } from 'knex'

export async function up(knex: Knex): Promise<void> {
  // One prior record per study and version: draft → in review → signed off (returned records go back to draft).
  await knex.schema.createTable('prior_records', (t) => {
    t.increments('id').primary()
    t.integer('study_id').notNullable().references('studies.id').onDelete('CASCADE')
    t.integer('version').notNullable()
    t.string('status', 12).notNullable().defaultTo('draft').checkIn(['draft', 'in_review', 'signed_off'], 'prior_records_status_check')
    t.boolean('show_names').notNullable().defaultTo(false)
    t.jsonb('content').nullable()
    t.string('content_hash', 64).nullable()
    t.integer('based_on').nullable().references('prior_records.id')
    t.timestamp('submitted_at', { useTz: true }).nullable()
    t.integer('submitted_by').nullable().references('users.id')
    t.timestamp('signed_off_at', { useTz: true }).nullable()
    t.integer('signed_off_by').nullable().references('users.id')
    t.string('audit_head', 64).nullable()
    t.integer('row_version').notNullable().defaultTo(1)
    t.timestamps(true, true)
    t.unique(['study_id', 'version'])
  })
  // A signed-off version is immutable: the database itself refuses to change or delete it.
  await knex.raw(`
    CREATE FUNCTION prior_records_freeze() RETURNS trigger AS $$
    BEGIN
      IF OLD.status = 'signed_off' THEN
        RAISE EXCEPTION 'prior record % version % is signed off and cannot change', OLD.study_id, OLD.version;
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END; $$ LANGUAGE plpgsql`)
  await knex.raw(`CREATE TRIGGER prior_records_frozen BEFORE UPDATE OR DELETE ON prior_records FOR EACH ROW EXECUTE FUNCTION prior_records_freeze()`)

  await knex.schema.createTable('record_comments', (t) => {
    t.increments('id').primary()
    t.integer('record_id').notNullable().references('prior_records.id')
    t.string('section', 80).notNullable()
    t.text('body').notNullable()
    t.integer('author_id').notNullable().references('users.id')
    t.string('kind', 12).notNullable().defaultTo('comment').checkIn(['comment', 'return'], 'record_comments_kind_check')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
  })
  // Density charts rendered by the browser (chart.js) for the .docx export, per record version and quantity.
  await knex.schema.createTable('record_charts', (t) => {
    t.increments('id').primary()
    t.integer('record_id').notNullable().references('prior_records.id')
    t.string('symbol', 20).notNullable()
    t.binary('png').notNullable()
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.unique(['record_id', 'symbol'])
  })
  await knex.raw(`
    CREATE FUNCTION record_children_freeze() RETURNS trigger AS $$
    DECLARE rid int;
    BEGIN
      rid := CASE WHEN TG_OP = 'DELETE' THEN OLD.record_id ELSE NEW.record_id END;
      IF EXISTS (SELECT 1 FROM prior_records WHERE id = rid AND status = 'signed_off') THEN
        RAISE EXCEPTION 'record % is signed off and cannot change', rid;
      END IF;
      IF TG_OP = 'DELETE' THEN RETURN OLD; END IF;
      RETURN NEW;
    END; $$ LANGUAGE plpgsql`)
  await knex.raw(`CREATE TRIGGER record_comments_frozen BEFORE INSERT OR UPDATE OR DELETE ON record_comments FOR EACH ROW EXECUTE FUNCTION record_children_freeze()`)
  await knex.raw(`CREATE TRIGGER record_charts_frozen BEFORE INSERT OR UPDATE OR DELETE ON record_charts FOR EACH ROW EXECUTE FUNCTION record_children_freeze()`)
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP TRIGGER IF EXISTS record_charts_frozen ON record_charts')
  await knex.raw('DROP TRIGGER IF EXISTS record_comments_frozen ON record_comments')
  await knex.raw('DROP FUNCTION IF EXISTS record_children_freeze()')
  await knex.schema.dropTableIfExists('record_charts')
  await knex.schema.dropTableIfExists('record_comments')
  await knex.raw('DROP TRIGGER IF EXISTS prior_records_frozen ON prior_records')
  await knex.raw('DROP FUNCTION IF EXISTS prior_records_freeze()')
  await knex.schema.dropTableIfExists('prior_records')
}
