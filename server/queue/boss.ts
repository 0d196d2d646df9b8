import type PgBoss from 'pg-boss'
import type { Knex } from 'knex'
import type { Db } from '../db/knex'

/** The PostgreSQL schema pg-boss keeps its jobs in (mail deliveries and analyses). */
export const PGBOSS_SCHEMA = 'pgboss'
/** Advisory lock key serializing queue creation across processes (audit.ts uses 7_240_001). */
const CREATE_QUEUE_LOCK = 7_240_002

/**
 * Creates a queue unless it exists. Processes starting together on a database without the queue would each create its
 * partition and deadlock (one of them then fails to start); a transaction-level advisory lock lets them go one by one.
 */
export async function createQueueOnce(db: Db, boss: PgBoss, queue: PgBoss.Queue): Promise<void> {
  await db.transaction(async (trx) => {
    await trx.raw('SELECT pg_advisory_xact_lock(?)', [CREATE_QUEUE_LOCK])
    await boss.createQueue(queue.name, queue)
  })
}

/**
 * pg-boss's statements run inside a Knex transaction, so a job is queued if and only if the transaction commits.
 * pg-boss numbers its parameters ($1, $2, … possibly repeated); Knex binds `?` in order, and reads a literal `?`
 * written as `\?`.
 */
export function inTransaction(trx: Knex.Transaction): PgBoss.Db {
  return {
    async executeSql(text: string, values: unknown[] = []) {
      const ordered: unknown[] = []
      const sql = text.replace(/\?/g, '\\?').replace(/\$(\d+)/g, (_, n: string) => {
        ordered.push(values[Number(n) - 1] ?? null)
        return '?'
      })
      const result = await trx.raw(sql, ordered as Knex.RawBinding[])
      return { rows: result.rows as unknown[] }
    },
  }
}
