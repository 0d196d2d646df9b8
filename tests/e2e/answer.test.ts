import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { quantile } from '../../shared/stats'
import type { FitResult } from '../../shared/stats'
import { DEMO_PASSWORD } from '../../seeds/demo'
import { formatValue } from '../../shared/format'
import { openBrowser, signInAs, type BrowserSession, completeEntry, field, inPage, type Call, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'
import { copyDemoStudy } from '../support/demo-copy'
import { expectPhoneLayout } from '../support/phone'
import { expectPanelInView } from '../support/panel-ranges'
import { handleCentre, mouseDrag, screenX } from '../support/answer-line'

/**
 * The expert answering screen in chromium. The analyst sets up a round on the demo study through the API (from the
 * page): the burst rate by the quantile method, the leak-alert uptake by fixed intervals, the night-flow reduction on
 * a chip grid, the study's calibration questions after them. Expert 1 answers each method with the mouse and the
 * keyboard, sees the feedback statements change as the values change, reloads half-way and finds the draft, meets a
 * save from another window (409), fills the calibration questions and submits; expert 2 completes the quantile method
 * with the keyboard alone. A second round with feedback then shows expert 1 the others' round-1 distributions.
 */

interface Setup {
  studyId: number
  roundId: number
  burst: number
  uptake: number
  flow: number
}

interface RoundOptions {
  studyId: number
  title: string
  feedback: boolean
  only: boolean
}

/**
 * The analyst creates and opens a round with three quantities, one per method, and the three demo experts. The first
 * round goes to a fresh copy of the demo study (its quantities and calibration questions), so that what other suites
 * did on the demo study (calibration answered in their rounds is not asked again) cannot change what this one sees;
 * a later round reuses the same study.
 */
async function createRound(page: Page, options: { title: string; studyId?: number; feedback?: boolean; onlyBurstRate?: boolean }): Promise<Setup> {
  return inPage(
    page,
    async (call: Call, args: RoundOptions): Promise<Setup> => {
      type Q = { id: number; symbol: string }
      const study = { id: args.studyId }
      const quantities = await call<Q[]>('GET', `/api/studies/${study.id}/quantities`)
      const id = (symbol: string) => quantities.find((q) => q.symbol === symbol)!.id
      const items = [
        { quantityId: id('burst_rate'), method: 'quantile' },
        { quantityId: id('alert_uptake'), method: 'fixed-interval', edges: [0, 0.1, 0.2, 0.3, 0.5, 1] },
        { quantityId: id('night_flow_cut'), method: 'chip-grid', edges: [0, 1, 2, 3, 4, 5, 6, 7, 8], chips: 20 },
      ]
      const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
        title: args.title,
        briefing: 'Read the evidence notes of each quantity before answering. Give your own judgement; do not confer.',
        opensAt: new Date(Date.now() - 3600e3).toISOString(),
        closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        calibrationPosition: 'after',
        askCalibration: !args.feedback,
        feedbackEnabled: args.feedback,
        items: args.only ? items.slice(0, 1) : items,
      })
      for (const n of [1, 2, 3]) await call('POST', `/api/rounds/${round.id}/invitations`, { email: `expert${n}@kestrel.example`, name: `Expert ${n}` })
      await call('POST', `/api/rounds/${round.id}/open`)
      return { studyId: study.id, roundId: round.id, burst: id('burst_rate'), uptake: id('alert_uptake'), flow: id('night_flow_cut') }
    },
    { studyId: options.studyId ?? (await copyDemoStudy(page, 'Answer screen study')), title: options.title, feedback: options.feedback ?? false, only: options.onlyBurstRate ?? false },
  )
}

interface SavedJudgement {
  quantityId: number
  version: number
  answer: Record<string, unknown>
  fits: FitResult[]
  chosenFamily: string | null
  rationale: string
  status: string
}

