import type { Db } from './db/knex'

/** What services need besides the database: the mail queue's wake-up call and the public address for links. */
export interface AppContext {
  db: Db
  publicUrl: string
  /** Wakes the delivery worker for outbox rows committed just now; the sweeper catches any it misses. */
  kickMail(ids: number[]): Promise<void>
}
