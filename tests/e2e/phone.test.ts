import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { openBrowser, signInAs, field, inPage, type BrowserSession, type Call, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'
import { copyDemoStudy } from '../support/demo-copy'
import { expectPhoneLayout, PHONES } from '../support/phone'
import { screenX, touchDrag } from '../support/answer-line'

/**
 * The expert's pages on phones (360 × 740 and 390 × 844): one expert per screen size walks a round from the sign-in
 * to the review — the declaration, the practice question and its feedback, the quantile method with its feedback,
 * fixed intervals, a chip grid of ten unequal bins, the calibration questions and the review. On every screen the
 * page is no wider than the phone, every button lies inside the screen and is at least 44 × 44 px, and axe-core
 * finds no serious or critical violation.
 */

/** Ten bins of unequal width, as an analyst would set for a skewed quantity (L/s per district). */
const CHIP_EDGES = [0, 1, 2, 3, 5, 7, 10, 14, 21, 30, 60]

interface Setup {
  roundId: number
}

async function createRound(page: Page): Promise<Setup> {
  return inPage(
    page,
    async (call: Call, args: { studyId: number; edges: number[] }): Promise<Setup> => {
      const study = { id: args.studyId }
      const quantities = await call<{ id: number; symbol: string }[]>('GET', `/api/studies/${study.id}/quantities`)
      const id = (symbol: string) => quantities.find((q) => q.symbol === symbol)!.id
      const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
        title: 'Phone round: bursts, uptake and night flow',
        briefing: 'Read the evidence notes of each quantity before answering. Give your own judgement; do not confer.',
        opensAt: new Date(Date.now() - 3600e3).toISOString(),
        closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        calibrationPosition: 'after',
        askCalibration: true,
        feedbackEnabled: false,
        items: [
          { quantityId: id('burst_rate'), method: 'quantile', askTails: true },
          { quantityId: id('alert_uptake'), method: 'fixed-interval', edges: [0, 0.1, 0.2, 0.3, 0.5, 1] },
          { quantityId: id('night_flow_cut'), method: 'chip-grid', edges: args.edges, chips: 20 },
        ],
      })
      for (const n of [1, 2]) await call('POST', `/api/rounds/${round.id}/invitations`, { email: `expert${n}@kestrel.example`, name: `Expert ${n}` })
      await call('POST', `/api/rounds/${round.id}/open`)
      return { roundId: round.id }
    },
    // A copy of the demo study: its calibration questions are asked whatever other suites answered on the demo study.
    { studyId: await copyDemoStudy(page, 'Phone round study'), edges: CHIP_EDGES },
  )
}

let analyst: BrowserSession
let setup: Setup
const experts: Record<string, BrowserSession> = {}

beforeAll(async () => {
  analyst = await openBrowser()
  await signInAs(analyst, 'analyst@kestrel.example')
  await analyst.page.waitForURL(/\/studies$/)
  setup = await createRound(analyst.page)
})
keepFailureEvidence('phone', () => ({ analyst, ...experts }))
afterAll(async () => {
  await analyst?.close()
  for (const s of Object.values(experts)) await s.close()
})

const ARTIFACTS = path.resolve(import.meta.dirname, '../../artifacts/e2e')

/** The page fits the phone and passes axe; screenshots of the screen as the expert sees it and of the whole page. */
async function check(s: BrowserSession, screen: string): Promise<void> {
  // The pointer rests where the last tap was; move it off the page so that no hover colour is judged.
  await s.page.mouse.move(0, 0)
  await s.page.screenshot({ path: `${ARTIFACTS}/phone-${screen}-screen.png` })
  await s.page.evaluate(() => window.scrollTo(0, 0))
  await s.shot(`phone-${screen}`)
  await expectPhoneLayout(s.page, screen)
  await expectAccessible(s.page, screen)
}

/**
 * The chip grid's drawing is a histogram to scale: each column's drawn width, in px, is proportional to its bin's
 * width, and the height of its chips to chips per unit width (the axis says so).
 */