/** The signed-in expert's saved judgements, as the server keeps them. */
async function savedJudgements(page: Page, roundId: number): Promise<SavedJudgement[]> {
  return inPage(page, (call: Call, args: { roundId: number }) => call<SavedJudgement[]>('GET', `/api/rounds/${args.roundId}/judgements`), { roundId })
}

/** Waits until the statements are shown again and the one at `index` reads differently from `before`. */
async function statementChanged(page: Page, index: number, before: string[]): Promise<void> {
  await expect
    .poll(async () => {
      const now = await page.getByTestId('feedback-statement').allInnerTexts()
      return now.length === before.length && now[index] !== before[index]
    })
    .toBe(true)
}

async function waitSaved(page: Page): Promise<void> {
  await page.locator('[data-testid="save-status"][data-state="saved"]').waitFor({ timeout: 10_000 })
}

/** A full-page picture from the top (the sticky rail would otherwise be drawn where the page was scrolled to). */
async function shot(s: BrowserSession, name: string): Promise<void> {
  await s.page.evaluate(() => window.scrollTo(0, 0))
  await s.shot(name)
}

const statements = (page: Page) => page.getByTestId('feedback-statement').allInnerTexts()
const rail = (page: Page, key: string) => page.locator(`[data-testid="rail-item"][data-key="${key}"]`)

let expert1: BrowserSession
let expert2: BrowserSession
let analyst: BrowserSession
let setup: Setup

beforeAll(async () => {
  analyst = await openBrowser()
  expert1 = await openBrowser()
  expert2 = await openBrowser()
})
keepFailureEvidence('answer', () => ({ analyst, expert1, expert2 }))
afterAll(async () => {
  await analyst?.close()
  await expert1?.close()
  await expert2?.close()
})

