import { readFileSync } from 'node:fs'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createDb } from '../../server/db/knex'
import { AUDIT_LOCK_CLASS } from '../../server/services/audit'
import type { Page } from 'playwright-core'
import { DEMO_PASSWORD } from '../../seeds/demo'
import { openBrowser, signInAs, type BrowserSession, field, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'

/**
 * Pilot data and impact analysis in chromium: the analyst uploads the demo burst logs for the burst
 * rate (after a bad file is refused with a located message), runs the impact analysis of every
 * candidate prior (a job on the server's queue, followed with a progress bar), sees the table (with the fractional
 * Bayes factor and sensitivity columns), the findings, the cautions, both width-sweep charts (the Bayes factor chart with
 * its fractional curve) and the α chart, and downloads the table as CSV and the charts as PNG.
 *
 * The e2e database holds only the seeded demo study, which has no elicitation round: the reconciled
 * prior the analysis needs is set up first through the API from the page (a study of its own, so the
 * demo study stays as the other browser tests expect it).
 */

const BURST_LOGS = path.resolve(import.meta.dirname, '../../seeds/pilot/burst-logs.csv')
const QUANTITY_NAME = 'Burst rate of old cast-iron mains'

let s: BrowserSession
let studyId = 0
let quantityId = 0

/** Opens an el-select by its test id and picks the option with exactly this label. */
async function choose(page: Page, testId: string, label: string) {
  await page.getByTestId(testId).click()
  // The dropdown opened last is the last in the page (an earlier one may still be fading out).
  await page.getByRole('option', { name: label, exact: true }).last().click()
}

/**
 * In the page, through the API with each session's CSRF token: the analyst creates a study with the
 * burst rate and a quantile round for the three demo experts, each expert answers and submits, and the
 * analyst saves the equal-weight linear pool as the reconciled prior. Ends signed out.
 */
async function setUpReconciledPrior(page: Page): Promise<{ studyId: number; quantityId: number }> {
  return page.evaluate(async ({ password, quantityName }) => {
    async function call<T>(method: string, url: string, body?: unknown): Promise<T> {
      const headers: Record<string, string> = { accept: 'application/json' }
      if (method !== 'GET') {
        const { token } = await (await fetch('/api/auth/csrf')).json() as { token: string }
        headers['x-csrf-token'] = token
      }
      if (body !== undefined) headers['content-type'] = 'application/json'
      const res = await fetch(url, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
      const text = await res.text()
      if (!res.ok) throw new Error(`${method} ${url} → ${res.status} ${text}`)
      return (text ? JSON.parse(text) : undefined) as T
    }
    const signIn = (email: string) => call('POST', '/api/auth/sign-in', { email, password })
    const signOut = () => call('POST', '/api/auth/sign-out')

    await signIn('analyst@kestrel.example')
    const study = await call<{ id: number }>('POST', '/api/studies', {
      title: 'Kestrel Valley burst-rate impact check', context: 'Pilot burst logs against the elicited priors for the burst rate.',
    })
    const quantity = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
      name: quantityName, symbol: 'burst_rate', unit: 'bursts per 100 km per year', support: { kind: 'positive' },
      question: 'Over 2027–2031, what will be the average number of bursts per 100 km per year on the cast-iron mains laid before 1960?',
    })
    const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
      title: 'Round 1: burst rate', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
      items: [{ quantityId: quantity.id, method: 'quantile' }], askCalibration: false,
    })
    const experts = ['expert1@kestrel.example', 'expert2@kestrel.example', 'expert3@kestrel.example']
    for (const email of experts) await call('POST', `/api/rounds/${round.id}/invitations`, { email, name: 'Panel member' })
    await call('POST', `/api/rounds/${round.id}/open`)
    await signOut()

    // Plausible bounds, then quartiles (bursts per 100 km per year).
    const answers: [number, number, number, number, number][] = [[6, 30, 11, 14, 18], [5, 25, 9, 11.5, 14], [8, 45, 13, 17, 22]]
    for (const [i, email] of experts.entries()) {
      await signIn(email)
      const [lower, upper, q1, median, q3] = answers[i]
      await call('PUT', `/api/rounds/${round.id}/judgements/${quantity.id}`, {
        method: 'quantile', lower, upper, points: [{ value: q1, prob: 0.25 }, { value: median, prob: 0.5 }, { value: q3, prob: 0.75 }],
        rationale: 'Burst logs of the last ten years and the neighbouring boards’ figures.', version: 0,
      })
      await call('POST', `/api/rounds/${round.id}/submit`)
      await signOut()
    }

    await signIn('analyst@kestrel.example')
    const view = await call<{ fits: { distribution: { family: string } }[] }>('GET', `/api/quantities/${quantity.id}/reconciliation?roundId=${round.id}`)
    await call('PUT', `/api/quantities/${quantity.id}/reconciliation`, {
      roundId: round.id, method: 'linear', weights: 'equal', family: view.fits[0].distribution.family, reconciled: true,
      rationale: 'Equal-weight linear pool of the three experts, fitted with the best family.', version: 0,
    })
    await signOut()
    return { studyId: study.id, quantityId: quantity.id }
  }, { password: DEMO_PASSWORD, quantityName: QUANTITY_NAME })
}

