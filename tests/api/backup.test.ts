import { mkdtempSync, rmSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { backupDatabase, ensureCluster, restoreDatabase } from '../../scripts/lib/postgres.mjs'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { createDb } from '../../server/db/knex'

const root = path.resolve(import.meta.dirname, '../..')
const dir = mkdtempSync(path.join(tmpdir(), 'priorsmith-backup-'))
const restoredName = `priorsmith_restore_check_${process.pid}`
afterAll(() => {
  rmSync(dir, { recursive: true, force: true })
})

describe('backup and restore (pg_dump / pg_restore)', () => {
  it('restores into a fresh database with the demo study intact', async () => {
    const cluster = ensureCluster(root)
    const file = backupDatabase(cluster, inject('databaseUrl'), path.join(dir, 'test.dump'))
    expect(statSync(file).size).toBeGreaterThan(10_000)
    const url = restoreDatabase(cluster, file, restoredName)
    const db = createDb(url)
    try {
      const study = await db('studies').where({ title: DEMO_STUDY_TITLE }).first('id')
      expect(study).toBeTruthy()
      expect(await db('quantities').where({ study_id: study.id }).orderBy('position').pluck('symbol')).toEqual(['burst_rate', 'alert_uptake', 'night_flow_cut'])
      expect((await db('users').whereIn('email', ['admin@kestrel.example', 'analyst@kestrel.example'])).length).toBe(2)
      expect((await db('pilot_datasets').where({ study_id: study.id })).length).toBe(3)
      const [{ n }] = await db('knex_migrations').count<{ n: string }[]>('* as n')
      expect(Number(n)).toBeGreaterThanOrEqual(7)
    } finally {
      await db.destroy()
      const admin = createDb(inject('databaseUrl'))
      await admin.raw(`DROP DATABASE IF EXISTS ${restoredName} WITH (FORCE)`)
      await admin.destroy()
    }
    expect(() => restoreDatabase(cluster, file, 'postgres')).toThrow(/exists/)
  })
})
