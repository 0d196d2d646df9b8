import { existsSync, rmSync } from 'node:fs'
import type { AddressInfo } from 'node:net'
import path from 'node:path'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ensureCluster, ensureDatabase, stopCluster } from '../../scripts/lib/postgres.mjs'
import { DEMO_STUDY_TITLE, seedDemo } from '../../seeds/demo'
import { createApp, type PriorsmithApp } from '../../server/app'
import { createDb, type Db } from '../../server/db/knex'
import { openBrowser, signInAs, type BrowserSession, completeEntry, field, inPage, type Call, keepFailureEvidence } from '../support/browser'

/**
 * PostgreSQL restarts while an expert types. The suite runs its own cluster, database and server (as the API fault
 * test does) so that stopping PostgreSQL disturbs no other suite. The expert's first answer is saved; with the
 * database down the expert changes every value and the save line says it failed; once PostgreSQL is back the
 * autosave's own retry stores exactly what was typed, with no click and no app restart, and the page shows it after
 * a reload.
 */

const root = path.resolve(import.meta.dirname, '../..')
const clusterDir = `/tmp/priorsmith-outage-${process.pid}`
const env = { ...process.env, PG_CLUSTER_DIR: clusterDir, PGPORT_LOCAL: String(56000 + (process.pid % 1000)) }

interface Answer {
  lower: number
  upper: number
  median: number
  q1: number
  q3: number
  rationale: string
}

const FIRST: Answer = { lower: 4, upper: 25, median: 10, q1: 8, q3: 13, rationale: 'Burst logs 2015–2025 for the old cast-iron stock.' }
const DURING_OUTAGE: Answer = {
  lower: 3, upper: 30, median: 11, q1: 7, q3: 16,
  rationale: 'Burst logs 2015–2025, and the two hard winters that doubled the bursts on the northern mains.',
}

/** The answer as the judgements table keeps it. */
const stored = (a: Answer) => ({ lower: a.lower, upper: a.upper, points: [{ value: a.q1, prob: 0.25 }, { value: a.median, prob: 0.5 }, { value: a.q3, prob: 0.75 }] })

let db: Db
let built: PriorsmithApp
let server: import('node:http').Server
let base: string
let analyst: BrowserSession
let expert: BrowserSession
let roundId: number
let quantityId: number
/** Status codes of the expert's judgement saves, in order. */
const saves: number[] = []
let versionBefore: number

const statusLine = (page: Page) => page.getByTestId('save-status')

async function waitState(page: Page, state: 'saved' | 'failed', timeout: number): Promise<void> {
  await page.locator(`[data-testid="save-status"][data-state="${state}"]`).waitFor({ timeout })
}

async function judgement() {
  return db('judgements').where({ round_id: roundId, quantity_id: quantityId }).first('id', 'answer', 'rationale', 'version')
}

beforeAll(async () => {
  if (!existsSync(path.join(root, 'dist', 'index.html'))) throw new Error('No client build in dist/: run `npm run build` first')
  const cluster = ensureCluster(root, { env, fast: true })
  const url = ensureDatabase(cluster, 'priorsmith_outage', { recreate: true })
  db = createDb(url)
  await db.migrate.latest()
  await seedDemo(db)
  built = createApp({ db, databaseUrl: url, sessionSecret: 'outage', signInLimitPerWindow: 1000, clientDir: path.join(root, 'dist') })
  server = built.app.listen(0, '127.0.0.1')
  await new Promise((r) => server.once('listening', r))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  analyst = await openBrowser({ baseUrl: base })
  expert = await openBrowser({ baseUrl: base })
  expert.page.on('response', (res) => {
    if (res.request().method() === 'PUT' && /\/api\/rounds\/\d+\/judgements\/\d+$/.test(res.url())) saves.push(res.status())
  })
}, 60_000)
keepFailureEvidence('outage', () => ({ expert }))
afterAll(async () => {
  await analyst?.close()
  await expert?.close()
  server?.close()
  await built?.close().catch(() => {})
  await db?.destroy()
  stopCluster(root, { env })
  // Each run makes a cluster under a new name (the process id); leaving them would fill /tmp.
  rmSync(clusterDir, { recursive: true, force: true })
})

