import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, signInAs, type BrowserSession, completeEntry, inPage, type Call, keepFailureEvidence } from '../support/browser'

/**
 * Less asking twice, in chromium: an expert who gave the declaration, the practice question and the calibration
 * questions in round 1 of a study opens round 2 of the same study. The declaration and the practice come back as
 * done with "Is this still true?"; confirming them leads straight to the answers, where the calibration question
 * answered in round 1 is not asked again.
 */

interface Setup {
  studyId: number
  quantityId: number
  questionId: number
}

let analyst: BrowserSession
let expert: BrowserSession
let setup: Setup

/** The analyst opens a round of the test study for expert 3 and returns its id. */
async function openRound(title: string): Promise<number> {
  return inPage(
    analyst.page,
    async (call: Call, args: { setup: Setup; title: string }) => {
      const round = await call<{ id: number }>('POST', `/api/studies/${args.setup.studyId}/rounds`, {
        title: args.title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        items: [{ quantityId: args.setup.quantityId, method: 'quantile' }], askCalibration: true,
      })
      await call('POST', `/api/rounds/${round.id}/invitations`, { email: 'expert3@kestrel.example', name: 'Expert 3' })
      await call('POST', `/api/rounds/${round.id}/open`)
      return round.id
    },
    { setup, title },
  )
}

beforeAll(async () => {
  analyst = await openBrowser()
  expert = await openBrowser()
})
keepFailureEvidence('second-round', () => ({ analyst, expert }))
afterAll(async () => {
  await analyst?.close()
  await expert?.close()
})

describe('a second round of the same study', () => {
  it('round 1: the expert declares, practises and answers the calibration question', async () => {
    await signInAs(analyst, 'analyst@kestrel.example')
    await analyst.page.waitForURL(/\/studies$/)
    setup = await inPage(
      analyst.page,
      async (call: Call): Promise<Setup> => {
        const study = await call<{ id: number }>('POST', '/api/studies', { title: `Two rounds of burst rates ${Date.now()}`, context: 'Asked twice, a month apart.' })
        const quantity = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
          name: 'Burst rate of old cast-iron mains', symbol: 'burst_rate', unit: 'bursts per 100 km per year', support: { kind: 'positive' },
          question: 'Over 2027–2031, how many bursts per 100 km per year on the Board’s cast-iron mains laid before 1960?',
        })
        const question = await call<{ id: number }>('POST', `/api/studies/${study.id}/calibration-questions`, { question: 'How many km of mains did the Board renew in 2024?', unit: 'km', trueValue: 12 })
        return { studyId: study.id, quantityId: quantity.id, questionId: question.id }
      },
      undefined,
    )
    const first = await openRound('Round 1 of two')
    await signInAs(expert, 'expert3@kestrel.example')
    await expert.page.waitForURL(/\/studies$/)
    await completeEntry(expert.page, first)
    await inPage(
      expert.page,
      (call: Call, args: { round: number; question: number }) => call('PUT', `/api/rounds/${args.round}/calibration-answers/${args.question}`, { q05: 5, q50: 10, q95: 20, version: 0 }),
      { round: first, question: setup.questionId },
    )
  })

  it('round 2 shows the earlier declaration and practice as done, asks "still true?", and goes on to the answers', async () => {
    const second = await openRound('Round 2 of two')
    const { page } = expert
    await page.goto(`${expert.baseUrl}/answer/${second}`)
    const earlier = page.getByTestId('earlier-declaration')
    await earlier.waitFor()
    expect(await earlier.innerText()).toContain('as you declared in round 1 (Round 1 of two)')
    expect(await earlier.innerText()).toContain('Twenty years on the Kestrel Valley distribution network')
    expect(await page.getByTestId('practice-done').innerText()).toContain('Practice question — done in round 1')
    expect(await page.getByTestId('still-true').innerText()).toBe('Is this still true?')
    await expect(page.getByTestId('declaration-form').count()).resolves.toBe(0)
    await expect(page.getByTestId('practice').count()).resolves.toBe(0)
    await expert.shot('second-round-01-still-true')

    // "Change it" opens the form with last time's answers; cancelling returns to the question.
    await page.getByTestId('declaration-change').click()
    await page.getByTestId('declaration-form').waitFor()
    await expect(page.getByTestId('declaration-expertise').locator('textarea').inputValue()).resolves.toContain('Twenty years on the Kestrel Valley')
    await page.getByRole('button', { name: 'Cancel' }).click()
    await page.getByTestId('declaration-still-true').click()

    await page.getByTestId('entry-ready').waitFor()
    await page.getByTestId('declaration-done').waitFor()
    await page.getByTestId('practice-done').waitFor()
    await expect(page.getByTestId('stage-practice').count()).resolves.toBe(0)
    await expert.shot('second-round-02-confirmed')

    await page.getByTestId('start-answering').click()
    await page.getByTestId('answer-rail').waitFor()
    // The calibration question answered in round 1 is not asked again: only the quantity is on the rail.
    expect(await page.getByTestId('rail-item').evaluateAll((els) => els.map((e) => e.getAttribute('data-key')))).toEqual([`q-${setup.quantityId}`])
  })
})
