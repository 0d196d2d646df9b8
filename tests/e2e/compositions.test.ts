import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mammoth from 'mammoth'
import type { Page } from 'playwright-core'
import { openBrowser, signInAs, type BrowserSession, completeEntry, field, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'
import { expectPhoneLayout } from '../support/phone'
import { answerQuantile as answerWith } from '../support/quantile-answer'
import { addLinkOnRoundScreen, answerLinkChance } from '../support/links'

/**
 * Shares of a whole in chromium, in the Kestrel Valley household-uptake scenario: the analyst groups three proportion
 * quantities of a new study into a composition on the quantities screen (inline errors first), reorders and saves it;
 * a round asks the three shares; one expert answers on a 360 px phone and sees the total of their shares live, the
 * other answers through the API; the analyst reconciles two shares through the API and the last on its reconcile
 * screen, where the Dirichlet fitted to the three reconciled shares appears with its mismatch and model code; the analyst runs
 * it on pilot counts. The same round links the burst rate and the repair time; both experts answer the link's question, the
 * analyst reconciles both quantities and confirms the pooled correlation on the reconcile screen. The record page and the
 * .docx state the Dirichlet, the correlation (matrix, scatter of the recorded draws) and the model code of both.
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
  /** The burst rate and the repair time, linked in the round. */
  linkedIds: number[]
}

/** Two quantities that move together, linked in the same round: quantile answers (range, median, quartiles) per expert, and each expert's chance for the link. */
const LINKED = [
  { name: 'Mains burst rate', symbol: 'burst_rate', unit: 'bursts per 100 km a year', answers: [[5, 40, 18, 14, 22], [6, 45, 20, 16, 25]] },
  { name: 'Repair time', symbol: 'repair_time', unit: 'hours', answers: [[3, 20, 9, 7.5, 11], [3, 24, 10, 8, 12.5]] },
]
const LINK_CHANCES = [0.75, 0.7]
let linkId: number

let s: BrowserSession
let expert: BrowserSession
let setup: Setup
let roundId: number

/** Quantile answers (plausible range, median, quartiles) of the two experts, share by share. */
const ANSWERS = {
  expert1: [[0.1, 0.6, 0.3, 0.22, 0.38], [0.05, 0.4, 0.18, 0.13, 0.24], [0.25, 0.8, 0.55, 0.47, 0.62]],
  expert2: [[0.15, 0.55, 0.35, 0.3, 0.4], [0.05, 0.3, 0.15, 0.11, 0.19], [0.2, 0.75, 0.5, 0.44, 0.56]],
}

/** Fills the quantile steps of the item on show (range, middle value, quartiles) with the survey as the rationale. */
const answerQuantile = (page: Page, values: number[]) => answerWith(page, values, 'Take-up of the meter offer in the 2024 survey of the Board’s customers.')

beforeAll(async () => {
  s = await openBrowser()
})
keepFailureEvidence('compositions', () => ({ analyst: s, expert }))
afterAll(async () => {
  await s?.close()
  await expert?.close()
})

