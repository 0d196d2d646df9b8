import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { openBrowser, signInAs, type BrowserSession } from '../support/browser'
import { expectAccessible } from '../support/axe'

let s: BrowserSession
beforeAll(async () => {
  s = await openBrowser()
})
afterAll(async () => {
  await s?.close()
})

describe('sign-in and app shell in chromium', () => {
  it('shows the sign-in page to a visitor who opens /studies', async () => {
    await s.page.goto(`${s.baseUrl}/studies`)
    await s.page.waitForURL(/\/sign-in\?redirect=/)
    await expect(s.page.getByTestId('sign-in-submit').isVisible()).resolves.toBe(true)
    await s.shot('01-sign-in')
  })

  it('shows an error for a wrong password and stays on the sign-in page', async () => {
    await signInAs(s, 'analyst@kestrel.example', 'wrong-password')
    const error = s.page.getByTestId('sign-in-error')
    await error.waitFor()
    expect(await error.innerText()).toContain('E-mail or password is incorrect')
    expect(s.page.url()).toContain('/sign-in')
    await s.shot('02-sign-in-wrong-password')
  })

  it('signs the analyst in and lists the demo study read from the API', async () => {
    await signInAs(s, 'analyst@kestrel.example')
    await s.page.waitForURL(/\/studies$/)
    const list = s.page.getByTestId('study-list')
    await list.getByText(DEMO_STUDY_TITLE).waitFor()
    expect(await list.innerText()).toContain(DEMO_STUDY_TITLE)
    await s.shot('03-studies-analyst')
    await expectAccessible(s.page, 'analyst studies')
  })

  it('signs out and returns to the sign-in page; the session no longer works', async () => {
    await s.page.getByTestId('user-menu').click()
    await s.page.getByTestId('sign-out').click()
    await s.page.waitForURL(/\/sign-in/)
    const me = await s.page.evaluate(async () => (await fetch('/api/auth/me')).status)
    expect(me).toBe(401)
    await s.shot('04-signed-out')
  })

  it('tells an expert who opens /admin/users that it is not allowed', async () => {
    await signInAs(s, 'expert1@kestrel.example')
    await s.page.waitForURL(/\/studies$/)
    await s.page.goto(`${s.baseUrl}/admin/users`)
    await s.page.getByRole('heading', { name: 'Not allowed' }).waitFor()
    expect(s.page.url()).toContain('/not-allowed')
    await s.shot('05-expert-not-allowed')
  })

  it('shows a 404 page for an unknown address', async () => {
    await s.page.goto(`${s.baseUrl}/no/such/page`)
    await s.page.getByRole('heading', { name: 'Page not found' }).waitFor()
    await s.shot('06-not-found')
  })

  it('loaded no resource from another origin and logged no console errors', async () => {
    const errors = s.consoleErrors.filter((e) => !/status of 401/.test(e))
    expect(errors).toEqual([])
    expect(s.foreignRequests).toEqual([])
  })
})
