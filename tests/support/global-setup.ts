import { createServer } from 'node:http'
import type { AddressInfo } from 'node:net'
import path from 'node:path'
import type { TestProject } from 'vitest/node'
import { ensureCluster, ensureDatabase } from '../../scripts/lib/postgres.mjs'
import { seedDemo } from '../../seeds/demo'
import { createApp } from '../../server/app'
import { createAnalysisWorker } from '../../server/compute/analysis-worker'
import { createDb } from '../../server/db/knex'
import { createMailer } from '../../server/mail/mailer'
import { startSmtpFake } from '../../server/mail/smtp-fake'
import { localMailConfig } from '../../server/mail/transport'

declare module 'vitest' {
  export interface ProvidedContext {
    databaseUrl: string
    baseUrl: string
  }
}

const root = path.resolve(import.meta.dirname, '../..')

/** A fresh, migrated and seeded database per suite; the browser suite also gets the served app with mail. */
export default async function setup(project: TestProject) {
  const cluster = ensureCluster(root)
  const databaseUrl = ensureDatabase(cluster, `priorsmith_test_${project.name}`, { recreate: true })
  const db = createDb(databaseUrl)
  await db.migrate.latest()
  await seedDemo(db)
  project.provide('databaseUrl', databaseUrl)
  // The suite's analysis worker, as a worker process beside the app runs it: every impact analysis a test asks for is
  // computed here (tests/api/workers.test.ts runs its own workers on a database of their own).
  const analysisWorker = createAnalysisWorker({ databaseUrl, db, pollingIntervalSeconds: 0.5, stopGraceMs: 1000, name: `${project.name}-suite-worker` })
  await analysisWorker.start()

  if (project.name !== 'e2e') {
    return async () => {
      await analysisWorker.stop()
      await db.destroy()
    }
  }
  // The port is needed for the links in e-mails before the app is built.
  const server = createServer()
  server.listen(0, '127.0.0.1')
  await new Promise((resolve) => server.once('listening', resolve))
  const baseUrl = `http://localhost:${(server.address() as AddressInfo).port}`
  const mailFake = await startSmtpFake()
  const mailer = createMailer({ databaseUrl, db, transport: localMailConfig(mailFake.port, {}), retryDelaySeconds: 1, pollingIntervalSeconds: 0.5, sweepIntervalMs: 5000 })
  await mailer.start()
  const { app, close } = createApp({
    db, databaseUrl, sessionSecret: 'e2e-secret', signInLimitPerWindow: 1000, clientDir: path.join(root, 'dist'),
    publicUrl: baseUrl, kickMail: (ids) => mailer.kick(ids), mailFake, onAnalysisQueued: () => analysisWorker.notify(),
  })
  server.on('request', app)
  project.provide('baseUrl', baseUrl)
  return async () => {
    await new Promise((resolve) => server.close(resolve))
    await mailer.stop()
    await analysisWorker.stop()
    await mailFake.stop()
    await close()
    await db.destroy()
  }
}
