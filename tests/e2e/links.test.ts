import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, signInAs, type BrowserSession, completeEntry, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'
import { expectPhoneLayout } from '../support/phone'
import { answerQuantile } from '../support/quantile-answer'
import { answerLinkChance, chooseLinkQuantity } from '../support/links'

/**
 * Quantities that move together, in chromium: the analyst links mains bursts and repair time on the round screen, an
 * expert on a 360 px phone answers both quantities and then the conditional question, reads what the chance means and
 * sees joint draws from their own answers, moves the chance with the keyboard, and submits; the analyst's progress
 * counts the answer without showing it.
 */

let analyst: BrowserSession
let expert: BrowserSession
let studyId: number
let roundId: number
const TAG = `links ${Date.now()}`

beforeAll(async () => {
  analyst = await openBrowser()
  await signInAs(analyst, 'analyst@kestrel.example')
  await analyst.page.waitForURL(/\/studies$/)
  ;({ studyId, roundId } = await inPage(analyst.page, async (call, { tag }) => {
    const study = await call<{ id: number }>('POST', '/api/studies', { title: `${tag}: bursts and repairs`, context: 'Whether a bad burst year also means slow repairs on the Kestrel Valley network.' })
    const ids: number[] = []
    for (const q of [
      { name: 'Mains burst rate', symbol: 'burst_rate', unit: 'bursts/100 km/yr', question: 'How many mains bursts per 100 km will the network see in 2026?' },
      { name: 'Repair time', symbol: 'repair_hours', unit: 'h', question: 'What will the median time to repair a mains burst be in 2026, in hours?' },
    ]) ids.push((await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, { ...q, support: { kind: 'positive' } })).id)
    const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
      title: 'Bursts and repairs', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
      askCalibration: false, items: ids.map((quantityId) => ({ quantityId, method: 'quantile' })),
    })
    await call('POST', `/api/rounds/${round.id}/invitations`, { email: 'expert2@kestrel.example', name: 'Expert 2' })
    return { studyId: study.id, roundId: round.id }
  }, { tag: TAG }))
})
keepFailureEvidence('links', () => ({ analyst, expert }))
afterAll(async () => {
  await analyst?.close()
  await expert?.close()
})