async function expectDrawnToScale(page: Page, counts: number[]): Promise<void> {
  const columns = await page.getByTestId('chip-column').evaluateAll((els) =>
    els.map((el) => ({
      lo: Number(el.getAttribute('data-lo')),
      hi: Number(el.getAttribute('data-hi')),
      width: el.getBoundingClientRect().width,
      chips: [...el.querySelectorAll('.chips__chip')].reduce((h, c) => h + c.getBoundingClientRect().height, 0),
    })),
  )
  expect(columns.map((c) => c.lo)).toEqual(CHIP_EDGES.slice(0, -1))
  expect(columns.map((c) => c.hi)).toEqual(CHIP_EDGES.slice(1))
  // px per unit of the quantity, the same for every column: [30, 60] is drawn 30 times as wide as [0, 1).
  const pxPerUnit = columns.map((c) => c.width / (c.hi - c.lo))
  for (const r of pxPerUnit) expect(r).toBeCloseTo(pxPerUnit[0], 1)
  expect(columns[9].width / columns[0].width).toBeCloseTo(30, 0)
  // Height per (chips per unit), the same for every column with chips.
  const pxPerDensity = columns.map((c, i) => (counts[i] ? c.chips / (counts[i] / (c.hi - c.lo)) : null)).filter((x): x is number => x !== null)
  for (const r of pxPerDensity) expect(Math.abs(r - pxPerDensity[0])).toBeLessThan(0.02 * pxPerDensity[0])
  expect(await page.getByTestId('chip-axis').innerText()).toBe('Height: chips per 1 L/s per district')
}

