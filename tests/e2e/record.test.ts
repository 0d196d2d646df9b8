import { readFileSync, statSync } from 'node:fs'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { DEMO_PASSWORD } from '../../seeds/demo'
import { openBrowser, signInAs, type BrowserSession, field, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'

/**
 * The prior record's review workflow in chromium: a study with two reconciled quantities is set up through the API
 * (from the page, with the CSRF token); the analyst submits the record; the reviewer comments and returns it; the
 * analyst changes nothing substantive (shows the expert names) and resubmits; the reviewer signs it off; the analyst
 * downloads the .docx.
 */

const STUDY_TITLE = `Record workflow ${Date.now().toString(36)}`
const FLOW_SECTION = 'Night-flow reduction (flow)'
const RETURN_COMMENT = 'Explain why the pool was weighted equally rather than by calibration.'
const ANSWER = 'Equal weights were kept: no calibration questions were answered by both experts; the rationale now says so.'
const PANEL_COMMENT = 'Please state how the declared consulting interest was managed.'

/** Creates the study through the API from inside the page (same origin, session cookie, CSRF header). */
async function setUpReconciledStudy(page: Page): Promise<number> {
  return page.evaluate(async ({ title, password }) => {
    async function call<T = any>(method: string, url: string, body?: unknown): Promise<T> {
      const headers: Record<string, string> = { accept: 'application/json' }
      if (method !== 'GET') headers['x-csrf-token'] = (await (await fetch('/api/auth/csrf')).json()).token
      if (body !== undefined) headers['content-type'] = 'application/json'
      const res = await fetch(url, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
      const text = await res.text()
      if (!res.ok) throw new Error(`${method} ${url} → ${res.status}: ${text}`)
      return (text ? JSON.parse(text) : undefined) as T
    }
    async function signIn(email: string) {
      await call('POST', '/api/auth/sign-out').catch(() => undefined)
      await call('POST', '/api/auth/sign-in', { email, password })
    }
    const Z75 = 0.674489750196081743
    const quartiles = (mu: number, sd: number, lower: number, upper: number) => ({
      method: 'quantile', lower, upper,
      points: [{ value: mu - sd * Z75, prob: 0.25 }, { value: mu, prob: 0.5 }, { value: mu + sd * Z75, prob: 0.75 }],
    })

    await signIn('analyst@kestrel.example')
    const study = await call<{ id: number }>('POST', '/api/studies', { title, context: 'Decide whether to extend pressure management and offer a leak-alert scheme.' })
    const directory = await call<{ id: number; email: string }[]>('GET', '/api/users/directory')
    const reviewer = directory.find((u) => u.email === 'reviewer@kestrel.example')!
    await call('POST', `/api/studies/${study.id}/members`, { userId: reviewer.id, studyRole: 'reviewer' })
    const flow = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
      name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', support: { kind: 'real' },
      question: 'What will be the mean reduction in minimum night flow one year after pressure management?',
      assumptions: 'Valves maintained as specified.', evidenceNotes: 'Eight pilot districts, 2024–2025.',
    })
    const uptake = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
      name: 'Leak-alert uptake', symbol: 'uptake', unit: 'share of households', support: { kind: 'proportion' },
      question: 'What share of households will have joined the leak-alert scheme after twelve months?',
    })
    const questions: number[] = []
    for (const [question, trueValue] of [['Bursts on pre-1960 cast iron in 2024?', 61], ['Night flow in KV-07, March 2025?', 7.4]] as const) {
      questions.push((await call<{ id: number }>('POST', `/api/studies/${study.id}/calibration-questions`, { question, unit: 'u', trueValue })).id)
    }
    const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
      title: 'Round 1', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
      items: [{ quantityId: flow.id, method: 'quantile' }, { quantityId: uptake.id, method: 'quantile' }],
    })
    const names = ['Tomasz Wierzbicki', 'Helen Okafor', 'Rafael Duarte']
    for (const n of [1, 2, 3]) await call('POST', `/api/rounds/${round.id}/invitations`, { email: `expert${n}@kestrel.example`, name: names[n - 1] })
    await call('POST', `/api/rounds/${round.id}/open`)

    const flows = [[3, 1], [4, 1.3], [3.5, 0.8]]
    const shares = [[0.3, 0.06], [0.36, 0.08], [0.25, 0.05]]
    for (const n of [1, 2, 3]) {
      await signIn(`expert${n}@kestrel.example`)
      await call('PUT', `/api/rounds/${round.id}/declaration`, {
        expertise: `Leakage control at a regional water utility for ${10 + n} years.`,
        interests: n === 2 ? 'described' : 'none', interestsText: n === 2 ? 'Consults for a valve manufacturer.' : '', seenPilotData: false,
      })
      const [fm, fs] = flows[n - 1]
      await call('PUT', `/api/rounds/${round.id}/judgements/${flow.id}`, { ...quartiles(fm, fs, fm - 5 * fs, fm + 5 * fs), chosenFamily: 'normal', rationale: 'Pilot districts and own schemes.', version: 0 })
      const [um, us] = shares[n - 1]
      await call('PUT', `/api/rounds/${round.id}/judgements/${uptake.id}`, { ...quartiles(um, us, 0.02, 0.9), rationale: 'Similar schemes elsewhere.', version: 0 })
      for (const [i, id] of questions.entries()) {
        const truth = i === 0 ? 61 : 7.4
        await call('PUT', `/api/rounds/${round.id}/calibration-answers/${id}`, { q05: truth * (0.5 + 0.1 * n), q50: truth * (0.9 + 0.1 * n), q95: truth * (1.4 + 0.1 * n), version: 0 })
      }
      await call('POST', `/api/rounds/${round.id}/submit`)
    }

    await signIn('analyst@kestrel.example')
    for (const [quantity, family] of [[flow, 'normal'], [uptake, 'beta']] as const) {
      const view = await call<{ roundId: number }>('GET', `/api/quantities/${quantity.id}/reconciliation`)
      await call('PUT', `/api/quantities/${quantity.id}/reconciliation`, {
        roundId: view.roundId, method: 'linear', weights: 'equal', cutoff: 0, excludedExperts: [], family, reconciled: true, version: 0,
        rationale: 'The linear pool keeps the spread between the experts; the family fits it closely.',
      })
    }
    // No pilot data: the night-flow reason is recorded here, the uptake one on the record page by the analyst.
    await call('PUT', `/api/quantities/${flow.id}/impact/not-run`, { reason: 'No pilot data exist yet for the night-flow reduction.' })
    await call('POST', '/api/auth/sign-out')
    return study.id
  }, { title: STUDY_TITLE, password: DEMO_PASSWORD })
}