describe('a link between two quantities of a round', () => {
  it('the analyst links the two quantities on the round screen; the question reads the default wording', async () => {
    const { page } = analyst
    await page.goto(`${analyst.baseUrl}/studies/${studyId}/rounds/${roundId}`)
    await page.getByTestId('round-links').waitFor()
    await page.getByTestId('link-add').click()
    const dialog = page.getByRole('dialog', { name: 'Link two quantities' })
    await dialog.waitFor()
    await expect.poll(() => dialog.getByTestId('link-form-wording').textContent()).toContain(
      'Suppose mains burst rate turned out above your middle value. How likely is it that repair time is also above yours?')
    // The same quantity twice: the form says so beside the field and sends nothing.
    await chooseLinkQuantity(page, dialog, 'second', 'Mains burst rate')
    await dialog.getByTestId('link-form-submit').click()
    await expect.poll(() => dialog.getByTestId('link-form-second').textContent()).toContain('Choose two different quantities')
    await dialog.getByTestId('link-form-swap').click()
    await chooseLinkQuantity(page, dialog, 'first', 'Repair time')
    await dialog.getByTestId('link-form-swap').click()
    await expect.poll(() => dialog.getByTestId('link-form-second').textContent()).not.toContain('Choose two different quantities')
    await analyst.shot('links-01-dialog')
    await expectAccessible(page, 'link dialog')
    await dialog.getByTestId('link-form-submit').click()
    await dialog.waitFor({ state: 'hidden' })
    const item = page.getByTestId('round-link')
    await expect.poll(() => item.count()).toBe(1)
    expect(await item.innerText()).toContain('Mains burst rate → Repair time')
    expect(await item.innerText()).toContain('How likely is it that repair time is also above yours?')
    await analyst.shot('links-02-round')
    await expectAccessible(page, 'round screen with a link')
    await inPage(page, async (call, { id }) => call('POST', `/api/rounds/${id}/open`), { id: roundId })
  })

  it('an expert on a 360 px phone is asked once both quantities are answered, reads what the chance means, sees the scatter, and submits', async () => {
    expert = await openBrowser({ viewport: { width: 360, height: 740 } })
    const { page } = expert
    await signInAs(expert, 'expert2@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await completeEntry(page, roundId)
    await page.goto(`${expert.baseUrl}/answer/${roundId}`)
    await page.getByTestId('q-lower').waitFor()

    // Before the quantities are answered the question waits for them.
    await page.locator('[data-testid="rail-item"][data-key^="l-"]').click()
    await page.getByTestId('link-waiting').waitFor()
    expect(await page.getByTestId('link-waiting').innerText()).toContain('Answer both quantities first')
    await page.getByTestId('link-waiting').getByRole('button', { name: 'Answer Mains burst rate' }).click()

    await answerQuantile(page, [6, 30, 14, 10, 19], 'Burst logs 2015–2025 for the cast-iron mains of the valley.')
    await page.getByTestId('item-next').click()
    await answerQuantile(page, [2, 20, 6, 4, 9], 'Repair records of the two depots; winter queues lengthen repairs.')
    await page.getByTestId('item-next').click()

    const screen = page.getByTestId('link-screen')
    await screen.waitFor()
    expect(await page.getByTestId('link-question').innerText()).toBe(
      'Suppose mains burst rate turned out above your middle value. How likely is it that repair time is also above yours?')
    const chance = page.getByTestId('link-chance').locator('input')
    await answerLinkChance(page, 75)
    await expect.poll(() => page.getByTestId('link-meaning').innerText()).toContain(
      'In your view they tend to move together (strongly): when mains burst rate is high, repair time is more likely to be high too.')
    // The implied correlation is the secondary figure: sin(π/4) = 0.71.
    expect(await page.getByTestId('link-correlation').innerText()).toBe("Correlation this implies (for the analyst's model): 0.71")
    await page.getByTestId('link-scatter').locator('canvas').waitFor()
    expect(await page.getByTestId('link-scatter-caption').innerText()).toMatch(
      /^400 possible pairs of values drawn from your own answers for Mains burst rate \(across\) and Repair time \(up\), tied together as your chance says\. Among the pairs where Mains burst rate is above your middle value, \d+ % also have Repair time above yours\.$/)
    await expect.poll(async () => (await inPage(page, async (call, { id }) => call<{ probability: number | null }[]>('GET', `/api/rounds/${id}/link-answers`), { id: roundId }))[0]?.probability, { timeout: 10_000 }).toBe(0.75)
    await expert.shot('links-03-phone-link')
    await expectPhoneLayout(page, 'link question at 360 px')
    await expectAccessible(page, 'link question')

    // The keyboard moves the slider: one step right is one point more, and the words follow.
    await page.getByTestId('link-slider').getByRole('slider').focus()
    await page.keyboard.press('ArrowRight')
    await expect.poll(() => chance.inputValue()).toBe('76')
    await page.keyboard.press('Home')
    await expect.poll(() => chance.inputValue()).toBe('1')
    expect(await page.getByTestId('link-meaning').innerText()).toContain('when one is high the other tends to be low (very strongly)')
    for (let i = 0; i < 49; i++) await page.keyboard.press('ArrowRight')
    await expect.poll(() => page.getByTestId('link-meaning').innerText()).toContain('The two are unrelated in your view')
    expect(await page.getByTestId('link-correlation').innerText()).toBe("Correlation this implies (for the analyst's model): 0")
    await answerLinkChance(page, 70)
    await expect.poll(() => page.getByTestId('link-meaning').innerText()).toContain('(clearly)')

    await page.getByTestId('item-next').click()
    await page.getByTestId('review').waitFor()
    expect(await page.locator('[data-testid="review-item"]').allInnerTexts()).toHaveLength(3)
    await page.getByTestId('submit-round').click()
    await page.getByTestId('submitted-banner').waitFor()
    const saved = await inPage(page, async (call, { id }) => call<{ probability: number; status: string }[]>('GET', `/api/rounds/${id}/link-answers`), { id: roundId })
    expect(saved.map((a) => [a.probability, a.status])).toEqual([[0.7, 'submitted']])
    await expert.shot('links-04-submitted')
  })

  it('the analyst’s progress counts the answer per link, without its value', async () => {
    const { page } = analyst
    await page.goto(`${analyst.baseUrl}/studies/${studyId}/rounds/${roundId}`)
    const link = page.getByTestId('progress-link')
    await link.waitFor()
    expect(await link.innerText()).toBe('Mains burst rate → Repair time: 1 of 1 answered, 1 submitted')
    expect(await page.getByTestId('progress-links').innerText()).not.toContain('70')
  })
})
