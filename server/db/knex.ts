import knexFactory, { type Knex } from 'knex'
import { migrationSource } from './migrations'

export type Db = Knex

/** Knex on PostgreSQL; migrations come from a static list so tsx and vitest load them alike. */
export function createDb(databaseUrl: string): Db {
  return knexFactory({
    client: 'pg',
    connection: databaseUrl,
    pool: { min: 0, max: 16 },
    migrations: { migrationSource, tableName: 'knex_migrations' },
  })
}
