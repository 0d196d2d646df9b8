import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, signInAs, type BrowserSession, field, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'

/**
 * Shares of a whole in chromium, in the Kestrel Valley household-uptake scenario: the analyst groups three proportion
 * quantities of a new study into a composition on the quantities screen (inline errors first), reorders and saves it.
 */

const TAG = `joint-${Date.now() % 100000}`
const SHARES = [
  { name: 'Join the leak-alert scheme', symbol: 'p_alert' },
  { name: 'Ask for a smart meter only', symbol: 'p_meter' },
  { name: 'Decline both offers', symbol: 'p_decline' },
]

interface Setup {
  studyId: number
  quantityIds: number[]
}

let s: BrowserSession
let setup: Setup

beforeAll(async () => {
  s = await openBrowser()
})
keepFailureEvidence('compositions', () => ({ analyst: s }))
afterAll(async () => {
  await s?.close()
})

describe('compositions', () => {
  it('the analyst builds a three-share composition on the quantities screen, with inline errors first', async () => {
    const { page } = s
    await signInAs(s, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    setup = await inPage(page, async (call, { tag, shares }) => {
      const study = await call<{ id: number }>('POST', '/api/studies', { title: `${tag} household uptake`, context: 'How Kestrel Valley households would answer the leak-alert and smart-meter offer.' })
      const quantityIds: number[] = []
      for (const q of shares) {
        const made = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
          ...q, question: `Of the households in the Kestrel Valley pilot area offered the scheme, what share would answer: ${q.name.toLowerCase()}?`, support: { kind: 'proportion' },
        })
        quantityIds.push(made.id)
      }
      await call('POST', `/api/studies/${study.id}/quantities`, {
        name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'What will the mean reduction in night-time flow be after pressure management?', support: { kind: 'real' },
      })
      return { studyId: study.id, quantityIds }
    }, { tag: TAG, shares: SHARES })

    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/quantities`)
    await page.getByTestId('compositions-empty').waitFor()
    await page.getByTestId('composition-new').click()
    const dialog = page.getByRole('dialog', { name: 'New composition' })
    await dialog.waitFor()

    // Only the proportion quantities are offered as shares.
    await dialog.getByTestId('composition-form-add').click()
    const options = page.locator('.el-select-dropdown__item:visible')
    await expect(options.allTextContents()).resolves.toEqual(SHARES.map((q) => q.name))
    await options.filter({ hasText: SHARES[2].name }).click()

    // Nothing named, one share: the form says what is missing beside each field and sends nothing.
    await dialog.getByTestId('composition-form-submit').click()
    await expect.poll(() => dialog.getByTestId('composition-form-name').textContent()).toContain('Enter a name')
    await expect.poll(() => dialog.getByTestId('composition-form-shares').textContent()).toContain('Choose 2 to 10 quantities as shares')

    await field(dialog, 'composition-form-name').fill('Household uptake')
    await field(dialog, 'composition-form-wording').fill('How the pilot area’s households would answer the offer of the leak-alert scheme and smart meters.')
    for (const q of SHARES.slice(0, 2)) {
      await dialog.getByTestId('composition-form-add').click()
      await page.locator('.el-select-dropdown__item:visible').filter({ hasText: q.name }).click()
    }
    // "Decline both offers" was added first: move it to the end.
    await dialog.getByRole('button', { name: `Move ${SHARES[2].name} down` }).click()
    await dialog.getByRole('button', { name: `Move ${SHARES[2].name} down` }).click()
    await expect(dialog.getByTestId('composition-form-share-list').locator('li').allTextContents()).resolves.toEqual(SHARES.map((q) => q.name))
    await expect.poll(() => dialog.getByTestId('composition-form-shares').textContent()).not.toContain('Choose 2 to 10')
    await s.shot('compositions-01-dialog')
    await expectAccessible(page, 'composition dialog')
    await dialog.getByTestId('composition-form-submit').click()
    await dialog.waitFor({ state: 'hidden' })

    const card = page.getByTestId('composition-card')
    await expect(card.count()).resolves.toBe(1)
    await expect(card.getByTestId('composition-shares').locator('li').allTextContents()).resolves.toEqual(SHARES.map((q) => `${q.name} ${q.symbol}`))
    const saved = await inPage(page, async (call, { studyId }) => call<{ shares: { quantityId: number }[] }[]>('GET', `/api/studies/${studyId}/compositions`), { studyId: setup.studyId })
    expect(saved[0].shares.map((x) => x.quantityId)).toEqual(setup.quantityIds)
    await s.shot('compositions-02-saved')
  })
})