describe('answering a round', () => {
  it('the analyst sets up and opens a round with the three methods; the experts have done the entry steps', async () => {
    await signInAs(analyst, 'analyst@kestrel.example')
    await analyst.page.waitForURL(/\/studies$/)
    setup = await createRound(analyst.page, { title: 'Answer screen: bursts, uptake and night flow' })
    for (const [s, email] of [[expert1, 'expert1@kestrel.example'], [expert2, 'expert2@kestrel.example']] as const) {
      await signInAs(s, email)
      await s.page.waitForURL(/\/studies$/)
      await completeEntry(s.page, setup.roundId)
    }
  })

  it('shows the round, the rail with statuses, the deadline and the first question', async () => {
    const { page } = expert1
    await page.goto(`${expert1.baseUrl}/answer/${setup.roundId}`)
    await page.getByTestId('answer-rail').waitFor()
    await expect(page.getByTestId('rail-item').count()).resolves.toBe(4)
    expect(await page.getByTestId('rail-item').evaluateAll((els) => els.map((e) => e.getAttribute('data-status')))).toEqual(['not-started', 'not-started', 'not-started', 'not-started'])
    expect(await page.getByTestId('deadline').innerText()).toMatch(/^Closes .+\(in (7|6) days\)$/s)
    expect(await page.getByTestId('quantity-question').innerText()).toContain('average number of bursts per 100 km per year')
    await page.getByTestId('entry-ready').waitFor()
    await page.getByTestId('declaration-done').waitFor()
  })

  it('quantile method: bounds first, then the median, then the quartiles; inline checks name the problem', async () => {
    const { page } = expert1
    for (const id of ['q-median', 'q-q1', 'q-q3']) await expect(page.getByTestId(id).count()).resolves.toBe(0)
    await expect(page.getByTestId('q-next').isDisabled()).resolves.toBe(true)
    await field(page, 'q-lower').fill('4')
    await field(page, 'q-upper').fill('3')
    await page.getByTestId('q-problem').first().waitFor()
    expect(await page.getByTestId('q-problem').first().innerText()).toBe('The upper bound must be above your lower bound (4)')
    await expect(page.getByTestId('q-next').isDisabled()).resolves.toBe(true)
    expect(await page.getByTestId('save-status').innerText()).toBe('Not saved: The upper bound must be above your lower bound (4)')
    await shot(expert1, 'answer-01-quantile-problem')

    await field(page, 'q-upper').fill('25')
    await expect(page.getByTestId('q-problem').count()).resolves.toBe(0)
    // The typed range sits on the number line as two named sliders; the middle value is not asked yet.
    const sliders = page.locator('[data-testid="answer-line"] [role="slider"]')
    await expect.poll(() => sliders.evaluateAll((els) => els.map((e) => [e.getAttribute('aria-label'), e.getAttribute('aria-valuenow')]))).toEqual([
      ['Lowest plausible value', '4'],
      ['Highest plausible value', '25'],
    ])
    await page.getByTestId('q-next').click()
    await field(page, 'q-median').fill('10')
    await expect(page.getByTestId('q-q1').count()).resolves.toBe(0)
    await expect(page.getByTestId('handle-q1').count()).resolves.toBe(0)
    expect(await page.getByTestId('q-statement').allInnerTexts()).toEqual([
      'You would be very surprised if it were below 4 bursts per 100 km per year or above 25 bursts per 100 km per year.',
      'You think it is as likely to be below 10 bursts per 100 km per year as above.',
    ])
    await waitSaved(page)
  })

  it('reloads mid-way and finds the draft, at the same step', async () => {
    const { page } = expert1
    await page.reload()
    await page.getByTestId('q-median').waitFor()
    await expect(field(page, 'q-lower').inputValue()).resolves.toBe('4')
    await expect(field(page, 'q-upper').inputValue()).resolves.toBe('25')
    await expect(field(page, 'q-median').inputValue()).resolves.toBe('10')
    await expect(page.getByTestId('q-q1').count()).resolves.toBe(0)
    expect(await rail(page, `q-${setup.burst}`).getAttribute('data-status')).toBe('in-progress')
  })

  it('shows the overconfidence note with the quartiles, and the live feedback once the answer is coherent', async () => {
    const { page } = expert1
    await page.getByTestId('q-next').click()
    await page.getByTestId('overconfidence-note').waitFor()
    expect(await page.getByTestId('overconfidence-note').innerText()).toContain('Would that surprise you? It should not surprise you much')
    await field(page, 'q-q1').fill('8')
    await expect(page.getByTestId('feedback-statement').count()).resolves.toBe(0)
    await field(page, 'q-q3').fill('13')
    await page.getByTestId('feedback-statement').first().waitFor()
    await page.getByTestId('feedback-chart').locator('canvas').waitFor()
    const before = await statements(page)
    expect(before).toHaveLength(3)
    expect(before[0]).toMatch(/^You are saying there is a 1 in 4 chance that the burst rate of old cast-iron mains is below [\d.]+ bursts per 100 km per year\.$/)
    expect(before[2]).toMatch(/1 in 10 chance that it is above [\d.]+ bursts per 100 km per year\.$/)
    expect(await page.getByTestId('fit-quality').innerText()).toBe('Close fit — the curve passes close to your values.')
    // Experts read the drawn shape in words, on the line's own axis; no list of families, error sums or ranking.
    await page.getByTestId('answer-line-curve').waitFor()
    expect(await page.getByTestId('answer-line-shape').innerText()).toBe('Shaded: the shape drawn through your values, stretched towards high values.')
    await expect(page.locator('[data-testid="family-option"]').count()).resolves.toBe(0)
    expect(await page.getByTestId('quantity-screen').innerText()).not.toMatch(/best fit|\bSSE\b|squared|lognormal|gamma/i)
    expect(await page.getByTestId('quantity-screen').innerText()).toMatch(/How you answer: a range, then a middle value/i)
    expect(await page.getByTestId('feedback-card').getAttribute('data-family')).toBe('lognormal')

    // A wider upper quartile, dragged on the line with the mouse, moves the field and the statements.
    await mouseDrag(page, 'q3', await screenX(page, 16, ['lower', 'upper']))
    await expect.poll(() => field(page, 'q-q3').inputValue()).toBe('16')
    expect(await page.getByTestId('handle-q3').getAttribute('aria-valuenow')).toBe('16')
    await statementChanged(page, 2, before)
    expect(await page.getByTestId('q-statement').allInnerTexts()).toContain('1 chance in 4 it is above 16 bursts per 100 km per year.')

    // The arrow keys move a handle by one step (0.5 on this line) and never past its neighbours.
    await page.getByTestId('handle-median').focus()
    await page.keyboard.press('ArrowRight')
    await page.keyboard.press('ArrowRight')
    await expect.poll(() => field(page, 'q-median').inputValue()).toBe('11')
    await page.keyboard.press('ArrowLeft')
    await page.keyboard.press('ArrowLeft')
    await expect.poll(() => field(page, 'q-median').inputValue()).toBe('10')
    // A drag far past the upper quarter stops just before it.
    await mouseDrag(page, 'median', (await handleCentre(page, 'upper')).x)
    await expect.poll(() => field(page, 'q-median').inputValue()).toBe('15.5')
    await field(page, 'q-median').fill('10')
    await expect.poll(() => page.getByTestId('handle-median').getAttribute('aria-valuenow')).toBe('10')
    await expect
      .poll(async () => {
        const saved = (await savedJudgements(page, setup.roundId)).find((j) => j.quantityId === setup.burst)!
        return (saved.answer.points as { value: number; prob: number }[]).map((p) => p.value)
      })
      .toEqual([8, 10, 16])
    await waitSaved(page)
  })

  it('shows what the server stored: the same best fit and implied median', async () => {
    const { page } = expert1
    const saved = (await savedJudgements(page, setup.roundId)).find((j) => j.quantityId === setup.burst)!
    expect(saved.answer).toEqual({ lower: 4, upper: 25, points: [{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 16, prob: 0.75 }] })
    expect(await page.getByTestId('feedback-card').getAttribute('data-family')).toBe(saved.fits[0].distribution.family)
    expect(await page.getByTestId('feedback-q50').innerText()).toBe(`${formatValue(quantile(saved.fits[0].distribution, 0.5))} bursts per 100 km per year`)
    expect(await page.getByTestId('feedback-q95').innerText()).toBe(`${formatValue(quantile(saved.fits[0].distribution, 0.95))} bursts per 100 km per year`)
  })

  it('keeps the family choice for the analyst, and writes the rationale', async () => {
    const { page } = expert1
    await field(page, 'rationale').fill('Burst logs 2015–2025 and the neighbouring boards’ reports for similar stock.')
    await waitSaved(page)
    await expect.poll(() => rail(page, `q-${setup.burst}`).getAttribute('data-status')).toBe('complete')
    const saved = (await savedJudgements(page, setup.roundId)).find((j) => j.quantityId === setup.burst)!
    expect(saved.chosenFamily).toBeNull()
    expect(saved.answer).toEqual({ lower: 4, upper: 25, points: [{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 16, prob: 0.75 }] })
    await shot(expert1, 'answer-02-quantile')
    await expectAccessible(expert1.page, '02-quantile')
  })

  it('keeps typed values when another window saved first (409), and reloads on request', async () => {
    const other = await expert1.context.newPage()
    await other.goto(`${expert1.baseUrl}/answer/${setup.roundId}?item=q-${setup.burst}`)
    await field(other, 'q-median').waitFor()
    await field(other, 'q-median').fill('11')
    await expect
      .poll(async () => {
        const saved = (await savedJudgements(other, setup.roundId)).find((j) => j.quantityId === setup.burst)!
        return (saved.answer.points as { value: number; prob: number }[]).find((p) => p.prob === 0.5)?.value
      })
      .toBe(11)
    await other.close()

    const { page } = expert1
    await field(page, 'q-median').fill('9')
    await page.getByTestId('conflict-reload').waitFor({ timeout: 10_000 })
    expect(await page.getByTestId('save-status').getAttribute('data-state')).toBe('conflict')
    await shot(expert1, 'answer-03-conflict')
    await page.getByTestId('conflict-reload').click()
    await page.getByTestId('conflict-typed').waitFor()
    expect(await page.getByTestId('conflict-typed').innerText()).toContain('Median (50 %): 9')
    await expect(field(page, 'q-median').inputValue()).resolves.toBe('11')
    await field(page, 'q-median').fill('10')
    await waitSaved(page)
  })

  it('fixed-interval method: a bar per interval, the remaining probability, feedback at 100 %', async () => {
    const { page } = expert1
    await rail(page, `q-${setup.uptake}`).click()
    await expect(page.getByTestId('interval-prob').count()).resolves.toBe(5)
    const prob = (i: number) => page.getByTestId('interval-prob').nth(i).locator('input')
    for (const [i, p] of ['10', '30', '30', '20'].entries()) await prob(i).fill(p)
    // The percentage fields line up in one column, whatever the length of each interval's label.
    const lefts = await page.getByTestId('interval-prob').locator('input').evaluateAll((els) => els.map((e) => Math.round(e.getBoundingClientRect().left)))
    expect(new Set(lefts).size).toBe(1)
    expect(await page.getByTestId('interval-remaining').innerText()).toBe('Remaining: 10 %')
    await expect(page.getByTestId('feedback-statement').count()).resolves.toBe(0)
    await waitSaved(page)

    await page.reload()
    await page.getByTestId('interval-prob').first().waitFor()
    await expect(prob(3).inputValue()).resolves.toBe('20')
    expect(await page.getByTestId('interval-remaining').innerText()).toBe('Remaining: 10 %')

    await prob(4).fill('20')
    await page.getByText('Over by 10 %: take some away').waitFor()
    expect(await page.getByTestId('save-status').innerText()).toMatch(/^Not saved: Your probabilities add up to 110\.0 %/)
    await prob(4).fill('10')
    expect(await page.getByTestId('interval-remaining').innerText()).toBe('All 100 % placed')
    await page.getByTestId('feedback-statement').first().waitFor()
    const before = await statements(page)
    // A share is written in per cent, as the percentages typed beside it.
    expect(before[0]).toMatch(/^You are saying there is a 1 in 4 chance that the leak-alert scheme uptake is below \d+(\.\d+)? % \(share of households\)\.$/)
    expect(await page.getByTestId('interval-prob').first().innerText()).toContain('0 % to under 10 %')
    // Numbers as people type them: a trailing % and the value understood shown back.
    await prob(0).fill('12,5 %')
    expect(await page.getByTestId('interval-understood').first().innerText()).toBe('Read as 12.5 %')
    await prob(0).fill('20')
    await prob(1).fill('20')
    await statementChanged(page, 0, before)
    await field(page, 'rationale').fill('The pilot survey of 120 households in two districts.')
    await waitSaved(page)
    await expect.poll(() => rail(page, `q-${setup.uptake}`).getAttribute('data-status')).toBe('complete')
    await shot(expert1, 'answer-04-fixed-interval')
    await expectAccessible(expert1.page, '04-fixed-interval')
  })

  it('chip grid: chips placed by clicking and by keyboard; the histogram and feedback follow', async () => {
    const { page } = expert1
    await rail(page, `q-${setup.flow}`).click()
    await expect(page.getByTestId('chip-bin').count()).resolves.toBe(8)
    expect(await page.getByTestId('chips-left').innerText()).toBe('Chips left: 20 of 20')
    const plan = [0, 1, 3, 5]
    for (const [i, n] of plan.entries()) for (let k = 0; k < n; k++) await page.getByTestId('chip-add').nth(i).click()
    expect(await page.getByTestId('chips-left').innerText()).toBe('Chips left: 11 of 20')
    await waitSaved(page)
    await page.reload()
    await page.getByTestId('chip-bin').first().waitFor()
    expect(await page.getByTestId('chip-bin').evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-count'))))).toEqual([0, 1, 3, 5, 0, 0, 0, 0])

    // Keyboard: focus the fifth bin, add with ↑ and +, move with →, take one back with ↓ (19 of 20 placed).
    await page.getByTestId('chip-bin').nth(4).focus()
    for (let k = 0; k < 5; k++) await page.keyboard.press('ArrowUp')
    await page.keyboard.press('ArrowRight')
    for (let k = 0; k < 3; k++) await page.keyboard.type('+')
    await page.keyboard.press('ArrowRight')
    for (let k = 0; k < 3; k++) await page.keyboard.press('ArrowUp')
    await page.keyboard.press('ArrowDown')
    expect(await page.getByTestId('chips-left').innerText()).toBe('Chips left: 1 of 20')
    await expect(page.getByTestId('feedback-statement').count()).resolves.toBe(0)
    await page.getByTestId('chip-add').nth(1).click()
    expect(await page.getByTestId('chip-bin').evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-count'))))).toEqual([0, 2, 3, 5, 5, 3, 2, 0])
    expect(await page.getByTestId('chips-left').innerText()).toBe('All 20 chips placed')
    await page.getByTestId('feedback-statement').first().waitFor()
    const before = await statements(page)
    expect(before[0]).toMatch(/below [\d.]+ L\/s per district\.$/)
    await page.getByTestId('chip-remove').nth(4).click()
    await page.getByTestId('chip-add').nth(6).click()
    await statementChanged(page, 2, before)
    await field(page, 'rationale').fill('The eight pilot districts measured in 2024–2025.')
    await waitSaved(page)
    const saved = (await savedJudgements(page, setup.roundId)).find((j) => j.quantityId === setup.flow)!
    expect(saved.answer).toMatchObject({ chips: [0, 2, 3, 5, 4, 3, 3, 0] })
    await shot(expert1, 'answer-05-chip-grid')
    await expectAccessible(expert1.page, '05-chip-grid')
  })

  it('a submit with items missing lists them on the rail and the review page', async () => {
    const { page } = expert1
    await page.getByTestId('review-open').click()
    await page.getByTestId('submit-round').click()
    await page.getByText('Some answers are not complete yet').waitFor()
    await expect(rail(page, 'calibration').innerText()).resolves.toContain('needs attention')
    expect(await page.getByTestId('review').innerText()).toContain('Calibration question 1: give your 5 %, 50 % and 95 % values')
    await shot(expert1, 'answer-06-review-missing')
    await expectAccessible(expert1.page, '06-review-missing')
  })

  it('calibration questions: 5 / 50 / 95 % per question, checked and saved', async () => {
    const { page } = expert1
    await rail(page, 'calibration').click()
    const questions = page.getByTestId('calibration-question')
    const n = await questions.count()
    expect(n).toBeGreaterThan(0)
    const q = (i: number) => questions.nth(i)
    await field(q(0), 'calibration-q05').fill('40')
    await field(q(0), 'calibration-q50').fill('30')
    await q(0).getByText('Your 50 % value must be above your 5 % value (40)').waitFor()
    for (let i = 0; i < n; i++) {
      await field(q(i), 'calibration-q05').fill(String(10 + i))
      await field(q(i), 'calibration-q50').fill(String(40 + i))
      await field(q(i), 'calibration-q95').fill(String(90 + i))
    }
    expect(await q(0).getAttribute('data-question-id')).toMatch(/^\d+$/)
    await waitSaved(page)
    await expect.poll(() => rail(page, 'calibration').getAttribute('data-status')).toBe('complete')
    await shot(expert1, 'answer-07-calibration')
    await expectAccessible(expert1.page, '07-calibration')
  })

  it('submits; everything is read-only under a Submitted banner', async () => {
    const { page } = expert1
    await page.getByTestId('review-open').click()
    await page.getByTestId('submit-round').click()
    await page.getByTestId('submitted-banner').waitFor()
    expect(await page.getByTestId('rail-item').evaluateAll((els) => els.map((e) => e.getAttribute('data-status')))).toEqual(['complete', 'complete', 'complete', 'complete'])
    await shot(expert1, 'answer-08-submitted')
    await expectAccessible(expert1.page, '08-submitted')
    await rail(page, `q-${setup.burst}`).click()
    await expect(field(page, 'q-lower').isDisabled()).resolves.toBe(true)
    await expect(field(page, 'rationale').isDisabled()).resolves.toBe(true)
    await page.reload()
    await page.getByTestId('submitted-banner').waitFor()
    expect((await savedJudgements(page, setup.roundId)).map((j) => j.status)).toEqual(['submitted', 'submitted', 'submitted'])
  })

  it('a second expert completes the quantile method with the keyboard alone', async () => {
    const { page } = expert2
    await page.goto(`${expert2.baseUrl}/answer/${setup.roundId}`)
    await page.getByTestId('answer-rail').waitFor()
    const focused = () => page.evaluate(() => document.activeElement?.id ?? '')
    let tabs = 0
    while ((await focused()) !== 'q-input-lower') {
      await page.keyboard.press('Tab')
      if (++tabs > 40) throw new Error('Tab never reached the lower bound')
    }
    await page.keyboard.type('3')
    await page.keyboard.press('Tab')
    await page.keyboard.type('30')
    await page.keyboard.press('Enter')
    expect(await focused()).toBe('q-input-median')
    await page.keyboard.type('11')
    await page.keyboard.press('Enter')
    expect(await focused()).toBe('q-input-q1')
    await page.keyboard.type('8')
    await page.keyboard.press('Tab')
    await page.keyboard.type('15')
    await page.getByTestId('feedback-statement').first().waitFor()
    await page.keyboard.press('Enter')
    expect(await focused()).toBe(`rationale-${setup.burst}`)
    await page.keyboard.type('Regional statistics for old cast iron and twenty years of repair records.')
    await waitSaved(page)
    expect(await rail(page, `q-${setup.burst}`).getAttribute('data-status')).toBe('complete')
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('item-next')
    await page.keyboard.press('Enter')
    await page.getByTestId('interval-prob').first().waitFor()
    await shot(expert2, 'answer-09-keyboard')
    const saved = (await savedJudgements(page, setup.roundId)).find((j) => j.quantityId === setup.burst)!
    expect(saved.answer).toEqual({ lower: 3, upper: 30, points: [{ value: 8, prob: 0.25 }, { value: 11, prob: 0.5 }, { value: 15, prob: 0.75 }] })
  })

  it('in a feedback round, shows the others’ round-1 distributions anonymised before the form', async () => {
    // Experts 2 and 3 finish round 1 through the API so that the panel has answers to show.
    for (const email of ['expert2@kestrel.example', 'expert3@kestrel.example']) {
      await inPage(
        analyst.page,
        async (call: Call, args: { email: string; password: string; setup: Setup }) => {
          await call('POST', '/api/auth/sign-out').catch(() => undefined)
          await call('POST', '/api/auth/sign-in', { email: args.email, password: args.password })
          const r = args.setup
          const mine = await call<{ quantityId: number; version: number }[]>('GET', `/api/rounds/${r.roundId}/judgements`)
          const v = (q: number) => mine.find((j) => j.quantityId === q)?.version ?? 0
          const why = 'Regional statistics and long experience with similar networks.'
          await call('PUT', `/api/rounds/${r.roundId}/judgements/${r.burst}`, {
            method: 'quantile', lower: 2, upper: 40, points: [{ value: 6, prob: 0.25 }, { value: 9, prob: 0.5 }, { value: 15, prob: 0.75 }], rationale: why, version: v(r.burst),
          })
          await call('PUT', `/api/rounds/${r.roundId}/judgements/${r.uptake}`, {
            method: 'fixed-interval', edges: [0, 0.1, 0.2, 0.3, 0.5, 1], probs: [0.2, 0.3, 0.3, 0.1, 0.1], rationale: why, version: v(r.uptake),
          })
          await call('PUT', `/api/rounds/${r.roundId}/judgements/${r.flow}`, {
            method: 'chip-grid', edges: [0, 1, 2, 3, 4, 5, 6, 7, 8], chips: [2, 4, 6, 4, 2, 1, 1, 0], rationale: why, version: v(r.flow),
          })
          const questions = await call<{ id: number }[]>('GET', `/api/studies/${r.studyId}/calibration-questions`)
          for (const q of questions) await call('PUT', `/api/rounds/${r.roundId}/calibration-answers/${q.id}`, { q05: 5, q50: 20, q95: 70, version: 0 })
          await call('POST', `/api/rounds/${r.roundId}/submit`)
        },
        { email, password: DEMO_PASSWORD, setup },
      )
    }
    // Feedback shows an earlier round once it has closed.
    await inPage(
      analyst.page,
      async (call: Call, args: { password: string; roundId: number }) => {
        await call('POST', '/api/auth/sign-out')
        await call('POST', '/api/auth/sign-in', { email: 'analyst@kestrel.example', password: args.password })
        await call('POST', `/api/rounds/${args.roundId}/close`)
      },
      { password: DEMO_PASSWORD, roundId: setup.roundId },
    )
    const round2 = await createRound(analyst.page, { title: 'Answer screen, round 2 with feedback', studyId: setup.studyId, feedback: true, onlyBurstRate: true })
    await completeEntry(expert1.page, round2.roundId)

    const { page } = expert1
    await page.goto(`${expert1.baseUrl}/answer/${round2.roundId}`)
    const panel = page.getByTestId('feedback-round-panel')
    await panel.waitFor()
    await panel.getByTestId('panel-combined-shape').waitFor()
    const rows = await page.getByTestId('feedback-round-row').allInnerTexts()
    // The others carry the study's own expert labels (the number depends on the study's order of experts).
    const labels = rows.map((r) => r.split('\t')[0].trim())
    expect(labels).toEqual(['You', expect.stringMatching(/^Expert \d+$/), expect.stringMatching(/^Expert \d+$/)])
    expect(new Set(labels).size).toBe(3)
    expect(await panel.innerText()).not.toContain('Helen')
    // The panel comes before the answer form.
    const order = await page.evaluate(() => {
      const a = document.querySelector('[data-testid="feedback-round-panel"]')!
      const b = document.querySelector('[data-testid="q-lower"]')!
      return a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING
    })
    expect(order).toBeTruthy()
    await shot(expert1, 'answer-10-feedback-round')
    await expectAccessible(page, 'feedback-round')
    // Strips, not curves: one row per expert under the same labels as the table, yours marked, the panel filled beneath.
    expect(await panel.locator('canvas').count()).toBe(0)
    const strips = panel.getByTestId('panel-row')
    expect(await strips.evaluateAll((els) => els.map((e) => [e.getAttribute('data-label'), e.getAttribute('data-mine')]))).toEqual([
      ['You', 'true'], [labels[1], null], [labels[2], null],
    ])
    expect(await panel.locator('.panel-ranges__label.is-mine').innerText()).toBe('You')
    // On a phone, the panel, its strips and its table fit the screen, every bar and notch inside its row.
    await page.setViewportSize({ width: 360, height: 740 })
    await expectPhoneLayout(page, 'feedback-round-360')
    await expectAccessible(page, 'feedback-round-360')
    await expectPanelInView(panel, 360, 3)
    await expert1.shot('answer-11-feedback-round-360')
    await page.setViewportSize({ width: 1280, height: 800 })
  })

  it('logged no console errors beyond the expected 401 / 400 / 409 answers, and loaded nothing from elsewhere', () => {
    for (const s of [analyst, expert1, expert2]) {
      expect(s.consoleErrors.filter((e) => !/status of (401|400|409)/.test(e))).toEqual([])
      expect(s.foreignRequests).toEqual([])
    }
  })
})