describe('compositions', () => {
  it('the analyst builds a three-share composition on the quantities screen, with inline errors first', async () => {
    const { page } = s
    await signInAs(s, 'analyst@kestrel.example')
    await page.waitForURL(/\/studies$/)
    setup = await inPage(page, async (call, { tag, shares, linked }) => {
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
      const linkedIds: number[] = []
      for (const q of linked) {
        const made = await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
          name: q.name, symbol: q.symbol, unit: q.unit, question: `In the Kestrel Valley network, what is the ${q.name.toLowerCase()} (${q.unit})?`, support: { kind: 'positive' },
        })
        linkedIds.push(made.id)
      }
      return { studyId: study.id, quantityIds, linkedIds }
    }, { tag: TAG, shares: SHARES, linked: LINKED })

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

  it('a round asks the three shares and links the burst rate to the repair time on its screen', async () => {
    roundId = await inPage(s.page, async (call, { studyId, quantityIds, linkedIds }) => {
      const round = await call<{ id: number }>('POST', `/api/studies/${studyId}/rounds`, {
        title: 'Household uptake: shares of the offer', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        askCalibration: false, items: [...quantityIds, ...linkedIds].map((quantityId) => ({ quantityId, method: 'quantile' })),
      })
      for (const n of [1, 2]) await call('POST', `/api/rounds/${round.id}/invitations`, { email: `expert${n}@kestrel.example`, name: `Expert ${n}` })
      return round.id
    }, setup)

    // The burst rate and the repair time move together: the analyst links them on the draft round's screen.
    const { page } = s
    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/rounds/${roundId}`)
    await addLinkOnRoundScreen(page, LINKED[0].name, LINKED[1].name)
    expect(await page.getByTestId('round-link').innerText()).toContain(`${LINKED[0].name} → ${LINKED[1].name}`)
    const links = await inPage(page, async (call, { roundId }) => {
      const round = await call<{ links: { id: number; first: { quantityId: number }; second: { quantityId: number } }[] }>('GET', `/api/rounds/${roundId}`)
      await call('POST', `/api/rounds/${roundId}/open`)
      return round.links
    }, { roundId })
    expect(links.map((l) => [l.first.quantityId, l.second.quantityId])).toEqual([setup.linkedIds])
    linkId = links[0].id
  })

  it('an expert on a 360 px phone sees the total of their shares live, in plain words', async () => {

    expert = await openBrowser({ viewport: { width: 360, height: 740 } })
    const { page } = expert
    await signInAs(expert, 'expert1@kestrel.example')
    await page.waitForURL(/\/studies$/)
    await completeEntry(page, roundId)
    // With the declaration and the practice done, the round opens on the answering screen.
    await page.goto(`${expert.baseUrl}/answer/${roundId}`)
    await page.getByTestId('q-lower').waitFor()

    const message = page.getByTestId('composition-sum-message')
    await message.waitFor()
    await expect(page.getByTestId('composition-sum-share').allInnerTexts()).resolves.toEqual([
      `${SHARES[0].name} (this question)\nnot answered yet`, `${SHARES[1].name}\nnot answered yet`, `${SHARES[2].name}\nnot answered yet`,
    ])
    await expect(message.innerText()).resolves.toBe('Once you have answered these shares, their total shows here.')
    await answerQuantile(page, ANSWERS.expert1[0])
    await expect.poll(() => message.innerText()).toMatch(/^Your shares so far add up to about 3\d %, which leaves about 6\d % for Ask for a smart meter only and Decline both offers\.$/)

    await page.getByTestId('item-next').first().click()
    await answerQuantile(page, ANSWERS.expert1[1])
    await page.getByTestId('item-next').first().click()
    // Too much for the last share first: the total goes past the whole and the box says so.
    await answerQuantile(page, [0.25, 0.8, 0.7, 0.6, 0.75])
    await expect.poll(() => page.getByTestId('composition-sum').getAttribute('data-tone')).toBe('check')
    await expect(message.innerText()).resolves.toMatch(/^Your shares add up to about 1[1-2]\d %: together they claim about \d+ % more than the whole\./)
    await check(expert, 'compositions-03-expert-too-much')

    await field(page, 'q-q1').fill('0.47')
    await field(page, 'q-q3').fill('0.62')
    await field(page, 'q-median').fill('0.55')
    await expect.poll(() => page.getByTestId('composition-sum').getAttribute('data-tone')).toBe('fits')
    const shown = await message.innerText()
    expect(shown).toMatch(/^Your shares add up to about (9[5-9]|10[0-5]) %: /)
    await check(expert, 'compositions-04-expert-fits')

    // The total is the sum of the means of the fits the server keeps (Beta means a / (a + b), rounded to a percent).
    await expect.poll(() => page.getByTestId('save-status').first().getAttribute('data-state')).toBe('saved')
    const fits = await inPage(page, async (call, { roundId }) => {
      const list = await call<{ quantityId: number; fits: { distribution: { family: string; alpha?: number; beta?: number } }[]; chosenFamily: string | null }[]>('GET', `/api/rounds/${roundId}/judgements`)
      return list.map((j) => j.fits.find((f) => f.distribution.family === j.chosenFamily) ?? j.fits[0])
    }, { roundId })
    expect(fits.map((f) => f.distribution.family)).toEqual(['beta', 'beta', 'beta'])
    const sum = fits.reduce((t, f) => t + f.distribution.alpha! / (f.distribution.alpha! + f.distribution.beta!), 0)
    expect(shown).toContain(`about ${Math.round(sum * 100)} %`)
  })
})

describe('the joint prior on the reconcile screen', () => {
  it('both experts submit; once the last share is reconciled the screen shows the Dirichlet, its mismatch and its model code', async () => {
    const { page } = expert
    // The first expert's burst rate and repair time go in through the API; the link is answered on the phone's screen.
    await inPage(page, async (call, { roundId, linkedIds, linked }) => {
      for (const [i, quantityId] of linkedIds.entries()) {
        const [lower, upper, median, q1, q3] = linked[i].answers[0]
        await call('PUT', `/api/rounds/${roundId}/judgements/${quantityId}`, {
          method: 'quantile', lower, upper, points: [{ value: q1, prob: 0.25 }, { value: median, prob: 0.5 }, { value: q3, prob: 0.75 }],
          rationale: 'Burst and repair logs of the Board since 2015.', version: 0,
        })
      }
    }, { roundId, linkedIds: setup.linkedIds, linked: LINKED })
    await page.reload()
    await page.locator(`[data-testid="rail-item"][data-key="l-${linkId}"]`).click()
    const linkScreen = page.locator(`[data-testid="link-screen"][data-link-id="${linkId}"]`)
    await linkScreen.waitFor()
    expect(await linkScreen.getByTestId('link-question').innerText()).toBe(
      `Suppose ${LINKED[0].name.toLowerCase()} turned out above your middle value. How likely is it that ${LINKED[1].name.toLowerCase()} is also above yours?`)
    await linkScreen.getByRole('textbox', { name: 'Why? (optional)' }).fill('Frost bursts come in clusters and crews fall behind.')
    await answerLinkChance(page, LINK_CHANCES[0] * 100)
    expect(await linkScreen.getByTestId('link-meaning').innerText()).toContain(`when ${LINKED[0].name.toLowerCase()} is high, ${LINKED[1].name.toLowerCase()} is more likely to be high too`)
    const answered = await inPage(page, async (call, { roundId }) => {
      const saved = await call<{ linkId: number; probability: number | null; rationale: string }[]>('GET', `/api/rounds/${roundId}/link-answers`)
      await call('POST', `/api/rounds/${roundId}/submit`)
      return saved
    }, { roundId })
    expect(answered.map((a) => [a.linkId, a.probability, a.rationale])).toEqual([[linkId, LINK_CHANCES[0], 'Frost bursts come in clusters and crews fall behind.']])
    // The second expert answers through the API.
    await inPage(page, async (call, { roundId, quantityIds, answers, password, linkedIds, linked, linkId, chance }) => {
      await call('POST', '/api/auth/sign-out')
      await call('POST', '/api/auth/sign-in', { email: 'expert2@kestrel.example', password })
      await call('PUT', `/api/rounds/${roundId}/declaration`, { expertise: 'Customer surveys for three water companies since 2012.', interests: 'none', interestsText: '', seenPilotData: false })
      for (const [i, quantityId] of quantityIds.entries()) {
        const [lower, upper, median, q1, q3] = answers[i]
        await call('PUT', `/api/rounds/${roundId}/judgements/${quantityId}`, {
          method: 'quantile', lower, upper, points: [{ value: q1, prob: 0.25 }, { value: median, prob: 0.5 }, { value: q3, prob: 0.75 }],
          rationale: 'Take-up of the meter offer in the 2024 survey of the Board’s customers.', version: 0,
        })
      }
      for (const [i, quantityId] of linkedIds.entries()) {
        const [lower, upper, median, q1, q3] = linked[i].answers[1]
        await call('PUT', `/api/rounds/${roundId}/judgements/${quantityId}`, {
          method: 'quantile', lower, upper, points: [{ value: q1, prob: 0.25 }, { value: median, prob: 0.5 }, { value: q3, prob: 0.75 }],
          rationale: 'Repair records of the eastern depot.', version: 0,
        })
      }
      await call('PUT', `/api/rounds/${roundId}/link-answers/${linkId}`, { probability: chance, rationale: 'Busy winters lengthen every repair.', version: 0 })
      await call('POST', `/api/rounds/${roundId}/submit`)
    }, { roundId, quantityIds: setup.quantityIds, answers: ANSWERS.expert2, password: 'priorsmith-demo', linkedIds: setup.linkedIds, linked: LINKED, linkId, chance: LINK_CHANCES[1] })

    await inPage(s.page, async (call, { quantityIds }) => {
      for (const quantityId of quantityIds.slice(0, 2)) {
        const view = await call<{ roundId: number }>('GET', `/api/quantities/${quantityId}/reconciliation`)
        await call('PUT', `/api/quantities/${quantityId}/reconciliation`, {
          roundId: view.roundId, method: 'linear', weights: 'equal', family: 'beta', reconciled: true, version: 0,
          rationale: 'Equal weights: both experts know the Board’s customers; the beta fits the pool closely.',
        })
      }
    }, { quantityIds: setup.quantityIds })

    const analyst = s.page
    await analyst.goto(`${s.baseUrl}/studies/${setup.studyId}/reconcile/${setup.quantityIds[2]}`)
    const panel = analyst.getByTestId('composition-prior')
    await panel.waitFor()
    await expect(panel.getAttribute('data-ready')).resolves.toBe('false')
    await expect(analyst.getByTestId('composition-prior-waiting').innerText()).resolves.toContain(`${SHARES[2].name} (this quantity)`)

    await analyst.locator('[data-testid="fit-row"][data-family="beta"]').getByTestId('fit-choose').click()
    await field(analyst, 'rationale').fill('Equal weights: both experts know the Board’s customers; the beta fits the pool closely.')
    await analyst.getByTestId('mark-reconciled').click()
    await analyst.locator('[data-testid="reconcile-status"][data-status="reconciled"]').waitFor()
    await analyst.locator('[data-testid="composition-prior"][data-ready="true"]').waitFor()

    const prior = await inPage(analyst, async (call, { studyId }) => {
      const [whole] = await call<{ id: number }[]>('GET', `/api/studies/${studyId}/compositions`)
      return call<{ fit: { alpha: number[]; mismatch: number[] }; modelCode: { language: string; code: string }[] }>('GET', `/api/compositions/${whole.id}/dirichlet`)
    }, { studyId: setup.studyId })
    expect(prior.fit.alpha).toHaveLength(3)
    await expect(analyst.getByTestId('composition-prior-row').count()).resolves.toBe(3)
    const alphas = (await analyst.getByTestId('composition-prior-alpha').allInnerTexts()).map(Number)
    alphas.forEach((a, i) => expect(a).toBeCloseTo(prior.fit.alpha[i], 2))
    await expect(analyst.getByTestId('composition-model-code').evaluateAll((els) => els.map((e) => e.getAttribute('data-language')))).resolves.toEqual(['stan', 'pymc', 'jags', 'brms'])
    await expect(analyst.getByTestId('composition-model-code').first().innerText()).resolves.toBe(prior.modelCode[0].code)
    await expect(analyst.getByTestId('composition-model-check').evaluateAll((els) => els.map((e) => e.getAttribute('data-ok')))).resolves.toEqual(['true', 'true', 'true', 'true'])

    const [download] = await Promise.all([analyst.waitForEvent('download'), analyst.locator('[data-testid="composition-model-download"][data-language="stan"]').click()])
    expect(download.suggestedFilename()).toBe('household_uptake.stan')
    await analyst.getByTestId('composition-prior').scrollIntoViewIfNeeded()
    await s.shot('compositions-05-reconcile-dirichlet')
    await expectAccessible(analyst, 'composition joint prior on the reconcile screen')
  })
})

describe('the linked pair at reconciliation', () => {
  it('the analyst reconciles the burst rate and the repair time, then confirms the experts’ pooled correlation of their link', async () => {
    const page = s.page
    await inPage(page, async (call, { linkedIds }) => {
      for (const quantityId of linkedIds) {
        const view = await call<{ roundId: number }>('GET', `/api/quantities/${quantityId}/reconciliation`)
        await call('PUT', `/api/quantities/${quantityId}/reconciliation`, {
          roundId: view.roundId, method: 'linear', weights: 'equal', family: 'lognormal', reconciled: true, version: 0,
          rationale: 'Equal weights: both experts keep the Board’s burst and repair logs; the lognormal fits the pool closely.',
        })
      }
    }, { linkedIds: setup.linkedIds })
    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/reconcile/${setup.linkedIds[0]}`)
    const card = page.locator(`[data-testid="link-card"][data-link-id="${linkId}"]`)
    await card.waitFor()
    // 75 % and 70 % mean sin(0.25π) and sin(0.2π); equal weights pool them on Fisher's z scale (constructed).
    const pooled = Math.tanh((Math.atanh(Math.sin(0.25 * Math.PI)) + Math.atanh(Math.sin(0.2 * Math.PI))) / 2)
    await expect(card.getByTestId('link-pooled').innerText()).resolves.toContain(`Pooled correlation ${pooled.toFixed(3)}`)
    await card.getByTestId('link-decide').click()
    const dialog = page.getByTestId('link-decision-dialog')
    await dialog.waitFor()
    await dialog.getByTestId('link-decision-save').click()
    await dialog.waitFor({ state: 'hidden' })
    await expect.poll(() => card.getAttribute('data-source')).toBe('confirmed')
  })
})

