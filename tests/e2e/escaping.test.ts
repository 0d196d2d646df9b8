import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { inPage, keepFailureEvidence, openBrowser, signInAs, type BrowserSession } from '../support/browser'

/**
 * Text a user typed is shown as text on every screen that shows it: markup in a study title, a quantity's wording,
 * a round title or an expert's name never becomes an element, never runs a handler, never opens a dialog. Each
 * payload, if it were rendered as HTML, would set `window.__xss` or add an <img src="x">.
 */
const TITLE = 'Mains <img src="x" onerror="window.__xss=1"> renewal'
const CONTEXT = 'Board paper <script>window.__xss=2</script> of March'
const QUANTITY = 'Burst rate <svg onload="window.__xss=3"></svg> after relining'
const QUESTION = 'Bursts per 100 km a year? <a href="javascript:window.__xss=4">details</a>'
const ROUND = 'Spring round <b onmouseover="window.__xss=5">bold</b>'
const EXPERT = 'Dr <img src=x onerror=alert(1)> Rowe'

let s: BrowserSession
let studyId: number
let roundId: number
const dialogs: string[] = []

beforeAll(async () => {
  s = await openBrowser()
  s.page.on('dialog', (d) => {
    dialogs.push(d.message())
    void d.dismiss()
  })
  await signInAs(s, 'analyst@kestrel.example')
  await s.page.waitForURL(/\/studies$/)
  ;({ studyId, roundId } = await inPage(
    s.page,
    async (call, a: { title: string; context: string; quantity: string; question: string; round: string; expert: string }) => {
      const study = await call<{ id: number }>('POST', '/api/studies', { title: a.title, context: a.context })
      const q = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
        name: a.quantity, symbol: 'bursts', unit: 'per 100 km·yr', question: a.question, support: { kind: 'positive' },
      })
      const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
        title: a.round, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        items: [{ quantityId: q.id, method: 'quantile' }],
      })
      await call('POST', `/api/rounds/${round.id}/invitations`, { email: 'hostile.name@example.org', name: a.expert })
      return { studyId: study.id, roundId: round.id }
    },
    { title: TITLE, context: CONTEXT, quantity: QUANTITY, question: QUESTION, round: ROUND, expert: EXPERT },
  ))
})
keepFailureEvidence('escaping', () => ({ analyst: s }))
afterAll(async () => {
  await s?.close()
})

/** Opens `path`, waits for `shown` as text, and reports what markup from the payloads made it into the page. */
async function visit(path: string, shown: string) {
  await s.page.goto(`${s.baseUrl}${path}`)
  await s.page.getByText(shown, { exact: false }).first().waitFor()
  return s.page.evaluate(() => ({
    xss: (window as unknown as { __xss?: number }).__xss ?? null,
    injected: document.querySelectorAll('img[src="x"], svg[onload], a[href^="javascript:"], b[onmouseover], script:not([src])').length,
    text: document.body.innerText,
  }))
}

describe('user text shown as text', () => {
  const screens: [string, () => string, string[]][] = [
    ['the study list', () => '/studies', [TITLE]],
    ['the study overview', () => `/studies/${studyId}`, [TITLE, CONTEXT]],
    ['the quantities', () => `/studies/${studyId}/quantities`, [QUANTITY, QUESTION]],
    ['the rounds', () => `/studies/${studyId}/rounds`, [ROUND]],
    ['the round with its panel', () => `/studies/${studyId}/rounds/${roundId}`, [ROUND, EXPERT]],
    ['the audit trail', () => `/studies/${studyId}/audit`, [TITLE]],
  ]
  it.each(screens)('%s', async (_name, path, texts) => {
    const page = await visit(path(), texts[0])
    for (const t of texts) expect(page.text).toContain(t)
    expect(page.injected).toBe(0)
    expect(page.xss).toBeNull()
    expect(dialogs).toEqual([])
  })
})
