import type { AddressInfo } from 'node:net'
import path from 'node:path'
import type { TestProject } from 'vitest/node'
import { ensureCluster, ensureDatabase } from '../../scripts/lib/postgres.mjs'
import { seedDemo } from '../../seeds/demo'
import { createApp } from '../../server/app'
import { createDb } from '../../server/db/knex'

declare module 'vitest' {
  export interface ProvidedContext {
    databaseUrl: string
    baseUrl: string
  }
}

const root = path.resolve(import.meta.dirname, '../..')

/** A fresh, migrated and seeded database per suite; the browser suite also gets a served app. */
export default async function setup(project: TestProject) {
  const cluster = ensureCluster(root)
  const databaseUrl = ensureDatabase(cluster, `priorsmith_test_${project.name}`, { recreate: true })
  const db = createDb(databaseUrl)
  await db.migrate.latest()
  await seedDemo(db)
  project.provide('databaseUrl', databaseUrl)

  if (project.name !== 'e2e') {
    await db.destroy()
    return
  }
  const { app, close } = createApp({
    db, databaseUrl, sessionSecret: 'e2e-secret', signInLimitPerWindow: 1000, clientDir: path.join(root, 'dist'),
  })
  const server = app.listen(0, '127.0.0.1')
  await new Promise((resolve) => server.once('listening', resolve))
  const { port } = server.address() as AddressInfo
  project.provide('baseUrl', `http://localhost:${port}`)
  return async () => {
    await new Promise((resolve) => server.close(resolve))
    await close()
    await db.destroy()
  }
}