describe.each(PHONES.map((p, i) => ({ ...p, email: `expert${i + 1}@kestrel.example` })))('an expert on a $name phone', (phone) => {
  let s: BrowserSession
  const at = (name: string) => `${phone.name}-${name}`

  it('signs in and sees the studies and rounds', async () => {
    s = await openBrowser({ viewport: { width: phone.width, height: phone.height } })
    experts[phone.name] = s
    await s.page.goto(`${s.baseUrl}/sign-in`)
    await s.page.getByTestId('sign-in-submit').waitFor()
    await check(s, at('01-sign-in'))
    await signInAs(s, phone.email)
    await s.page.waitForURL(/\/studies$/)
    await s.page.getByText('Phone round: bursts, uptake and night flow').first().waitFor()
    await check(s, at('02-studies'))
  })

  it('the declaration', async () => {
    const { page } = s
    await page.goto(`${s.baseUrl}/answer/${setup.roundId}`)
    await page.getByTestId('stage-declaration').waitFor()
    await check(s, at('03-declaration'))
    await field(page, 'declaration-expertise').fill('Twenty years on the Kestrel Valley distribution network, keeping the burst records.')
    await page.getByTestId('declaration-interests-none').click()
    await page.getByTestId('declaration-seen-no').click()
    await page.getByTestId('declaration-submit').click()
    await page.getByTestId('stage-practice').waitFor()
  })

  it('the practice question and its feedback', async () => {
    const { page } = s
    await check(s, at('04-practice'))
    for (const [id, value] of [['practice-lower', '1000'], ['practice-upper', '2600'], ['practice-median', '1600'], ['practice-q1', '1300']]) {
      await field(page, id).fill(value)
      await page.getByTestId('practice-next').click()
    }
    await field(page, 'practice-q3').fill('2000')
    await check(s, at('05-practice-last-step'))
    await page.getByTestId('practice-submit').click()
    await page.getByTestId('practice-feedback').waitFor()
    await page.getByTestId('practice-feedback').locator('svg').first().waitFor()
    await check(s, at('06-practice-feedback'))
  })

  it('the quantile method, with the feedback near the fields', async () => {
    const { page } = s
    await page.getByTestId('start-answering').click()
    await page.getByTestId('q-lower').waitFor()
    await check(s, at('07-quantile-start'))
    await field(page, 'q-lower').fill('4')
    await field(page, 'q-upper').fill('30')
    await page.getByTestId('q-next').click()
    await field(page, 'q-median').fill('11')
    await page.getByTestId('q-next').click()
    await field(page, 'q-q1').fill('8')
    await field(page, 'q-q3').fill('15')
    await page.getByTestId('q-next').click()
    await field(page, 'q-p05').fill('6')
    await field(page, 'q-p95').fill('22')
    await expect.poll(() => page.getByTestId('feedback-card').getAttribute('data-ready')).toBe('true')
    // The middle value dragged with a finger on the number line: the field follows, and the server stores it.
    // Centred on the screen, clear of the feedback docked at the bottom.
    await page.getByTestId('handle-median').evaluate((el) => el.scrollIntoView({ block: 'center' }))
    await touchDrag(page, 'median', await screenX(page, 12, ['lower', 'upper']))
    await expect.poll(async () => Number(await field(page, 'q-median').inputValue())).toBeGreaterThanOrEqual(11.5)
    const dragged = Number(await field(page, 'q-median').inputValue())
    expect(dragged).toBeLessThanOrEqual(12.5)
    expect(await page.getByTestId('handle-median').getAttribute('aria-valuenow')).toBe(String(dragged))
    type Saved = { answer: { points?: { value: number; prob: number }[] } }[]
    const savedMedians = async () => {
      const saved = await inPage(page, (call: Call, args: { roundId: number }) => call<Saved>('GET', `/api/rounds/${args.roundId}/judgements`), { roundId: setup.roundId })
      return saved.flatMap((j) => j.answer.points ?? []).filter((p) => p.prob === 0.5).map((p) => p.value)
    }
    await expect.poll(savedMedians, { timeout: 10_000 }).toContain(dragged)
    await check(s, at('07b-quantile-line-touch'))
    // The summary of the fit sits on screen together with the field just typed in, without scrolling.
    await field(page, 'q-p95').scrollIntoViewIfNeeded()
    const onScreen = await page.evaluate(() => {
      const inView = (el: Element | null) => {
        const r = el?.getBoundingClientRect()
        return !!r && r.height > 0 && r.top >= 0 && r.bottom <= window.innerHeight
      }
      return { field: inView(document.querySelector('#q-input-p95')), summary: inView(document.querySelector('[data-testid="feedback-summary"]')) }
    })
    expect(onScreen).toEqual({ field: true, summary: true })
    expect(await page.getByTestId('feedback-summary').innerText()).toMatch(/^Median [\d.]+ bursts per 100 km per year · 90 % between [\d.]+ and [\d.]+$/)
    await check(s, at('08-quantile-feedback'))
    await page.getByTestId('feedback-toggle').click()
    await page.getByTestId('feedback-chart').locator('canvas').waitFor()
    await check(s, at('08b-quantile-feedback-open'))
    await page.getByTestId('feedback-toggle').click()
    await field(page, 'rationale').fill('Burst logs 2015–2025 and the neighbouring boards’ reports for similar stock.')
  })

  it('fixed intervals', async () => {
    const { page } = s
    await page.getByTestId('item-next').click()
    await page.getByTestId('interval-prob').first().waitFor()
    for (const [i, p] of ['10', '30', '30', '20', '10'].entries()) await page.getByTestId('interval-prob').nth(i).locator('input').fill(p)
    await expect.poll(() => page.getByTestId('feedback-card').getAttribute('data-ready')).toBe('true')
    await check(s, at('09-fixed-interval'))
  })

  it('a chip grid of ten unequal bins, by touch', async () => {
    const { page } = s
    await page.getByTestId('item-next').click()
    await expect(page.getByTestId('chip-bin').count()).resolves.toBe(10)
    const plan = [1, 2, 3, 4, 4, 3, 2, 1, 0, 0]
    for (const [i, n] of plan.entries()) for (let k = 0; k < n; k++) await page.getByTestId('chip-add').nth(i).click()
    expect(await page.getByTestId('chips-left').innerText()).toBe('All 20 chips placed')
    await expect.poll(() => page.getByTestId('feedback-card').getAttribute('data-ready')).toBe('true')
    await page.getByTestId('chip-curve').waitFor()
    await check(s, at('10-chip-grid'))
    await expectDrawnToScale(page, plan)
  })

  it('the same chip grid on a desktop screen, still drawn to scale', async () => {
    const { page } = s
    await page.setViewportSize({ width: 1280, height: 800 })
    await expectDrawnToScale(page, [1, 2, 3, 4, 4, 3, 2, 1, 0, 0])
    await s.shot(`phone-${at('10b-chip-grid-desktop')}`)
    await page.setViewportSize({ width: phone.width, height: phone.height })
  })

  it('the calibration questions and the review', async () => {
    const { page } = s
    await page.getByTestId('item-next').click()
    await page.getByTestId('calibration-question').first().waitFor()
    await check(s, at('11-calibration'))
    await page.getByTestId('item-next').click()
    await page.getByTestId('review').waitFor()
    await check(s, at('12-review'))
  })
})
