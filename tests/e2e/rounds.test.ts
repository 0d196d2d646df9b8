import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { openBrowser, signInAs, type BrowserSession, field, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'

/**
 * The round flow of issue 4 in chromium: the analyst frames a quantity, schedules a round with three
 * methods, adds a new expert by e-mail and opens the round; the admin finds the invitation in the
 * dev mailbox; the expert follows the link in a fresh browser, sets a password, completes the
 * declaration and the practice question and sees the feedback; the analyst sees the progress.
 */

const EXPERT = { name: 'Mara Lindqvist', email: 'mara.lindqvist@example.org', password: 'kestrel-valley-42' }
const QUANTITY = {
  name: 'Repair time of a burst main',
  symbol: 'repair_days',
  unit: 'days',
  question: 'How many days, on average, will it take from the report of a burst on an old cast-iron main until the main is back in service?',
}
const ROUND_TITLE = 'Round 1: bursts, uptake and repair time'

let analyst: BrowserSession
let admin: BrowserSession
let expert: BrowserSession
let studyId = 0
let roundId = 0
let inviteLink = ''

beforeAll(async () => {
  analyst = await openBrowser()
  admin = await openBrowser()
  expert = await openBrowser()
})
keepFailureEvidence('rounds', () => ({ analyst, admin, expert }))
afterAll(async () => {
  await analyst?.close()
  await admin?.close()
  await expert?.close()
})

describe('scheduling and opening a round, and an expert entering it', () => {
  it('the analyst frames a new quantity on the quantities page', async () => {
    const { page } = analyst
    await signInAs(analyst, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await page.getByTestId('study-list').getByText(DEMO_STUDY_TITLE).click()
    await page.waitForURL(/\/studies\/\d+$/)
    studyId = Number(/\/studies\/(\d+)/.exec(page.url())![1])

    await page.goto(`${analyst.baseUrl}/studies/${studyId}/quantities`)
    await page.getByTestId('quantity-new').click()
    await field(page, 'quantity-form-name').fill(QUANTITY.name)
    await field(page, 'quantity-form-symbol').fill(QUANTITY.symbol)
    await field(page, 'quantity-form-unit').fill(QUANTITY.unit)
    await field(page, 'quantity-form-question').fill(QUANTITY.question)
    await page.getByTestId('quantity-form-support').click()
    await page.getByRole('option', { name: /^Positive/ }).click()
    await page.getByTestId('quantity-form-submit').click()
    await page.getByTestId('quantity-list').getByText(QUANTITY.name).first().waitFor()
    await analyst.shot('rounds-01-quantity-created')
  })

  it('shows the rounds of the study from the study navigation', async () => {
    const { page } = analyst
    await page.getByTestId('nav-rounds').click()
    await page.waitForURL(new RegExp(`/studies/${studyId}/rounds$`))
    // Other browser suites may have scheduled rounds in the demo study already: an empty state or a list both count.
    await page.getByTestId('rounds-empty').or(page.getByTestId('rounds-table')).first().waitFor()
    expect(await page.getByTestId('nav-rounds').getAttribute('aria-current')).toBe('page')
    await analyst.shot('rounds-02-list')
    await expectAccessible(page, 'analyst rounds')
  })

  it('schedules a round: three quantities, three methods, edges checked inline', async () => {
    const { page } = analyst
    await page.getByTestId('rounds-new').click()
    await page.waitForURL(/\/rounds\/new$/)
    await field(page, 'round-form-title').waitFor()

    // An empty submit shows the schema's messages inline and sends nothing.
    await page.getByTestId('round-form-submit').click()
    await page.getByText('Enter a title').waitFor()
    await page.getByText('Choose at least one quantity').first().waitFor()

    await field(page, 'round-form-title').fill(ROUND_TITLE)
    await field(page, 'round-form-briefing').fill('Please read the evidence notes of each quantity before answering. Give your own judgement; do not confer.')

    // Closing time typed into the date picker.
    const closes = new Date(Date.now() + 21 * 24 * 3600 * 1000)
    const pad = (n: number) => String(n).padStart(2, '0')
    const closesText = `${closes.getFullYear()}-${pad(closes.getMonth() + 1)}-${pad(closes.getDate())} 17:00`
    const closesInput = field(page, 'round-form-closes')
    await closesInput.click()
    await closesInput.fill(closesText)
    await closesInput.press('Enter')
    await page.keyboard.press('Escape')
    expect(await closesInput.inputValue()).toBe(closesText)

    for (const symbol of ['burst_rate', 'alert_uptake', QUANTITY.symbol]) {
      await page.locator(`[data-testid="round-form-quantity"][data-quantity-symbol="${symbol}"]`).click()
    }
    const methods = page.getByTestId('round-form-method')
    await expect(methods.count()).resolves.toBe(3)

    // Second item (a proportion): fixed intervals, with a grid suggested from its support.
    await methods.nth(1).click()
    await page.getByRole('option', { name: 'Fixed-interval method' }).last().click()
    const uptake = page.locator('[data-testid="round-form-item"][data-quantity-symbol="alert_uptake"]')
    await expect(field(uptake, 'round-form-edges').inputValue()).resolves.toBe('0, 0.1, 0.2, 0.4, 0.6, 0.8, 1')

    // Third item (positive, no natural grid): chip grid; bad edges are caught as typed.
    await methods.nth(2).click()
    // The dropdown opened last is the last in the page (an earlier one may still be fading out).
    await page.getByRole('option', { name: 'Chip grid' }).last().click()
    const repair = page.locator(`[data-testid="round-form-item"][data-quantity-symbol="${QUANTITY.symbol}"]`)
    await field(repair, 'round-form-edges').fill('0, 5, 3')
    await field(repair, 'round-form-edges').blur()
    await repair.getByText('Interval edges must be strictly increasing').waitFor()
    await field(repair, 'round-form-edges').fill('0, 1, 2, 4, 7, 14, 28')
    await field(repair, 'round-form-edges').blur()
    await expect(repair.getByText('Interval edges must be strictly increasing').count()).resolves.toBe(0)
    await field(repair, 'round-form-chips').fill('25')
    await field(repair, 'round-form-chips').blur()
    await analyst.shot('rounds-03-form-filled')
    await expectAccessible(page, 'analyst round form')

    await page.getByTestId('round-form-submit').click()
    await page.waitForURL(new RegExp(`/studies/${studyId}/rounds/\\d+$`))
    roundId = Number(/\/rounds\/(\d+)$/.exec(page.url())![1])
    await expect(page.getByTestId('round-status').getAttribute('data-status')).resolves.toBe('draft')
    const items = await page.getByTestId('round-items').innerText()
    expect(items).toContain('Fixed-interval method')
    expect(items).toContain('25 chips; edges 0, 1, 2, 4, 7, 14, 28')
    expect(await page.getByTestId('round-window').innerText()).toContain('17:00')
  })

  it('adds a new expert by e-mail to the draft round and opens it', async () => {
    const { page } = analyst
    await field(page, 'panel-name').fill(EXPERT.name)
    await field(page, 'panel-email').fill(EXPERT.email)
    await page.getByTestId('panel-add').click()
    const row = page.locator(`[data-testid="panel-row"][data-email="${EXPERT.email}"]`)
    await row.waitFor()
    // The team sees the study-wide label the expert will carry on every screen and in the record beside the name.
    await expect(row.getByTestId('panel-member-label').innerText()).resolves.toMatch(/^Expert \d+$/)
    await expect(page.locator('[data-testid="panel-state"]').first().getAttribute('data-state')).resolves.toBe('pending')
    await page.locator(`[data-testid="progress-row"][data-email="${EXPERT.email}"]`).waitFor()
    await analyst.shot('rounds-04-draft-with-panel')

    await page.getByTestId('round-open').click()
    await page.getByText('This sends the invitations now').waitFor()
    await analyst.shot('rounds-05-open-confirm')
    await page.getByRole('button', { name: 'Open and send invitations' }).click()
    await page.locator('[data-testid="round-status"][data-status="open"]').waitFor()
    await page.locator('[data-testid="panel-state"][data-state="invited"]').waitFor()
    await page.getByTestId('progress-grid').waitFor()
    await analyst.shot('rounds-06-open')
    await expectAccessible(page, 'analyst round')
  })

  it('the admin finds the invitation in the dev mailbox', async () => {
    const { page } = admin
    await signInAs(admin, 'admin@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await page.getByTestId('nav-mailbox').click()
    await page.waitForURL(/\/dev\/mailbox$/)
    const item = page.locator(`[data-testid="mailbox-item"][data-to*="${EXPERT.email}"]`).first()
    // The outbox sends in the background: refresh until the message has arrived.
    const deadline = Date.now() + 30_000
    while (!(await item.isVisible())) {
      if (Date.now() > deadline) throw new Error('the invitation did not arrive in the mailbox')
      await page.waitForTimeout(500)
      await page.getByTestId('mailbox-refresh').click()
    }
    await item.click()
    const link = page.getByTestId('mailbox-body').locator('a[href*="/invite/"]').first()
    await link.waitFor()
    inviteLink = (await link.getAttribute('href'))!
    expect(inviteLink).toMatch(new RegExp(`^${admin.baseUrl}/invite/[A-Za-z0-9_-]{20,}$`))
    await admin.shot('rounds-07-mailbox-invitation')
  })

  it('the expert follows the link in a fresh browser and creates the account', async () => {
    const { page } = expert
    await page.goto(inviteLink)
    await page.locator('[data-testid="invite-state"][data-state="valid"]').waitFor()
    expect(await page.getByTestId('invite-round').innerText()).toBe(ROUND_TITLE)
    await expect(field(page, 'invite-name').inputValue()).resolves.toBe(EXPERT.name)

    await field(page, 'invite-password').fill(EXPERT.password)
    await field(page, 'invite-password-confirm').fill('something-else-1')
    await page.getByTestId('invite-submit').click()
    await page.getByText('The two passwords are not the same').waitFor()
    await field(page, 'invite-password-confirm').fill(EXPERT.password)
    await expert.shot('rounds-08-invitation')

    await page.getByTestId('invite-submit').click()
    await page.waitForURL(new RegExp(`/answer/${roundId}$`))
    await page.getByTestId('answer-page').waitFor()
    expect(await page.getByTestId('answer-title').innerText()).toBe(ROUND_TITLE)
    expect(await page.getByTestId('user-name').innerText()).toBe(EXPERT.name)
    await expect(page.getByTestId('answer-quantity').count()).resolves.toBe(3)
    await page.getByTestId('stage-declaration').waitFor()
    await expert.shot('rounds-09-answer-first-entry')
  })

  it('the expert completes the declaration', async () => {
    const { page } = expert
    await field(page, 'declaration-expertise').fill('Twenty years as a distribution network engineer at a regional water utility, responsible for burst records.')
    await page.getByTestId('declaration-interests-described').click()
    await field(page, 'declaration-interests-text').waitFor()
    await page.getByTestId('declaration-submit').click()
    // The refusal under the field (its label reads the same words, so the alert is found by its role).
    const refusal = page.getByTestId('declaration-interests-text').getByRole('alert')
    await refusal.waitFor()
    expect(await refusal.innerText()).toBe('Describe your interests')
    await page.getByTestId('declaration-interests-none').click()
    await page.getByTestId('declaration-seen-no').click()
    await expert.shot('rounds-10-declaration')
    await page.getByTestId('declaration-submit').click()
    await page.getByTestId('stage-practice').waitFor()
    await page.getByTestId('declaration-done').waitFor()
  })

  it('the expert answers the practice question step by step and sees the feedback', async () => {
    const { page } = expert
    await field(page, 'practice-lower').fill('1000')
    await page.getByTestId('practice-next').click()
    await field(page, 'practice-upper').fill('900')
    await page.getByTestId('practice-next').click()
    await page.getByText('The upper bound must be larger than your lower bound (1000)').waitFor()
    await expert.shot('rounds-11-practice-check')
    await field(page, 'practice-upper').fill('2600')
    await page.getByTestId('practice-next').click()
    await field(page, 'practice-median').fill('1600')
    await page.getByTestId('practice-next').click()
    await field(page, 'practice-q1').fill('1300')
    await page.getByTestId('practice-next').click()
    await field(page, 'practice-q3').fill('2000')
    await page.getByTestId('practice-submit').click()

    const feedback = page.getByTestId('practice-feedback')
    await feedback.waitFor()
    const text = await feedback.innerText()
    expect(text).toContain('You gave a 1 in 2 chance that the answer lies between 1,300 km and 2,000 km')
    expect(text).toContain('The true answer is 1,840 km')
    expect(text).toContain('It fell in the middle half of your range, between 1,300 km and 2,000 km.')
    expect(text).toMatch(/By your answers, there was a \d+ % chance of a value this high or higher\./)
    expect(text).not.toMatch(/\b(5|95) %/)
    await page.getByTestId('entry-ready').waitFor()
    expect(await page.getByTestId('entry-ready').innerText()).toContain('The answer forms for this round open here')
    await expert.shot('rounds-12-practice-feedback')
  })

  it('shows the declaration and practice as done when the expert comes back', async () => {
    const { page } = expert
    await page.goto(`${expert.baseUrl}/studies`)
    const mine = page.locator('[data-testid="my-round-link"]', { hasText: ROUND_TITLE })
    await mine.waitFor()
    await expert.shot('rounds-13-my-rounds')
    await mine.click()
    await page.waitForURL(new RegExp(`/answer/${roundId}$`))
    await page.getByTestId('declaration-done').waitFor()
    await page.getByTestId('practice-done').waitFor()
    await page.getByTestId('entry-ready').waitFor()
    await expert.shot('rounds-14-answer-return')
  })

  it('the analyst sees who opened the round, extends it and closes it', async () => {
    const { page } = analyst
    await page.reload()
    const row = page.locator(`[data-testid="progress-row"][data-email="${EXPERT.email}"]`)
    await row.waitFor()
    await expect(row.locator('td').first().innerText()).resolves.not.toBe('Not yet')
    await page.locator('[data-testid="panel-state"][data-state="accepted"]').waitFor()
    await analyst.shot('rounds-15-progress')

    await page.getByTestId('round-extend').click()
    await page.getByTestId('round-extend-submit').click()
    await page.getByText('The round now closes').waitFor()

    await page.getByTestId('round-close').click()
    await page.getByRole('button', { name: 'Close now' }).last().click()
    await page.locator('[data-testid="round-status"][data-status="closed"]').waitFor()
    await analyst.shot('rounds-16-closed')

    await page.getByText('← All rounds').click()
    const link = page.locator('[data-testid="round-link"]', { hasText: ROUND_TITLE })
    await link.waitFor()
    expect(await page.getByTestId('rounds-table').innerText()).toContain('0 / 1')
    await analyst.shot('rounds-17-list')
  })

  it('logged no console errors beyond the anonymous session check, and loaded nothing from elsewhere', () => {
    for (const s of [analyst, admin, expert]) {
      expect(s.consoleErrors.filter((e) => !/status of 401/.test(e))).toEqual([])
      expect(s.foreignRequests).toEqual([])
    }
  })
})
