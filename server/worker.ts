// `npm run worker`: a process that computes impact analyses from the queue, on this machine or any other that reaches
// the database (DATABASE_URL). Run as many as the load needs; see the README, "Adding worker machines".
import 'dotenv/config'
import { createAnalysisWorker } from './compute/analysis-worker'
import { analysisSettings, databaseUrlOf } from './config'
import { createDb } from './db/knex'
import { waitUntilIdle } from './idle'

const settings = analysisSettings()
const databaseUrl = databaseUrlOf()
const db = createDb(databaseUrl)
const worker = createAnalysisWorker({ databaseUrl, db, ...settings })
await worker.start()
console.log(`[priorsmith worker] ${worker.name} computing impact analyses from ${databaseUrl.replace(/:[^:@/]+@/, ':***@')} on ${settings.threads} thread(s)`)

let stopping = false
async function shutdown() {
  if (stopping) return
  stopping = true
  // Analyses in hand get a few seconds to finish; the rest go back to the queue for another worker.
  await worker.stop()
  const pool = db.client.pool as { numUsed(): number; numPendingAcquires(): number }
  await waitUntilIdle(() => pool.numUsed() + pool.numPendingAcquires() === 0, 10_000)
  await db.destroy()
  process.exit(0)
}
process.on('SIGINT', shutdown)
process.on('SIGTERM', shutdown)
