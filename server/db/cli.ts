// Database tasks for the start and test scripts: `tsx server/db/cli.ts migrate seed`.
import { seedDemo } from '../../seeds/demo'
import { loadConfig } from '../config'
import { createDb } from './knex'

const db = createDb(loadConfig().databaseUrl)
try {
  for (const task of process.argv.slice(2)) {
    if (task === 'migrate') {
      const [, applied] = await db.migrate.latest()
      console.log(`[priorsmith] migrations: ${applied.length ? applied.join(', ') : 'up to date'}`)
    } else if (task === 'seed') {
      console.log(`[priorsmith] demo study: ${(await seedDemo(db)) ? 'seeded' : 'already present'}`)
    } else if (task === 'rollback') {
      const [, undone] = await db.migrate.rollback(undefined, true)
      console.log(`[priorsmith] rolled back: ${undone.join(', ') || 'nothing'}`)
    } else {
      throw new Error(`unknown task ${task}; use migrate, seed or rollback`)
    }
  }
} finally {
  await db.destroy()
}
