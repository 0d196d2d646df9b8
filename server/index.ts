import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { createApp } from './app'
import { loadConfig } from './config'
import { createDb } from './db/knex'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..')
const config = loadConfig()
const db = createDb(config.databaseUrl)
const { app, close } = createApp({
  db,
  databaseUrl: config.databaseUrl,
  sessionSecret: config.sessionSecret,
  secureCookies: config.secureCookies,
  signInLimitPerWindow: config.signInLimitPerWindow,
  clientDir: path.join(root, 'dist'),
})

const server = app.listen(config.port, () => {
  console.log(`[priorsmith] serving app and API on ${config.publicUrl}`)
})

async function shutdown() {
  server.close()
  await close()
  await db.destroy()
  process.exit(0)
}
process.on('SIGINT', shutdown)
process.on('SIGTERM', shutdown)
