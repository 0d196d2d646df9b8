import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { DEMO_PASSWORD, DEMO_STUDY_TITLE } from '../../seeds/demo'
import { openBrowser, signInAs, type BrowserSession, field, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'
import { expectPanelInView } from '../support/panel-ranges'
import { cutoffFromHeight, heightOfCutoff } from '../../src/reconcile/cutoff'

/**
 * The reconciliation workspace in chromium: a quantity of the demo study gets a round answered by the three demo
 * experts (set up through the API from the page, as the e2e database only holds the seeded study); the analyst opens
 * the workspace from the quantity card, pools the panel with Cooke performance weights, sees the cutoff drop the
 * badly calibrated expert, picks the best-fitting family and marks the quantity reconciled.
 */

const QUANTITY = {
  name: 'Burst rate of relined cast-iron mains',
  symbol: `relined_${Date.now() % 100000}`,
  unit: 'bursts per 100 km per year',
  question: 'Over 2027–2031, what will be the average number of bursts per 100 km per year on cast-iron mains relined since 2010?',
}

interface Setup {
  studyId: number
  quantityId: number
  roundId: number
}

/**
 * Runs in the page: the analyst creates the quantity and a round, puts the three demo experts on the panel and opens
 * it; each expert then signs in (through the API), answers the quantity and the calibration questions and submits;
 * finally the analyst signs in again.
 */
async function setUpRound(page: Page): Promise<Setup> {
  return inPage(page, async (call, { password, studyTitle, quantity }) => {
    async function signIn(email: string): Promise<void> {
      await call('POST', '/api/auth/sign-out').catch(() => undefined)
      await call('POST', '/api/auth/sign-in', { email, password })
    }

    const studies = await call<{ id: number; title: string }[]>('GET', '/api/studies')
    const study = studies.find((s) => s.title === studyTitle)!
    const q = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, { ...quantity, support: { kind: 'positive' } })
    const questions = await call<{ id: number; question: string; unit: string; trueValue: number | null; version: number }[]>('GET', `/api/studies/${study.id}/calibration-questions`)
    for (const [i, cq] of questions.entries()) {
      if (cq.trueValue === null || cq.trueValue === undefined) {
        const updated = await call<{ trueValue: number }>('PATCH', `/api/calibration-questions/${cq.id}`, { question: cq.question, unit: cq.unit, trueValue: 20 + 7 * i, version: cq.version })
        cq.trueValue = updated.trueValue
      }
    }
    const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
      title: 'Relined mains: burst rate', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 14 * 864e5).toISOString(),
      items: [{ quantityId: q.id, method: 'quantile' }],
    })
    const panel = [
      { email: 'expert1@kestrel.example', name: 'Tomasz Wierzbicki', answer: [6, 10, 13, 17, 30] },
      { email: 'expert2@kestrel.example', name: 'Helen Okafor', answer: [4, 8, 10, 12.5, 22] },
      { email: 'expert3@kestrel.example', name: 'Rafael Duarte', answer: [10, 22, 27, 33, 50] },
    ]
    for (const p of panel) await call('POST', `/api/rounds/${round.id}/invitations`, { email: p.email, name: p.name })
    await call('POST', `/api/rounds/${round.id}/open`)

    // Calibration answers (5 / 50 / 95 %) around each true value t, on the scale s: the first expert is well calibrated,
    // the second confidently too high on every question, the third very wide.
    const styles = [
      (t: number, s: number, i: number) => [t - 0.4 * s, t + (i % 2 ? 0.08 : -0.08) * s, t + 0.5 * s],
      (t: number, s: number, i: number) => [t + (0.15 + 0.02 * i) * s, t + (0.25 + 0.02 * i) * s, t + (0.35 + 0.02 * i) * s],
      (t: number, s: number) => [t - 0.8 * s, t + 0.3 * s, t + 3 * s],
    ]
    for (const [k, p] of panel.entries()) {
      await signIn(p.email)
      const [lower, q25, q50, q75, upper] = p.answer
      await call('PUT', `/api/rounds/${round.id}/judgements/${q.id}`, {
        method: 'quantile', lower, upper, points: [{ value: q25, prob: 0.25 }, { value: q50, prob: 0.5 }, { value: q75, prob: 0.75 }],
        rationale: 'Burst logs of the relined districts since 2010 and the reports of neighbouring boards.', version: 0,
      })
      for (const [i, cq] of questions.entries()) {
        const t = cq.trueValue as number
        const [q05, q50c, q95] = styles[k](t, Math.max(Math.abs(t), 1), i)
        await call('PUT', `/api/rounds/${round.id}/calibration-answers/${cq.id}`, { q05, q50: q50c, q95, version: 0 })
      }
      await call('POST', `/api/rounds/${round.id}/submit`)
    }
    await signIn('analyst@kestrel.example')
    return { studyId: study.id, quantityId: q.id, roundId: round.id }
  }, { password: DEMO_PASSWORD, studyTitle: DEMO_STUDY_TITLE, quantity: QUANTITY })
}

