import { mkdirSync } from 'node:fs'
import path from 'node:path'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { inject } from 'vitest'
import { DEMO_PASSWORD } from '../../seeds/demo'

const ARTIFACTS = path.resolve(import.meta.dirname, '../../artifacts/e2e')

export interface BrowserSession {
  browser: Browser
  context: BrowserContext
  page: Page
  baseUrl: string
  consoleErrors: string[]
  /** Requests to any origin other than the app's own (fonts, scripts or images from a CDN would show here). */
  foreignRequests: string[]
  shot(name: string): Promise<string>
  close(): Promise<void>
}

/**
 * Debian's chromium driven by playwright-core; never a downloaded browser. `baseUrl` points it at an app other than
 * the one the global setup serves (a suite that runs its own server and database).
 */
export async function openBrowser(opts: { baseUrl?: string } = {}): Promise<BrowserSession> {
  // playwright-core gives each launch a new, empty profile of its own.
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync',
    ],
  })
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } })
  const page = await context.newPage()
  const consoleErrors: string[] = []
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(msg.text())
  })
  const baseUrl = opts.baseUrl ?? inject('baseUrl')
  const foreignRequests: string[] = []
  page.on('request', (req) => {
    const url = req.url()
    if (!url.startsWith(baseUrl) && !url.startsWith('data:') && !url.startsWith('blob:')) foreignRequests.push(url)
  })
  mkdirSync(ARTIFACTS, { recursive: true })
  return {
    browser,
    context,
    page,
    baseUrl,
    consoleErrors,
    foreignRequests,
    async shot(name: string) {
      const file = path.join(ARTIFACTS, `${name}.png`)
      await page.screenshot({ path: file, fullPage: true })
      return file
    },
    async close() {
      await browser.close()
    },
  }
}

export async function signInAs(s: BrowserSession, email: string, password = DEMO_PASSWORD): Promise<void> {
  const { page } = s
  await page.goto(`${s.baseUrl}/sign-in`)
  await page.getByTestId('sign-in-email').locator('input').or(page.locator('input[data-testid="sign-in-email"]')).first().fill(email)
  await page.getByTestId('sign-in-password').locator('input').or(page.locator('input[data-testid="sign-in-password"]')).first().fill(password)
  await page.getByTestId('sign-in-submit').click()
}
