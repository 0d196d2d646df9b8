import { mkdirSync } from 'node:fs'
import path from 'node:path'
import { chromium, type Browser, type BrowserContext, type Locator, type Page } from 'playwright-core'
import { afterEach, inject } from 'vitest'
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
 * the one the global setup serves (a suite that runs its own server and database); `viewport` sets the screen size
 * (1280 × 800 unless given).
 */
export async function openBrowser(opts: { baseUrl?: string; viewport?: { width: number; height: number } } = {}): Promise<BrowserSession> {
  // playwright-core gives each launch a new, empty profile of its own.
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
      '--disable-background-networking', '--disable-component-update', '--disable-sync',
    ],
  })
  const context = await browser.newContext({ viewport: opts.viewport ?? { width: 1280, height: 800 } })
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

/** The text field under a test id (the id sits on the form item around the input). */
export function field(scope: Page | Locator, testId: string): Locator {
  return scope.getByTestId(testId).locator('input, textarea').first()
}

export type Call = <T = unknown>(method: string, url: string, body?: unknown) => Promise<T>

/**
 * Runs `fn` in the page with a `call` helper for the API: the session's cookie, and a fresh CSRF token from
 * /api/auth/csrf for every write. The function travels as source text, so it may only use its arguments.
 */
export async function inPage<A, T>(page: Page, fn: (call: Call, args: A) => Promise<T>, args: A): Promise<T> {
  const call = async (method: string, url: string, body?: unknown) => {
    const headers: Record<string, string> = { accept: 'application/json' }
    if (method !== 'GET') headers['x-csrf-token'] = ((await (await fetch('/api/auth/csrf')).json()) as { token: string }).token
    if (body !== undefined) headers['content-type'] = 'application/json'
    const res = await fetch(url, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
    const text = await res.text()
    if (!res.ok) throw new Error(`${method} ${url} → ${res.status} ${text}`)
    return text ? JSON.parse(text) : undefined
  }
  return page.evaluate(`(${fn.toString()})(${call.toString()}, ${JSON.stringify(args)})`) as Promise<T>
}

/**
 * After a failed test, a screenshot of every browser (`<suite>-failed-<name>.png`) and their console errors, to see
 * what the pages showed. `browsers` is read when a test fails, so sessions opened in beforeAll are there.
 */
export function keepFailureEvidence(suite: string, browsers: () => Record<string, BrowserSession | undefined>): void {
  afterEach(async (ctx) => {
    if (ctx.task.result?.state !== 'fail') return
    for (const [name, session] of Object.entries(browsers())) {
      if (!session) continue
      await session.shot(`${suite}-failed-${name}`)
      if (session.consoleErrors.length) console.log(session.consoleErrors.join('\n'))
    }
  })
}

/** The signed-in expert's declaration and practice answer, through the API (the entry flow has its own test). */
export async function completeEntry(page: Page, roundId: number): Promise<void> {
  await inPage(
    page,
    async (call: Call, args: { roundId: number }) => {
      await call('PUT', `/api/rounds/${args.roundId}/declaration`, {
        expertise: 'Twenty years on the Kestrel Valley distribution network, keeping the burst records.', interests: 'none', interestsText: '', seenPilotData: false,
      })
      await call('POST', `/api/rounds/${args.roundId}/practice`, {
        points: [{ value: 1000, prob: 0.01 }, { value: 1300, prob: 0.25 }, { value: 1600, prob: 0.5 }, { value: 2000, prob: 0.75 }, { value: 2600, prob: 0.99 }],
      })
    },
    { roundId },
  )
}