describe('the joint prior on pilot counts (impact screen)', () => {
  it('the analyst uploads counts with a column per share, runs the analysis and reads the posterior, evidence and sweep', async () => {
    const page = s.page
    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/impact/${setup.quantityIds[0]}`)
    const section = page.getByTestId('composition-impact')
    await section.waitFor()
    await section.locator('input[type="file"]').setInputFiles({
      name: 'uptake-survey-2026.csv', mimeType: 'text/csv',
      buffer: Buffer.from('district,p_alert,p_meter,p_decline\nKV-01,31,17,52\nKV-02,28,22,50\nKV-05,35,15,50\n'),
    })
    // One count column per share, in the composition's order: the form offers the columns after the first in turn.
    for (const [i, column] of ['p_alert', 'p_meter', 'p_decline'].entries())
      await expect.poll(() => section.getByTestId(`composition-data-column-${i}`).innerText()).toBe(column)
    await section.getByTestId('composition-data-submit').click()
    await expect.poll(() => section.getByTestId('composition-impact-dataset').innerText()).toContain('p_alert 94, p_meter 54, p_decline 152 (300 in all)')
    await section.getByTestId('composition-impact-run').click()
    await section.getByTestId('composition-impact-result').waitFor()

    const stored = await inPage(page, async (call, { studyId }) => {
      const [whole] = await call<{ id: number }[]>('GET', `/api/studies/${studyId}/compositions`)
      return (await call<{ analysis: { result: { prior: { analysis: { posterior: { mean: number }[]; logEvidence: number } }; comparison: { analysis: { logEvidence: number } } } } }>('GET', `/api/compositions/${whole.id}/impact`)).analysis.result
    }, { studyId: setup.studyId })
    const means = await section.getByTestId('composition-impact-posterior-mean').allInnerTexts()
    expect(means).toEqual(stored.prior.analysis.posterior.map((p) => `${Math.round(p.mean * 100)} %`))
    const evidence = (await section.getByTestId('composition-impact-log-evidence').allInnerTexts()).map(Number)
    expect(evidence[0]).toBeCloseTo(stored.prior.analysis.logEvidence, 3)
    expect(evidence[1]).toBeCloseTo(stored.comparison.analysis.logEvidence, 3)
    await expect(section.getByTestId('composition-impact-sweep-row').count()).resolves.toBe(11)
    await expect(section.getByTestId('composition-impact-bf').innerText()).resolves.toMatch(/^Bayes factor, composition prior against the comparison: /)
    await section.scrollIntoViewIfNeeded()
    await s.shot('compositions-06-impact')
    await expectAccessible(page, 'composition impact')
  })
})

describe('the joint prior in the record', () => {
  it('the record page and the .docx state the Dirichlet, its shares, its model code with the read-back check and its impact', async () => {
    const page = s.page
    const facts = await inPage(page, async (call, { studyId }) => {
      const view = await call<{ content: { compositions: { name: string; inPrior: boolean; dirichlet: { alpha: number[] }; modelCode: { language: string; code: string }[]; impact: { prior: { logEvidence: number } } | null }[] } }>('GET', `/api/studies/${studyId}/record`)
      return view.content.compositions
    }, { studyId: setup.studyId })
    expect(facts.map((c) => [c.name, c.inPrior])).toEqual([['Household uptake', true]])
    const [whole] = facts
    expect(whole.impact).not.toBeNull()

    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/record`)
    const section = page.locator('[data-testid="record-section"][data-section="Joint priors"]')
    await section.waitFor()
    // Six quantities come first (the three shares, the night-flow reduction, the burst rate and the repair time): the joint priors are section 10.
    await expect(section.getByRole('heading', { level: 2 }).innerText()).resolves.toBe('10. Joint priors')
    const composition = section.getByTestId('record-composition')
    await expect(composition.getAttribute('data-in-prior')).resolves.toBe('true')
    await expect(composition.getByTestId('record-composition-dirichlet').innerText()).resolves.toMatch(/^Dirichlet\([\d.]+, [\d.]+, [\d.]+\): total concentration /)
    const alphas = (await composition.getByTestId('record-composition-alpha').allInnerTexts()).map(Number)
    alphas.forEach((a, i) => expect(a).toBeCloseTo(whole.dirichlet.alpha[i], 2))
    await expect(composition.getByTestId('composition-model-code').first().innerText()).resolves.toBe(whole.modelCode[0].code)
    await expect(composition.getByTestId('composition-model-check').evaluateAll((els) => els.map((e) => e.getAttribute('data-ok')))).resolves.toEqual(['true', 'true', 'true', 'true'])
    await expect(composition.getByTestId('record-composition-impact').innerText()).resolves.toContain('p_alert 94, p_meter 54, p_decline 152 (300 in all)')
    const shownEvidence = Number(await composition.getByTestId('record-composition-log-evidence').first().innerText())
    expect(shownEvidence).toBeCloseTo(whole.impact!.prior.logEvidence, 3)
    await section.scrollIntoViewIfNeeded()
    await s.shot('compositions-07-record')
    await expectAccessible(page, 'joint priors in the record')

    // The linked pair: the confirmed correlation, a scatter of the recorded draws, and the multivariate normal's code.
    const linked = await inPage(page, async (call, { studyId }) => {
      const view = await call<{ content: { linkedSets: { name: string; inPrior: boolean; links: { correlation: number }[]; modelCode: { language: string; code: string }[] }[] } }>('GET', `/api/studies/${studyId}/record`)
      return view.content.linkedSets
    }, { studyId: setup.studyId })
    expect(linked.map((x) => [x.name, x.inPrior])).toEqual([['joint_burst_rate_repair_time', true]])
    const set = section.getByTestId('record-linked-set')
    await expect(set.getAttribute('data-in-prior')).resolves.toBe('true')
    await expect(set.getByTestId('record-link-correlation').innerText()).resolves.toBe(linked[0].links[0].correlation.toFixed(3))
    await expect(set.getByTestId('record-link-matrix').locator('td').allInnerTexts()).resolves.toEqual(['1', linked[0].links[0].correlation.toFixed(3), linked[0].links[0].correlation.toFixed(3), '1'])
    await expect(set.getByTestId('record-link-scatter').getAttribute('data-points')).resolves.toBe('1000')
    await expect.poll(() => set.getByTestId('record-link-scatter').locator('canvas').evaluate((c: HTMLCanvasElement) => c.width > 0 && c.height > 0)).toBe(true)
    await expect(set.getByTestId('composition-model-code').evaluateAll((els) => els.map((e) => e.getAttribute('data-language')))).resolves.toEqual(['stan', 'pymc', 'jags', 'brms'])
    await expect(set.getByTestId('composition-model-code').first().innerText()).resolves.toBe(linked[0].modelCode[0].code)
    await expect(set.getByTestId('composition-model-check').evaluateAll((els) => els.map((e) => e.getAttribute('data-ok')))).resolves.toEqual(['true', 'true', 'true', 'true'])
    await set.scrollIntoViewIfNeeded()
    await s.shot('compositions-08-record-linked')
    await expectAccessible(page, 'linked quantities in the record')

    const docx = await page.evaluate(async (id) => Array.from(new Uint8Array(await (await fetch(`/api/studies/${id}/record.docx`)).arrayBuffer())), setup.studyId)
    const text = (await mammoth.extractRawText({ buffer: Buffer.from(docx) })).value
    for (const expected of [
      '10. Joint priors', '10.1 Household uptake (shares of a whole, household_uptake)', whole.modelCode[0].code.split('\n')[1], whole.modelCode[1].code.split('\n')[1],
      'passed: the same parameters come out of the code', '10.2 Linked: Mains burst rate, Repair time (joint_burst_rate_repair_time)',
      `Expert 1: 75 % (correlation 0.707, weight 0.5); Expert 2: 70 % (correlation 0.588, weight 0.5)`, linked[0].modelCode[1].code.split('\n')[0],
      'Figure: 1000 joint draws (seed 20261203) from the linked set’s joint prior: Mains burst rate (burst_rate) across, Repair time (repair_time) up.',
    ]) expect(text).toContain(expected)
    expect(text).toContain(`${linked[0].links[0].correlation.toFixed(3)}`)
    expect(text).toMatch(/Dirichlet\([\d.]+, [\d.]+, [\d.]+\): total concentration/)
    expect(text).toMatch(/The counts favour the (elicited Dirichlet|comparison prior)/)
  })
})

/** The expert's page fits the phone and passes axe; a screenshot of what the expert sees. */
async function check(session: BrowserSession, name: string): Promise<void> {
  await session.page.mouse.move(0, 0)
  await session.page.getByTestId('composition-sum').scrollIntoViewIfNeeded()
  await session.shot(name)
  await expectPhoneLayout(session.page, name)
  await expectAccessible(session.page, name)
}
