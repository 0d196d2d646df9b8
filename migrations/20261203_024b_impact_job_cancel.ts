import type { Knex } from 'knex'

/*
 * An analyst may cancel an impact job that is queued or running: it ends "cancelled", stores no analysis, and a worker
 * that holds it stops at its next step.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`ALTER TABLE impact_jobs DROP CONSTRAINT impact_jobs_state_check`)
  await knex.raw(`ALTER TABLE impact_jobs ADD CONSTRAINT impact_jobs_state_check CHECK (state IN ('queued', 'running', 'done', 'failed', 'cancelled'))`)
}

export async function down(knex: Knex): Promise<void> {
  // Before cancelling existed, a job that never finished was reported failed.
  await knex('impact_jobs').where({ state: 'cancelled' }).update({
    state: 'failed', error: JSON.stringify({ status: 500, message: 'The analysis was cancelled.', fields: {} }),
  })
  await knex.raw(`ALTER TABLE impact_jobs DROP CONSTRAINT impact_jobs_state_check`)
  await knex.raw(`ALTER TABLE impact_jobs ADD CONSTRAINT impact_jobs_state_check CHECK (state IN ('queued', 'running', 'done', 'failed'))`)
}
