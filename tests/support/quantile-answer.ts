import type { Page } from 'playwright-core'
import { expect } from 'vitest'
import { field } from './browser'

/** Fills the quantile steps of the item on show (plausible range, middle value, quartiles), waits for the fit, and gives the rationale. */
export async function answerQuantile(page: Page, [lower, upper, median, q1, q3]: number[], rationale: string): Promise<void> {
  await field(page, 'q-lower').fill(String(lower))
  await field(page, 'q-upper').fill(String(upper))
  await page.getByTestId('q-next').click()
  await field(page, 'q-median').fill(String(median))
  await page.getByTestId('q-next').click()
  await field(page, 'q-q1').fill(String(q1))
  await field(page, 'q-q3').fill(String(q3))
  await expect.poll(() => page.getByTestId('feedback-card').getAttribute('data-ready')).toBe('true')
  await field(page, 'rationale').fill(rationale)
}