let setup: BrowserSession
let analyst: BrowserSession
let reviewer: BrowserSession
let studyId = 0
let chartPosts = 0

const status = (s: BrowserSession) => s.page.getByTestId('record-status')
async function waitForStatus(s: BrowserSession, value: string) {
  await s.page.locator(`[data-testid="record-status"][data-status="${value}"]`).waitFor()
}
async function openRecord(s: BrowserSession) {
  await s.page.goto(`${s.baseUrl}/studies/${studyId}/record`)
  await status(s).waitFor()
}

beforeAll(async () => {
  setup = await openBrowser()
  analyst = await openBrowser()
  reviewer = await openBrowser()
  analyst.page.on('response', (r) => {
    if (r.url().endsWith(`/api/studies/${studyId}/record/charts`) && r.request().method() === 'POST' && r.status() === 204) chartPosts++
  })
})
keepFailureEvidence('record', () => ({ analyst, reviewer }))
afterAll(async () => {
  await setup?.close()
  await analyst?.close()
  await reviewer?.close()
})

describe('prior record: submit, return with comments, resubmit, sign off, download', () => {
  it('sets up a study with two reconciled quantities through the API', async () => {
    await setup.page.goto(`${setup.baseUrl}/sign-in`)
    studyId = await setUpReconciledStudy(setup.page)
    expect(studyId).toBeGreaterThan(0)
  })

  it('the analyst opens the record from the study navigation: a draft with both final priors, charts and model code', async () => {
    const { page } = analyst
    await signInAs(analyst, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await page.goto(`${analyst.baseUrl}/studies/${studyId}`)
    await page.getByTestId('study-title').waitFor()
    await expectAccessible(page, 'analyst overview')
    await page.getByTestId('nav-record').click()
    await page.waitForURL(new RegExp(`/studies/${studyId}/record$`))
    await waitForStatus(analyst, 'draft')
    expect(await page.getByTestId('record-hash').innerText()).toMatch(/^[0-9a-f]{64}$/)
    await expect(page.getByTestId('audit-chain').getAttribute('data-intact')).resolves.toBe('true')
    const sections = await page.getByTestId('record-section').evaluateAll((els) => els.map((e) => e.getAttribute('data-section')))
    expect(sections).toEqual(['Study and decision', 'Expert panel', 'Calibration questions', FLOW_SECTION, 'Leak-alert uptake (uptake)', 'Cautions', 'Review and sign-off', 'Change history'])
    await expect(page.getByTestId('final-prior-chart').count()).resolves.toBe(2)
    await expect(page.locator('[data-testid="model-code"][data-language="jags"]').first().innerText()).resolves.toMatch(/^flow ~ dnorm\(/)

    // The charts go to the server once drawn, so the .docx carries them.
    const deadline = Date.now() + 15_000
    while (chartPosts < 2 && Date.now() < deadline) await page.waitForTimeout(200)
    expect(chartPosts).toBe(2)

    // Round trip in the browser: the Stan line read back as Stan reads it.
    const flow = page.locator(`[data-testid="record-section"][data-section="${FLOW_SECTION}"]`)
    await flow.locator('[data-testid="model-check"][data-language="stan"]').click()
    const result = flow.locator('[data-testid="model-check-result"][data-language="stan"]')
    await result.waitFor()
    expect(await result.innerText()).toMatch(/reads back as Normal\(mean [\d.]+, sd [\d.]+\), quantiles agree to (0|\de-1\d)/)
    await expect(result.getAttribute('data-ok')).resolves.toBe('true')
    await analyst.shot('record-01-draft')
    await expectAccessible(page, 'analyst record')
  })

  it('names one expert with the same label on the reconcile screen, the record page, the JSON and the .docx', async () => {
    const { page } = analyst
    const flowId = await page.evaluate(async (id) => ((await (await fetch(`/api/studies/${id}/quantities`)).json()) as { id: number; symbol: string }[]).find((x) => x.symbol === 'flow')!.id, studyId)
    // The reconcile screen shows the study team names beside the labels: Helen Okafor (expert 2, middle value 4 L/s).
    await page.goto(`${analyst.baseUrl}/studies/${studyId}/reconcile/${flowId}`)
    const helenRow = page.getByTestId('expert-row').filter({ hasText: 'Helen Okafor' })
    await helenRow.waitFor()
    const label = (await helenRow.getAttribute('data-label'))!
    expect(label).toMatch(/^Expert \d+$/)
    // The record page (names hidden) gives her answer, and only hers, under that label.
    await page.goto(`${analyst.baseUrl}/studies/${studyId}/record`)
    await waitForStatus(analyst, 'draft')
    const flow = page.locator(`[data-testid="record-section"][data-section="${FLOW_SECTION}"]`)
    const answerRow = flow.locator('tr').filter({ hasText: '; 4 at 0.5;' })
    await expect(answerRow.count()).resolves.toBe(1)
    await expect(answerRow.locator('td').nth(1).innerText()).resolves.toBe(label)
    // The JSON and the .docx say the same.
    const json = await page.evaluate(async (id) => (await fetch(`/api/studies/${id}/record.json`)).json(), studyId)
    const judgement = json.quantities.find((x: { symbol: string }) => x.symbol === 'flow').judgements.find((j: { answer: { points: { value: number }[] } }) => j.answer.points[1].value === 4)
    expect(judgement.expert).toEqual({ code: label })
    const docx = await page.evaluate(async (id) => Array.from(new Uint8Array(await (await fetch(`/api/studies/${id}/record.docx`)).arrayBuffer())), studyId)
    const lines = (await mammoth.extractRawText({ buffer: Buffer.from(docx) })).value.split('\n').map((l) => l.trim()).filter(Boolean)
    const at = lines.findIndex((l) => l.includes('; 4 at 0.5;'))
    expect(at).toBeGreaterThan(0)
    expect(lines[at - 1]).toBe(label)
    expect(lines.join('\n')).not.toMatch(/Helen Okafor/)
  })

  it('the section index stays in view while the record scrolls, jumps to a section, and long tables start folded', async () => {
    const { page } = analyst
    await page.setViewportSize({ width: 1280, height: 800 })
    const index = page.getByTestId('record-index')
    const links = index.getByTestId('record-index-link')
    expect((await links.allInnerTexts()).map((t) => t.replace(/\s+/g, ' '))).toEqual(['1. Study and decision', '2. Expert panel', '3. Calibration questions', `4. ${FLOW_SECTION}`, '5. Leak-alert uptake (uptake)', '6. Cautions', '7. Review and sign-off', '8. Change history'])
    // Jump to a quantity's section: its heading comes to the top, the index is still on screen and marks it.
    await links.filter({ hasText: FLOW_SECTION }).click()
    const heading = page.locator('#record-s4')
    await page.waitForFunction(() => Math.abs(document.getElementById('record-s4')!.getBoundingClientRect().top) < 60)
    expect(await page.evaluate(() => window.scrollY)).toBeGreaterThan(300)
    expect(await heading.evaluate((el) => el === document.activeElement)).toBe(true)
    const box = (await index.boundingBox())!
    expect(box.y).toBeGreaterThanOrEqual(0)
    expect(box.y).toBeLessThan(800)
    await page.waitForFunction(() => document.querySelector('[data-testid="record-index-link"][aria-current="location"]')?.textContent?.includes('Night-flow'))

    // The change history shows its newest 12 events; the rest on request.
    const rows = page.getByTestId('change-history-row')
    expect(await rows.count()).toBe(12)
    const fold = page.locator('[aria-controls="record-history-table"]')
    const label = await fold.innerText()
    const total = Number(label.match(/Show all (\d+) events/)![1])
    expect(total).toBeGreaterThan(12)
    await fold.click()
    expect(await rows.count()).toBe(total)
    await expect(fold.getAttribute('aria-expanded')).resolves.toBe('true')

    // On a phone the index is a strip held at the top of the screen.
    await page.setViewportSize({ width: 360, height: 740 })
    await page.locator('#record-s4').scrollIntoViewIfNeeded()
    await page.mouse.wheel(0, 400)
    await page.waitForTimeout(300)
    const strip = (await index.boundingBox())!
    expect(strip.y).toBeGreaterThanOrEqual(-1)
    expect(strip.y).toBeLessThan(10)
    expect(strip.width).toBeLessThanOrEqual(360)
    await expectAccessible(page, 'record with its index at 360 px')
    await page.setViewportSize({ width: 1280, height: 800 })
    await page.evaluate(() => window.scrollTo(0, 0))
  })

  it('the analyst submits the record: in review, content hash frozen', async () => {
    const { page } = analyst
    // Uptake has no impact analysis of its final prior: the record says so, and the analyst records why before submitting.
    const uptake = page.locator('[data-testid="record-section"][data-section="Leak-alert uptake (uptake)"] [data-testid="impact-missing"]')
    expect(await uptake.innerText()).toContain('No impact analysis of the final prior exists.')
    await uptake.getByTestId('impact-not-run-open').click()
    await uptake.locator('textarea').fill('The pilot survey has not been run; there are no data to analyse.')
    await uptake.getByTestId('impact-not-run-save').click()
    await page.locator('[data-testid="impact-missing"][data-has-reason="true"]').nth(1).waitFor()
    expect(await page.getByTestId('record-cautions').innerText()).toContain('Leak-alert uptake: no impact analysis of the final prior was run; the analyst’s reason: The pilot survey has not been run')
    await page.getByTestId('record-submit').click()
    await waitForStatus(analyst, 'in_review')
    await expect(page.getByTestId('record-hash').getAttribute('data-frozen')).resolves.toBe('true')
    await expect(page.getByTestId('record-submit').count()).resolves.toBe(0)
    await expect(page.getByTestId('show-names').count()).resolves.toBe(0)
    await analyst.shot('record-02-submitted')
  })

  it('the reviewer comments on the panel and returns the record with a comment on the flow section', async () => {
    const { page } = reviewer
    await signInAs(reviewer, 'reviewer@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await openRecord(reviewer)
    await waitForStatus(reviewer, 'in_review')
    await expect(page.getByTestId('record-submit').count()).resolves.toBe(0)

    const panel = page.locator('[data-testid="record-section"][data-section="Expert panel"]')
    await panel.getByTestId('comment-open').click()
    await field(page, 'comment-body').fill(PANEL_COMMENT)
    await page.getByTestId('comment-submit').click()
    await panel.getByTestId('comment-item').filter({ hasText: PANEL_COMMENT }).waitFor()

    await page.getByTestId('record-return-open').click()
    await page.getByTestId('record-return-section').click()
    await page.getByRole('option', { name: FLOW_SECTION }).click()
    await field(page, 'record-return-comment').fill(RETURN_COMMENT)
    await reviewer.shot('record-03-return-dialog')
    await page.getByTestId('record-return-submit').click()
    await waitForStatus(reviewer, 'returned')
    const flow = page.locator(`[data-testid="record-section"][data-section="${FLOW_SECTION}"]`)
    const item = flow.locator('[data-testid="comment-item"][data-kind="return"]')
    await item.waitFor()
    expect(await item.innerText()).toContain(RETURN_COMMENT)
    await expect(page.getByTestId('record-sign-off').count()).resolves.toBe(0)
  })

  it('the analyst sees "Returned with comments" at the top, with the comment in a banner', async () => {
    const { page } = analyst
    await openRecord(analyst)
    await waitForStatus(analyst, 'returned')
    expect(await status(analyst).innerText()).toBe('Returned with comments')
    const banner = page.getByTestId('record-returned-banner')
    expect(await banner.innerText()).toContain(RETURN_COMMENT)
    expect(await page.getByTestId('record-signed-off').innerText()).not.toContain('awaiting a reviewer')
    await analyst.shot('record-04a-returned-banner')
  })

  it('the analyst sees the comment, shows the expert names and resubmits, answering the comment', async () => {
    const { page } = analyst
    await openRecord(analyst)
    await waitForStatus(analyst, 'returned')
    const flow = page.locator(`[data-testid="record-section"][data-section="${FLOW_SECTION}"]`)
    expect(await flow.getByTestId('comment-item').innerText()).toContain(RETURN_COMMENT)

    const patched = page.waitForResponse((r) => r.url().endsWith(`/api/studies/${studyId}/record`) && r.request().method() === 'PATCH')
    await page.getByTestId('show-names').click()
    expect((await patched).status()).toBe(200)
    await page.getByTestId('record-panel').getByText('Tomasz Wierzbicki').first().waitFor()

    await page.getByTestId('record-submit').click()
    const dialog = page.getByTestId('record-resubmit-dialog')
    await dialog.getByText(RETURN_COMMENT).waitFor()
    await page.getByTestId('record-resubmit-confirm').click()
    await dialog.getByTestId('record-answer-error').waitFor()
    await dialog.locator('[data-outcome="not-changed"]').click()
    await dialog.getByTestId('record-answer').locator('textarea').fill(ANSWER)
    await analyst.shot('record-04b-answer-dialog')
    await page.getByTestId('record-resubmit-confirm').click()
    await waitForStatus(analyst, 'in_review')
    const answer = flow.locator('[data-testid="comment-answer"][data-outcome="not-changed"]')
    expect(await answer.innerText()).toContain(ANSWER)
    await analyst.shot('record-04-resubmitted')
  })

  it('the reviewer signs off after confirming; the version is stamped and immutable', async () => {
    const { page } = reviewer
    await openRecord(reviewer)
    await waitForStatus(reviewer, 'in_review')
    await page.getByTestId('record-sign-off').click()
    const text = await page.getByTestId('record-sign-off-text').innerText()
    expect(text).toContain('you have reviewed version 1 of this prior record')
    expect(text).toContain('The timestamp shows when this version was fixed, and only that.')
    expect(await page.getByTestId('record-sign-off-guidance').innerText()).toContain('need review under the guidance that applies to it, by a qualified statistician')
    expect(text).not.toContain('shows the priors were fixed before any later data were seen')
    await reviewer.shot('record-05a-sign-off-dialog')
    await page.getByTestId('record-sign-off-confirm').click()
    await waitForStatus(reviewer, 'signed_off')
    expect(await page.getByTestId('record-signed-off').innerText()).toContain('Ingrid Solberg')
    await expect(page.getByTestId('audit-chain').getAttribute('data-intact')).resolves.toBe('true')
    await expect(page.getByTestId('comment-open').count()).resolves.toBe(0)
    await reviewer.shot('record-05-signed-off')
  })

  it('the analyst downloads the signed-off record as .docx', async () => {
    const { page } = analyst
    await openRecord(analyst)
    await waitForStatus(analyst, 'signed_off')
    await page.getByTestId('record-new-version').waitFor()
    expect(await page.getByTestId('download-docx').getAttribute('href')).toBe(`/api/studies/${studyId}/record.docx?version=1`)
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('download-docx').click()])
    expect(download.suggestedFilename()).toMatch(/^prior-record-.*-v1\.docx$/)
    const file = await download.path()
    expect(statSync(file).size).toBeGreaterThan(5 * 1024)
    expect(readFileSync(file).subarray(0, 2).toString('latin1')).toBe('PK')
    // The density charts the page sent are in the document.
    const { value: html } = await mammoth.convertToHtml({ path: file })
    expect(html.match(/<img src="data:image\/png;base64,/g) ?? []).toHaveLength(2)
    await analyst.shot('record-06-analyst-signed-off')
  })

  it('logged no console errors', () => {
    for (const s of [analyst, reviewer]) {
      expect(s.consoleErrors.filter((e) => !/status of 401/.test(e))).toEqual([])
      expect(s.foreignRequests).toEqual([])
    }
  })
})