/**
 * Runs `during` while every worker is held as it stores an analysis (a share lock on impact_analyses, taken here, which
 * the insert waits for): a job shows as running with every computed step, whatever the machine's speed.
 */
async function holdingStores(during: () => Promise<void>): Promise<void> {
  const db = createDb(inject('databaseUrl'))
  const hold = await db.transaction()
  try {
    await hold.raw('LOCK TABLE impact_analyses IN SHARE MODE')
    await during()
  } finally {
    await hold.commit()
    await db.destroy()
  }
}

beforeAll(async () => {
  s = await openBrowser()
})
keepFailureEvidence('impact', () => ({ analyst: s }))
afterAll(async () => {
  await s?.close()
})

describe('pilot data and impact analysis', () => {
  it('sets up a reconciled prior for the burst rate through the API', async () => {
    await s.page.goto(`${s.baseUrl}/sign-in`)
    ;({ studyId, quantityId } = await setUpReconciledPrior(s.page))
    expect(studyId).toBeGreaterThan(0)
    expect(quantityId).toBeGreaterThan(0)
  })

  it('refuses a bad file with its line and column, storing nothing, and keeps the form filled', async () => {
    const { page } = s
    await signInAs(s, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await page.goto(`${s.baseUrl}/studies/${studyId}`)
    await page.getByTestId('nav-pilot-data').click()
    await page.waitForURL(new RegExp(`/studies/${studyId}/pilot-data$`))
    await page.getByText('No pilot data yet.').waitFor()

    await page.getByTestId('pilot-upload-open').click()
    await choose(page, 'pilot-quantity', QUANTITY_NAME)
    await field(page, 'pilot-name').fill('Burst logs 2025, eight districts')
    await page.getByTestId('pilot-file').setInputFiles({
      name: 'burst-logs-typo.csv', mimeType: 'text/csv', buffer: Buffer.from('district,bursts,exposure_100km_years\nKV-01,11,1.10\nKV-02,seven,0.85\n'),
    })
    // The browser reads the file at once: the column names and the first rows.
    const preview = page.getByTestId('pilot-preview')
    await preview.waitFor()
    expect(await page.getByTestId('pilot-preview-columns').innerText()).toBe('“district”, “bursts”, “exposure_100km_years”')
    await choose(page, 'pilot-model', 'Poisson with exposure')
    await choose(page, 'pilot-count-column', 'bursts')
    await choose(page, 'pilot-exposure-column', 'exposure_100km_years')
    await s.shot('impact-01-upload-form')

    await page.getByTestId('pilot-submit').click()
    const error = page.getByTestId('pilot-error')
    await error.getByText('Line 3, column "bursts": expected a number, found "seven"').waitFor()
    await s.shot('impact-02-upload-refused')
    await expect(field(page, 'pilot-name').inputValue()).resolves.toBe('Burst logs 2025, eight districts')
    await expect(page.getByTestId('dataset-row').count()).resolves.toBe(0)
  })

  it('stores the demo burst logs as version 1 of the burst rate’s data', async () => {
    const { page } = s
    await page.getByTestId('pilot-file').setInputFiles(BURST_LOGS)
    await page.getByTestId('pilot-preview').getByText('8 data rows', { exact: false }).waitFor()
    expect(await page.getByTestId('pilot-preview').innerText()).toContain('KV-01')
    await page.getByTestId('pilot-submit').click()
    const row = page.locator(`[data-testid="dataset-row"][data-quantity-id="${quantityId}"][data-version="1"]`)
    await row.waitFor()
    const text = await row.innerText()
    expect(text).toContain('Burst logs 2025, eight districts')
    expect(text).toContain('Poisson with exposure')
    expect(text).toContain('81 events over 8 exposure units')
    await s.shot('impact-03-dataset-stored')
  })

  it('warns when the same file is uploaded again and keeps the stored version when asked', async () => {
    const { page } = s
    await page.getByTestId('pilot-upload-open').click()
    await choose(page, 'pilot-quantity', QUANTITY_NAME)
    await field(page, 'pilot-name').fill('Burst logs 2025, eight districts')
    await page.getByTestId('pilot-file').setInputFiles(BURST_LOGS)
    await page.getByTestId('pilot-preview').getByText('8 data rows', { exact: false }).waitFor()
    await choose(page, 'pilot-model', 'Poisson with exposure')
    await choose(page, 'pilot-count-column', 'bursts')
    await choose(page, 'pilot-exposure-column', 'exposure_100km_years')
    await page.getByTestId('pilot-submit').click()
    const box = page.locator('.el-message-box')
    await box.getByText('It is the same file as version 1 (“Burst logs 2025, eight districts”)', { exact: false }).waitFor()
    await s.shot('impact-03b-same-file')
    await box.getByRole('button', { name: 'Keep version 1' }).click()
    await page.getByText('Kept version 1', { exact: false }).waitFor()
    await expect(page.locator(`[data-testid="dataset-row"][data-quantity-id="${quantityId}"]`).count()).resolves.toBe(1)
  })

  it('runs the impact analysis: candidates table, findings, cautions, both sweep charts and the decision', async () => {
    const { page } = s
    await page.getByTestId('pilot-impact-link').click()
    await page.waitForURL(new RegExp(`/studies/${studyId}/impact/${quantityId}$`))
    await page.getByTestId('impact-run').waitFor()
    expect(await page.getByTestId('impact-dataset').innerText()).toContain('v1 · Burst logs 2025, eight districts')
    expect(await page.getByTestId('impact-comparison-family').innerText()).toContain('Gamma')

    await page.getByTestId('impact-mixture-on').click()
    await field(page, 'mixture-weight').fill('0.2')
    await page.getByTestId('impact-decision-on').click()
    await page.getByTestId('decision-direction').getByText('above', { exact: true }).click()
    await field(page, 'decision-threshold').fill('12')
    await field(page, 'decision-probability').fill('0.8')
    // The training fraction b of the fractional Bayes factor: empty means m₀/n = 1/8 for the eight burst logs; a value
    // outside (0, 1) is refused in the form, under the field.
    expect(await page.getByTestId('training-fraction-hint').innerText()).toContain('b = 0.125')
    await field(page, 'training-fraction').fill('1.5')
    await page.getByTestId('impact-run').click()
    await page.getByTestId('training-fraction').getByText('The training fraction b must be greater than 0 and less than 1').waitFor()
    await field(page, 'training-fraction').fill('')
    await s.shot('impact-04-settings')

    // The analysis runs as a job on the queue; the page follows it. The worker is held as it stores the analysis (the
    // study's audit-chain lock, taken here, which its audit event waits for), so the page shows the job running with the
    // steps done so far, whatever the machine’s speed. 30 steps: 7 candidates, the fractional Bayes factors, 7 sensitivities, 11 sweep widths, 2 curves, the tipping point and storing the result.
    const db = createDb(inject('databaseUrl'))
    const hold = await db.transaction()
    try {
      await hold.raw('SELECT pg_advisory_xact_lock(?, ?)', [AUDIT_LOCK_CLASS, studyId])
      await page.getByTestId('impact-run').click()
      const bar = page.getByTestId('impact-progress-bar')
      await bar.waitFor({ timeout: 30_000 })
      expect(await page.getByTestId('impact-progress').getAttribute('data-state')).toBe('running')
      await expect.poll(async () => Number(await bar.getAttribute('aria-valuenow')), { timeout: 30_000 }).toBeGreaterThan(0)
      expect(await page.getByTestId('impact-progress').innerText()).toMatch(/step (\d+) of 30/)
      await s.shot('impact-04b-progress')
    } finally {
      await hold.commit()
      await db.destroy()
    }
    const table = page.getByTestId('impact-table')
    await table.waitFor({ timeout: 30_000 })
    const kinds = await page.getByTestId('candidate-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-kind')))
    expect(kinds).toEqual(['expert', 'expert', 'expert', 'pooled', 'reconciled', 'comparison', 'mixture'])
    expect(await page.locator('[data-testid="candidate-row"][data-kind="reconciled"]').innerText()).toMatch(/\d/)
    await expect(page.getByTestId('impact-progress').count()).resolves.toBe(0)

    expect(await page.getByTestId('impact-findings').innerText()).toContain('Widening the reconciled prior 4×')
    expect(await page.getByTestId('impact-cautions').innerText()).toContain('qualified statistician')
    await page.getByTestId('sweep-mean-chart').locator('canvas').waitFor()
    await page.getByTestId('sweep-evidence-chart').locator('canvas').waitFor()
    await page.getByTestId('density-chart').locator('canvas').waitFor()
    // The diagnostics: a fractional Bayes factor column and the sensitivity columns, the fractional curve beside the
    // ordinary one on the sweep's Bayes factor chart, and the α chart of the reconciled prior.
    await expect(page.getByTestId('column-fbf').innerText()).resolves.toMatch(/Fractional BF/i)
    await expect(page.getByTestId('column-sensitivity').innerText()).resolves.toMatch(/Sensitivity/i)
    const reconciledRow = page.locator('[data-testid="candidate-row"][data-kind="reconciled"]')
    expect(await reconciledRow.getByTestId('cell-fbf').innerText()).toMatch(/^[\d.,/e+]+\s+b = 0\.125$/)
    expect(await reconciledRow.getByTestId('cell-prior-sensitivity').innerText()).toMatch(/^\d/)
    expect(await reconciledRow.getByTestId('cell-likelihood-sensitivity').innerText()).toMatch(/^\d/)
    expect(await reconciledRow.getByTestId('cell-diagnosis').getAttribute('data-diagnosis')).toMatch(/^(none|prior-data-conflict|weak-likelihood|likelihood-dominated)$/)
    expect((await reconciledRow.getByTestId('cell-diagnosis').innerText()).length).toBeGreaterThan(20)
    expect(await page.locator('[data-testid="candidate-row"][data-kind="comparison"]').getByTestId('cell-fbf').innerText()).toBe('compared against')
    await expect(page.getByTestId('sweep-bf-caption').getAttribute('data-curves')).resolves.toBe('2')
    expect(await page.getByTestId('sweep-bf-caption').innerText()).toMatch(/the fractional one by a factor of/)
    await page.getByTestId('alpha-chart').locator('canvas').waitFor()
    await expect(page.getByTestId('alpha-chart').getAttribute('data-points')).resolves.toBe('9')
    expect(await page.getByTestId('diagnostics-caution').innerText()).toContain('aids to judgement, not tests')
    // The chart draws the candidates the analyst picked, by default the reconciled prior and the comparison prior, one legend
    // entry each, on round axis ends.
    const legend = async () => page.getByTestId('density-legend-item').allInnerTexts()
    const picked = async () => page.getByTestId('density-choose').locator('.el-checkbox.is-checked').allInnerTexts()
    expect(await picked()).toEqual(['Reconciled prior', 'Comparison prior'])
    expect(await legend()).toEqual(['Reconciled prior', 'Comparison prior'])
    await page.getByTestId('density-choose').getByText('Robust mixture (20 % on the wide component)').click()
    await expect.poll(legend).toEqual(['Reconciled prior', 'Comparison prior', 'Robust mixture (20 % on the wide component)'])
    expect(await legend()).toEqual(await picked())
    const chart = page.getByTestId('density-chart')
    const [lo, hi, step] = await Promise.all(['data-x-min', 'data-x-max', 'data-x-step'].map(async (a) => Number(await chart.getAttribute(a))))
    expect(/^[125]0*$|^0\.0*[125]$/.test(String(step))).toBe(true)
    for (const end of [lo, hi]) expect(Math.abs(end / step - Math.round(end / step))).toBeLessThan(1e-9)
    expect(await page.locator('body').innerText()).not.toMatch(/% vague|Reference prior/)
    const tipping = await page.getByTestId('tipping-panel').innerText()
    expect(tipping).toContain('act if P(burst_rate > 12')
    expect(tipping).toMatch(/spread|centre|median/)
    await s.shot('impact-05-result')
    await expectAccessible(s.page, 'analyst impact')
  })

  it('downloads the table as CSV and a chart as PNG', async () => {
    const { page } = s
    const [csv] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download-csv').click()])
    expect(csv.suggestedFilename()).toBe('impact-burst_rate-v1-candidates.csv')
    const text = readFileSync((await csv.path())!, 'utf8').replace(/^\uFEFF/, '')
    const lines = text.trimEnd().split('\r\n')
    expect(lines[0].startsWith('candidate,kind,prior,prior mean (bursts per 100 km per year)')).toBe(true)
    expect(lines).toHaveLength(8)
    expect(lines.find((l) => l.startsWith('"Pooled (linear, equal weights)",pooled,'))).toBeTruthy()
    expect(lines[0]).toContain(',log fractional Bayes factor vs comparison prior,fractional Bayes factor vs comparison prior,training fraction b,prior sensitivity (power scaling),likelihood sensitivity (power scaling),sensitivity diagnosis,')
    const bColumn = lines[0].split(',').indexOf('training fraction b')
    const reconciledLine = lines.find((l) => l.startsWith('Reconciled prior,reconciled,'))!
    expect(reconciledLine.match(/("[^"]*"|[^,]*)(,|$)/g)![bColumn].replace(/,$/, '')).toBe('0.125')
    // The pilot n (total exposure 1.10 + 0.85 + … + 0.80) prints as 8, not 7.999999999999999.
    const nColumn = lines[0].split(',').indexOf('pilot n')
    expect(nColumn).toBeGreaterThan(0)
    expect(new Set(lines.slice(1).map((l) => l.match(/("[^"]*"|[^,]*)(,|$)/g)![nColumn].replace(/,$/, '')))).toEqual(new Set(['8']))

    const [png] = await Promise.all([page.waitForEvent('download'), page.getByTestId('sweep-evidence-chart').getByTestId('download-png').click()])
    expect(png.suggestedFilename()).toBe('impact-burst_rate-v1-sweep-evidence.png')
    const bytes = readFileSync((await png.path())!)
    expect([...bytes.subarray(0, 4)]).toEqual([0x89, 0x50, 0x4e, 0x47])
    const [alphaPng] = await Promise.all([page.waitForEvent('download'), page.getByTestId('alpha-chart').getByTestId('download-png').click()])
    expect(alphaPng.suggestedFilename()).toBe('impact-burst_rate-v1-prior-weight.png')
    expect([...readFileSync((await alphaPng.path())!).subarray(0, 4)]).toEqual([0x89, 0x50, 0x4e, 0x47])
  })

  it('answers the same inputs from the cache', async () => {
    const { page } = s
    await page.getByTestId('impact-run').click()
    await page.getByTestId('impact-cached').waitFor()
    await s.shot('impact-06-cached')
  })

  it('picks up a running analysis after a reload: the progress bar is back and the result arrives', async () => {
    const { page } = s
    await field(page, 'decision-threshold').fill('13')
    await holdingStores(async () => {
      await page.getByTestId('impact-run').click()
      await expect.poll(async () => page.getByTestId('impact-progress').innerText(), { timeout: 30_000 }).toMatch(/step 29 of 30/)
      await page.reload()
      // The page opened again finds the job still running and follows it: the bar with the steps computed so far.
      const bar = page.getByTestId('impact-progress-bar')
      await bar.waitFor({ timeout: 30_000 })
      await expect.poll(async () => page.getByTestId('impact-progress').innerText(), { timeout: 30_000 }).toMatch(/step 29 of 30/)
      expect(Number(await bar.getAttribute('aria-valuenow'))).toBe(97)
      await expect(page.getByTestId('impact-run').isDisabled()).resolves.toBe(true)
      await s.shot('impact-07-picked-up')
    })
    await page.getByTestId('impact-table').waitFor({ timeout: 30_000 })
    await expect.poll(async () => page.getByTestId('tipping-panel').innerText(), { timeout: 30_000 }).toContain('act if P(burst_rate > 13')
    await expect(page.getByTestId('impact-progress').count()).resolves.toBe(0)
  })

  it('cancels a queued analysis with the button beside the progress: it ends cancelled and stores nothing', async () => {
    const { page } = s
    const analyses = async () => (await inPage(page, (call, id) => call('GET', `/api/quantities/${id}/impact`), quantityId) as { id: number }).id
    const before = await analyses()
    let queuedId = ''
    await holdingStores(async () => {
      // Another analysis keeps the worker busy storing, so the one run from the page waits in the queue.
      const busy = await inPage(page, async (call, id) => {
        const last = await call('GET', `/api/quantities/${id}/impact`) as { input: { decision: object } }
        return call('POST', `/api/quantities/${id}/impact`, { ...last.input, decision: { ...last.input.decision, threshold: 14 } })
      }, quantityId) as { id: string }
      await expect.poll(async () => (await inPage(page, (call, id) => call('GET', `/api/impact-jobs/${id}`), busy.id) as { state: string }).state, { timeout: 30_000 }).toBe('running')
      await field(page, 'decision-threshold').fill('15')
      await page.getByTestId('impact-run').click()
      const progress = page.getByTestId('impact-progress')
      await progress.getByText('Waiting for a free analysis worker').waitFor({ timeout: 30_000 })
      await expect.poll(async () => (await inPage(page, (call, id) => call('GET', `/api/quantities/${id}/impact-jobs/active`), quantityId) as unknown[]).length).toBe(2)
      expect(await progress.getAttribute('data-state')).toBe('queued')
      await s.shot('impact-08-queued')
      queuedId = (await inPage(page, (call, id) => call('GET', `/api/quantities/${id}/impact-jobs/active`), quantityId) as { id: string }[])
        .find((j) => j.id !== busy.id)!.id
      await page.getByTestId('impact-cancel').click()
      await page.getByTestId('impact-cancelled').getByText('The analysis was cancelled before it finished; nothing was stored.').waitFor()
      await expect(progress.count()).resolves.toBe(0)
      await expect(page.getByTestId('impact-run').isEnabled()).resolves.toBe(true)
      await s.shot('impact-09-cancelled')
    })
    const job = await inPage(page, (call, id) => call('GET', `/api/impact-jobs/${id}`), queuedId) as { state: string; result: unknown }
    expect(job).toMatchObject({ state: 'cancelled', result: null })
    // The busy analysis was stored after the hold; the cancelled one never is.
    await expect.poll(analyses, { timeout: 30_000 }).toBeGreaterThan(before)
    const db = createDb(inject('databaseUrl'))
    try {
      expect(await db('impact_analyses').where({ job_id: queuedId })).toEqual([])
    } finally {
      await db.destroy()
    }
    // The page still shows the analysis it showed before (threshold 13), not the cancelled one's.
    expect(await page.getByTestId('tipping-panel').innerText()).toContain('act if P(burst_rate > 13')
  })

  it('logged no console errors beyond the refused uploads and loaded nothing from another origin', async () => {
    // 400: the file with a typo; 409: the same file uploaded again.
    const errors = s.consoleErrors.filter((e) => !/status of (40[01]|409)/.test(e))
    expect(errors).toEqual([])
    expect(s.foreignRequests).toEqual([])
  })
})