describe('PostgreSQL restarted while an expert types', () => {
  it('the analyst opens a round on the burst rate; the expert has done the entry steps', async () => {
    await signInAs(analyst, 'analyst@kestrel.example')
    await analyst.page.waitForURL(/\/studies$/)
    ;({ roundId, quantityId } = await inPage(
      analyst.page,
      async (call: Call, args: { studyTitle: string }) => {
        const studies = await call<{ id: number; title: string }[]>('GET', '/api/studies')
        const study = studies.find((s) => s.title === args.studyTitle)!
        const quantities = await call<{ id: number; symbol: string }[]>('GET', `/api/studies/${study.id}/quantities`)
        const burst = quantities.find((q) => q.symbol === 'burst_rate')!.id
        const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
          title: 'Outage: burst rate',
          briefing: 'Give your own judgement of the burst rate; do not confer.',
          opensAt: new Date(Date.now() - 3600e3).toISOString(),
          closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
          calibrationPosition: 'after',
          askCalibration: false,
          feedbackEnabled: false,
          items: [{ quantityId: burst, method: 'quantile' }],
        })
        await call('POST', `/api/rounds/${round.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Expert 1' })
        await call('POST', `/api/rounds/${round.id}/open`)
        return { roundId: round.id, quantityId: burst }
      },
      { studyTitle: DEMO_STUDY_TITLE },
    ))

    await signInAs(expert, 'expert1@kestrel.example')
    await expert.page.waitForURL(/\/studies$/)
    await completeEntry(expert.page, roundId)
  })

  it('saves a complete first answer', async () => {
    const { page } = expert
    await page.goto(`${base}/answer/${roundId}`)
    await page.getByTestId('entry-ready').waitFor()
    await field(page, 'q-lower').fill(String(FIRST.lower))
    await field(page, 'q-upper').fill(String(FIRST.upper))
    await page.getByTestId('q-next').click()
    await field(page, 'q-median').fill(String(FIRST.median))
    await page.getByTestId('q-next').click()
    await field(page, 'q-q1').fill(String(FIRST.q1))
    await field(page, 'q-q3').fill(String(FIRST.q3))
    await field(page, 'rationale').fill(FIRST.rationale)

    await expect.poll(async () => {
      const j = await judgement()
      return j && { answer: j.answer, rationale: j.rationale }
    }, { timeout: 15_000 }).toEqual({ answer: stored(FIRST), rationale: FIRST.rationale })
    await waitState(page, 'saved', 15_000)
    expect(await statusLine(page).innerText()).toMatch(/^Saved \d{1,2}:\d{2}/)
    versionBefore = (await judgement()).version
    expect(saves.length).toBeGreaterThan(0)
    expect(saves.every((s) => s === 200)).toBe(true)
  })

  it('with PostgreSQL down, the changed answer is not saved and the save line says why', async () => {
    const { page } = expert
    stopCluster(root, { env })
    const before = saves.length
    await field(page, 'q-lower').fill(String(DURING_OUTAGE.lower))
    await field(page, 'q-upper').fill(String(DURING_OUTAGE.upper))
    await field(page, 'q-median').fill(String(DURING_OUTAGE.median))
    await field(page, 'q-q1').fill(String(DURING_OUTAGE.q1))
    await field(page, 'q-q3').fill(String(DURING_OUTAGE.q3))
    await field(page, 'rationale').fill(DURING_OUTAGE.rationale)

    await waitState(page, 'failed', 15_000)
    expect(await statusLine(page).locator(':scope > span').innerText()).toBe(
      'Not saved: The database is unavailable for a moment; nothing was saved. Try again shortly',
    )
    await expect(statusLine(page).getByRole('button', { name: 'Try again' }).isVisible()).resolves.toBe(true)
    await expect(field(page, 'q-median').inputValue()).resolves.toBe(String(DURING_OUTAGE.median))
    await expert.shot('outage-down')

    // A second failed save with no new typing shows the automatic retry at work while the database is still down.
    const failedSoFar = saves.length
    await expect.poll(() => saves.length, { timeout: 15_000 }).toBeGreaterThan(failedSoFar)
    expect(new Set(saves.slice(before))).toEqual(new Set([503]))
    expect(await statusLine(page).getAttribute('data-state')).toBe('failed')
  })

  it('once PostgreSQL is back, the automatic retry saves exactly what was typed, with no click', async () => {
    const { page } = expert
    const before = saves.length
    ensureCluster(root, { env, fast: true })

    await waitState(page, 'saved', 45_000)
    expect(await statusLine(page).innerText()).toMatch(/^Saved \d{1,2}:\d{2}/)
    const after = saves.slice(before)
    expect(after.at(-1)).toBe(200)
    expect(after.filter((s) => s === 200)).toHaveLength(1)

    const j = await judgement()
    expect(j.answer).toEqual(stored(DURING_OUTAGE))
    expect(j.rationale).toBe(DURING_OUTAGE.rationale)
    // Saved once after the outage: one new version, none skipped, none twice.
    expect(j.version).toBe(versionBefore + 1)
    const versions = await db('judgement_versions').where({ judgement_id: j.id }).orderBy('version').select('version', 'answer', 'rationale')
    expect(versions.map((v) => v.version)).toEqual(Array.from({ length: j.version }, (_, i) => i + 1))
    expect(versions.at(-2)).toEqual({ version: versionBefore, answer: stored(FIRST), rationale: FIRST.rationale })
    expect(versions.at(-1)).toEqual({ version: j.version, answer: stored(DURING_OUTAGE), rationale: DURING_OUTAGE.rationale })
  }, 60_000)

  it('after a reload, in the same session, the form shows the answer typed during the outage', async () => {
    const { page } = expert
    await page.reload()
    await page.getByTestId('q-q3').waitFor()
    expect(page.url()).toBe(`${base}/answer/${roundId}`)
    for (const key of ['lower', 'upper', 'median', 'q1', 'q3'] as const) {
      await expect(field(page, `q-${key}`).inputValue()).resolves.toBe(String(DURING_OUTAGE[key]))
    }
    await expect(field(page, 'rationale').inputValue()).resolves.toBe(DURING_OUTAGE.rationale)
    expect(await statusLine(page).innerText()).toMatch(/^Saved \d{1,2}:\d{2}/)
    await page.evaluate(() => window.scrollTo(0, 0))
    await expert.shot('outage-saved')
  })

  it('logged no console errors beyond the 503 answers of the outage (and the 401 before signing in), and loaded nothing from elsewhere', () => {
    expect(expert.consoleErrors.filter((e) => !/status of (401|503)/.test(e))).toEqual([])
    expect(expert.foreignRequests).toEqual([])
    expect(analyst.foreignRequests).toEqual([])
  })
})
