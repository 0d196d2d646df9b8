import type { Knex } from 'knex'

/*
 * Impact analyses run as jobs on the PostgreSQL queue (pg-boss), worked by any number of worker processes. A job row
 * holds what was asked (the prepared computation), its state and progress, and the analysis it produced; the pg-boss
 * job carries the same id. `impact_analyses.job_id` is unique: however often a job is handed out (a worker that stops
 * mid-run, an expired lease), it stores at most one analysis.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('impact_jobs', (t) => {
    t.uuid('id').primary().defaultTo(knex.raw('gen_random_uuid()'))
    t.integer('quantity_id').notNullable().references('quantities.id').onDelete('CASCADE')
    t.integer('dataset_id').notNullable().references('pilot_datasets.id').onDelete('CASCADE')
    t.string('input_hash', 64).notNullable()
    t.jsonb('input').notNullable()
    /** The computation as prepared by the web process (candidates, data, options) and the facts the result repeats. */
    t.jsonb('task')
    t.string('state', 16).notNullable().defaultTo('queued')
    t.integer('progress_done').notNullable().defaultTo(0)
    t.integer('progress_total').notNullable().defaultTo(0)
    t.integer('analysis_id').references('impact_analyses.id').onDelete('SET NULL')
    /** `{ status, message, fields }` of a failed job: 400 for inputs the engine refuses, 500 for a failure of the server. */
    t.jsonb('error')
    t.integer('attempts').notNullable().defaultTo(0)
    /** Which worker process ran it last (host and pid). */
    t.string('worker', 200)
    t.integer('created_by').notNullable().references('users.id')
    t.timestamp('created_at', { useTz: true }).notNullable().defaultTo(knex.fn.now())
    t.timestamp('started_at', { useTz: true })
    t.timestamp('finished_at', { useTz: true })
    t.index(['quantity_id', 'created_at'])
  })
  await knex.raw(`ALTER TABLE impact_jobs ADD CONSTRAINT impact_jobs_state_check CHECK (state IN ('queued', 'running', 'done', 'failed'))`)
  await knex.schema.alterTable('impact_analyses', (t) => {
    t.uuid('job_id').unique()
  })
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('impact_analyses', (t) => {
    t.dropColumn('job_id')
  })
  await knex.schema.dropTableIfExists('impact_jobs')
}
