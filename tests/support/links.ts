import type { Locator, Page } from 'playwright-core'
import { expect } from 'vitest'

/** In the link dialog: picks a quantity of the round for the link's first ("if this one turned out high") or second field. */
export async function chooseLinkQuantity(page: Page, dialog: Locator, which: 'first' | 'second', name: string): Promise<void> {
  await dialog.getByTestId(`link-form-${which}`).locator('.el-select').click()
  await page.locator('.el-select-dropdown__item:visible').filter({ hasText: name }).click()
  // The list fades out: wait until it is gone, or the next field's pick could land on this list's options.
  await expect.poll(() => page.locator('.el-select-dropdown__item:visible').count()).toBe(0)
}

/** On the round screen on show: links two of its quantities through the link dialog and waits for the link in the list. */
export async function addLinkOnRoundScreen(page: Page, first: string, second: string): Promise<void> {
  await page.getByTestId('round-links').waitFor()
  const before = await page.getByTestId('round-link').count()
  await page.getByTestId('link-add').click()
  const dialog = page.getByRole('dialog', { name: 'Link two quantities' })
  await dialog.waitFor()
  await chooseLinkQuantity(page, dialog, 'first', first)
  await chooseLinkQuantity(page, dialog, 'second', second)
  await dialog.getByTestId('link-form-submit').click()
  await dialog.waitFor({ state: 'hidden' })
  await expect.poll(() => page.getByTestId('round-link').count()).toBe(before + 1)
}

/** On the expert's link screen on show: types the chance in per cent, leaves the field, and waits until the answer is saved. */
export async function answerLinkChance(page: Page, percent: number): Promise<void> {
  const screen = page.getByTestId('link-screen')
  const chance = screen.getByTestId('link-chance').locator('input')
  await chance.fill(String(percent))
  await chance.press('Tab')
  await expect.poll(() => chance.inputValue()).toBe(String(percent))
  await expect.poll(() => screen.getByTestId('save-status').getAttribute('data-state'), { timeout: 10_000 }).toBe('saved')
}