let s: BrowserSession
let setup: Setup

beforeAll(async () => {
  s = await openBrowser()
})
keepFailureEvidence('reconcile', () => ({ analyst: s }))
afterAll(async () => {
  await s?.close()
})

describe('reconciling a quantity', () => {
  it('sets up a submitted round through the API and opens the workspace from the quantity card', async () => {
    const { page } = s
    await signInAs(s, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    setup = await setUpRound(page)

    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/quantities`)
    const card = page.getByTestId('quantity-card').filter({ hasText: QUANTITY.name })
    await card.getByTestId('quantity-reconcile').click()
    await page.waitForURL(new RegExp(`/studies/${setup.studyId}/reconcile/${setup.quantityId}$`))
    await page.getByTestId('panel-ranges').waitFor()
    await expect(page.getByTestId('expert-row').count()).resolves.toBe(3)
    await expect(page.getByTestId('expert-row').first().textContent()).resolves.toContain('Tomasz Wierzbicki')
    // The panel view names the experts with the same study-wide labels as the table, one row each, and fills the combination beneath.
    const tableLabels = await page.getByTestId('expert-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-label')))
    await expect(page.getByTestId('panel-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-label')))).resolves.toEqual(tableLabels)
    await page.getByTestId('panel-combined-shape').waitFor()
    await expectPanelInView(page, 1280, 3)
    await expect(page.getByTestId('reconcile-status').getAttribute('data-status')).resolves.toBe('new')
    await s.shot('reconcile-01-experts')
    await expectAccessible(s.page, 'analyst reconcile')
  })

  it('pools with performance weights and shows the cutoff dropping the badly calibrated expert', async () => {
    const { page } = s
    await page.getByTestId('method-linear').click()
    await page.getByTestId('weights-performance').click()
    await page.getByTestId('cutoff-plot').waitFor()
    await expect(page.getByTestId('cooke-row').count()).resolves.toBe(3)
    const weights = async () => (await page.getByTestId('cooke-weight').allTextContents()).map(Number)
    const before = await weights()
    expect(before[0]).toBeGreaterThan(0.5)
    expect(before[1]).toBeGreaterThan(0)

    const bars = async () => page.getByTestId('weight-bar').evaluateAll((els) => els.map((el) => Number(el.getAttribute('data-weight'))))
    expect((await bars())[1]).toBeGreaterThan(0)

    // Dragging the amber line with the mouse sets the cutoff: grabbed by the middle of its handle (at cutoff 0 the lower
    // half hangs over the axis labels, which once took the pointer) and let go at the height of 0.01. The mouse acts
    // where the plot is on the screen, so it is scrolled into view first.
    const area = page.getByTestId('cutoff-area')
    await page.getByTestId('cutoff-plot').scrollIntoViewIfNeeded()
    const bottom = Number(await area.getAttribute('data-lowest-decade'))
    expect(bottom).toBeLessThanOrEqual(-2)
    const box = (await area.boundingBox())!
    const handle = (await page.getByTestId('cutoff-handle').boundingBox())!
    const targetY = Math.round(box.y + box.height * (1 - heightOfCutoff(0.01, bottom)))
    const dragged = cutoffFromHeight(1 - (targetY - box.y) / box.height, bottom)
    expect(dragged).toBeGreaterThan(0.005)
    expect(dragged).toBeLessThan(0.02)
    await page.mouse.move(handle.x + handle.width / 2, handle.y + handle.height / 2)
    await page.mouse.down()
    await page.mouse.move(handle.x + handle.width / 2, (handle.y + targetY) / 2, { steps: 4 })
    await page.mouse.move(handle.x + handle.width / 2, targetY, { steps: 4 })
    await page.mouse.up()
    await expect(page.getByTestId('cutoff-handle').getAttribute('aria-valuenow')).resolves.toBe(String(dragged))
    await expect(page.getByTestId('cutoff-status').textContent()).resolves.toBe(`Cutoff ${dragged}: 2 of 3 experts keep a weight.`)
    // The expert below the line is greyed out, the other two stay, and the weights follow.
    await expect(page.getByTestId('cutoff-point').evaluateAll((els) => els.map((e) => e.getAttribute('data-below')))).resolves.toEqual(['false', 'true', 'false'])
    await expect.poll(async () => (await weights())[1]).toBe(0)
    const line = (await page.locator('.cutoff-plot__line').boundingBox())!
    expect(Math.abs(line.y - targetY)).toBeLessThan(3)
    await s.shot('reconcile-02a-cutoff-dragged')

    // A typed cutoff moves the line as well.
    await field(page, 'cooke-cutoff').fill('0.01')
    await field(page, 'cooke-cutoff').press('Tab')
    await expect.poll(async () => (await weights())[1]).toBe(0)
    await expect(page.getByTestId('cutoff-handle').getAttribute('aria-valuenow')).resolves.toBe('0.01')
    // The plot greys out the expert below the line, the weight bars follow and so does the combination the analyst sees.
    await expect(page.getByTestId('cutoff-point').nth(1).getAttribute('data-below')).resolves.toBe('true')
    await expect.poll(async () => (await bars())[1]).toBe(0)

    // Labels are the study's (joining order across all its rounds), so read the second expert's from the table.
    const secondLabel = (await page.getByTestId('cooke-row').nth(1).textContent())?.match(/Expert \d+/)?.[0]
    expect(secondLabel).toMatch(/^Expert \d+$/)
    await expect(page.getByTestId('cooke-effect').textContent()).resolves.toContain(`${secondLabel} falls below the cutoff`)
    await expect.poll(async () => (await page.getByTestId('expert-weight').allTextContents())[1].trim()).toBe('0')
    await expect(page.getByTestId('combination-summary').textContent()).resolves.toContain('performance weights')
    await s.shot('reconcile-02-performance-weights')
  })

  it('picks the best-fitting family and marks the quantity reconciled with a rationale', async () => {
    const { page } = s
    const best = page.getByTestId('fit-row').first()
    const family = await best.getAttribute('data-family')
    await best.getByTestId('fit-choose').click()
    await expect(best.getAttribute('data-chosen')).resolves.toBe('true')

    // Too short a rationale is refused before anything is sent.
    await field(page, 'rationale').fill('Too short')
    await page.getByTestId('mark-reconciled').click()
    await expect(page.getByTestId('rationale').textContent()).resolves.toContain('at least 20 characters')

    await field(page, 'rationale').fill('Performance weights: Expert 1 answered the calibration questions best; Expert 2 was confidently too high and is cut at α = 0.01.')
    await page.getByTestId('mark-reconciled').click()
    await page.locator('[data-testid="reconcile-status"][data-status="reconciled"]').waitFor()
    await expect(page.getByTestId('reconcile-status').textContent()).resolves.toContain('Reconciled')
    await page.getByTestId('reopen').waitFor()
    await expect(page.getByTestId('history-entry').count()).resolves.toBe(1)

    const saved = await page.evaluate(async (id) => (await (await fetch(`/api/quantities/${id}/reconciliation`)).json()).saved, setup.quantityId)
    expect(saved).toMatchObject({ status: 'reconciled', method: 'linear', weightsMode: 'performance', cutoff: 0.01, family, roundId: setup.roundId })
    expect(saved.weights[1]).toBe(0)
    await s.shot('reconcile-03-reconciled')
    await expectAccessible(s.page, 'analyst reconcile, reconciled')
  })

  it('shows the panel view, with the reconciled prior over the combination, on a 360 px phone', async () => {
    const { page } = s
    await page.getByTestId('panel-prior-line').waitFor()
    await page.setViewportSize({ width: 360, height: 740 })
    try {
      await page.getByTestId('panel-ranges').scrollIntoViewIfNeeded()
      await expectPanelInView(page, 360, 3)
      await s.shot('reconcile-04-panel-phone')
    } finally {
      await page.setViewportSize({ width: 1280, height: 800 })
    }
  })
})
