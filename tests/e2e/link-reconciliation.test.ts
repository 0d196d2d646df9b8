import { readFile } from 'node:fs/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, signInAs, type BrowserSession, field, inPage, keepFailureEvidence } from '../support/browser'
import { expectAccessible } from '../support/axe'

/**
 * Linked quantities at reconciliation in chromium, in the Kestrel Valley district-losses scenario: three quantities of a
 * round linked pairwise, two experts answer through the API, and the analyst's reconcile screen shows each link's answers
 * under the study's expert labels with the pooled correlation; the analyst confirms one link and overrides it in the
 * dialog (inline errors first), sets correlations that cannot hold together and reads the repair, then, with every
 * quantity reconciled, sees the scatter of joint draws, downloads the CSV (the same bytes as the API gives) and the model code.
 */

const TAG = `linkrec-${Date.now() % 100000}`
const QUANTITIES = [
  { name: 'District A losses', symbol: 'loss_a', mu: 3, sigma: 0.5 },
  { name: 'District B losses', symbol: 'loss_b', mu: 4, sigma: 0.8 },
  { name: 'District C losses', symbol: 'loss_c', mu: 5, sigma: 1 },
]
/** Each expert's chance per link (A–B, B–C, A–C): constructed. */
const CHANCES = { expert1: [0.8, 0.75, 0.7], expert2: [0.6, 0.7, 0.65] }
const Z75 = 0.674489750196082
const Z99 = 2.326347874040841

interface Setup {
  studyId: number
  roundId: number
  quantityIds: number[]
  linkIds: number[]
}

let s: BrowserSession
let experts: BrowserSession
let setup: Setup

beforeAll(async () => {
  s = await openBrowser()
  experts = await openBrowser()
})
keepFailureEvidence('link-reconciliation', () => ({ analyst: s, experts }))
afterAll(async () => {
  await s?.close()
  await experts?.close()
})

describe('linked quantities on the reconcile screen', () => {
  it('the analyst links three quantities of a round and both experts answer', async () => {
    await signInAs(s, 'analyst@kestrel.example')
    await s.page.waitForURL(/\/studies$/)
    setup = await inPage(s.page, async (call, { tag, quantities }) => {
      const study = await call<{ id: number }>('POST', '/api/studies', { title: `${tag} district losses`, context: 'Water lost in three Kestrel Valley districts, which share a trunk main.' })
      const quantityIds: number[] = []
      for (const q of quantities) {
        quantityIds.push((await call<{ id: number }>('POST', `/api/studies/${study.id}/quantities`, {
          name: q.name, symbol: q.symbol, unit: 'ML/d', question: `How much water will ${q.name.toLowerCase().replace(' losses', '')} lose per day in 2027?`, support: { kind: 'real' },
        })).id)
      }
      const round = await call<{ id: number }>('POST', `/api/studies/${study.id}/rounds`, {
        title: 'District losses', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
        askCalibration: false, items: quantityIds.map((quantityId) => ({ quantityId, method: 'quantile' })),
      })
      const linkIds: number[] = []
      for (const [a, b] of [[0, 1], [1, 2], [0, 2]]) linkIds.push((await call<{ id: number }>('POST', `/api/rounds/${round.id}/links`, { firstQuantityId: quantityIds[a], secondQuantityId: quantityIds[b] })).id)
      for (const n of [1, 2]) await call('POST', `/api/rounds/${round.id}/invitations`, { email: `expert${n}@kestrel.example`, name: `Expert ${n}` })
      await call('POST', `/api/rounds/${round.id}/open`)
      return { studyId: study.id, roundId: round.id, quantityIds, linkIds }
    }, { tag: TAG, quantities: QUANTITIES })

    for (const [k, email] of ['expert1@kestrel.example', 'expert2@kestrel.example'].entries()) {
      await signInAs(experts, email)
      await experts.page.waitForURL(/\/studies$/)
      await inPage(experts.page, async (call, { setup, quantities, chances, k, z75, z99 }) => {
        await call('PUT', `/api/rounds/${setup.roundId}/declaration`, { expertise: 'Leakage surveys on the Kestrel Valley trunk mains since 2015.', interests: 'none', interestsText: '', seenPilotData: false })
        for (const [i, q] of quantities.entries()) {
          const mu = q.mu + 0.2 * k
          await call('PUT', `/api/rounds/${setup.roundId}/judgements/${setup.quantityIds[i]}`, {
            method: 'quantile', lower: mu - z99 * q.sigma, upper: mu + z99 * q.sigma, chosenFamily: 'normal', version: 0,
            points: [{ value: mu - z75 * q.sigma, prob: 0.25 }, { value: mu, prob: 0.5 }, { value: mu + z75 * q.sigma, prob: 0.75 }],
            rationale: 'Night-flow logging in the three districts, 2021 to 2025.',
          })
        }
        for (const [j, linkId] of setup.linkIds.entries())
          await call('PUT', `/api/rounds/${setup.roundId}/link-answers/${linkId}`, { probability: chances[j], rationale: 'The districts share one trunk main.', version: 0 })
        await call('POST', `/api/rounds/${setup.roundId}/submit`)
        await call('POST', '/api/auth/sign-out')
      }, { setup, quantities: QUANTITIES, chances: k === 0 ? CHANCES.expert1 : CHANCES.expert2, k, z75: Z75, z99: Z99 })
    }
  })

  it('shows each link’s answers under the study labels with the pooled correlation; the analyst confirms, then overrides in the dialog', async () => {
    const page = s.page
    await page.goto(`${s.baseUrl}/studies/${setup.studyId}/reconcile/${setup.quantityIds[0]}`)
    const section = page.getByTestId('linked-section')
    await section.waitFor()
    const cards = section.getByTestId('link-card')
    await expect.poll(() => cards.count()).toBe(3)
    const first = section.locator(`[data-testid="link-card"][data-link-id="${setup.linkIds[0]}"]`)
    const rows = await first.getByTestId('link-answer-row').allInnerTexts()
    expect(rows.map((r) => r.split('\t')[0].split(' ').slice(0, 2).join(' '))).toEqual(['Expert 1', 'Expert 2'])
    expect(rows.map((r) => r.split('\t').slice(1))).toEqual([['80 %', '0.809', '0.5', 'The districts share one trunk main.'], ['60 %', '0.309', '0.5', 'The districts share one trunk main.']])
    // tanh of the mean of atanh(sin 0.3π) and atanh(sin 0.1π) is 1/φ = 0.618 (constructed).
    await expect(first.getByTestId('link-pooled').innerText()).resolves.toContain('Pooled correlation 0.618')
    await expect(first.getAttribute('data-source')).resolves.toBe('pooled')
    await expect(section.getByTestId('linked-matrix-ok').innerText()).resolves.toContain('These correlations hold together')
    await expect(section.getByTestId('linked-matrix-unlinked').count()).resolves.toBe(0)
    await expect(section.getByTestId('linked-waiting').innerText()).resolves.toContain('District A losses, District B losses, District C losses')
    await s.shot('link-reconciliation-01-links')

    // Confirm the pooled value.
    await first.getByTestId('link-decide').click()
    const dialog = page.getByTestId('link-decision-dialog')
    await dialog.waitFor()
    await dialog.getByTestId('link-decision-save').click()
    await dialog.waitFor({ state: 'hidden' })
    await expect.poll(() => first.getAttribute('data-source')).toBe('confirmed')
    await expect(first.getByTestId('link-status').innerText()).resolves.toMatch(/^Confirmed at 0\.618 by /)

    // Override: a correlation of 1.5 and a short reason are refused beside their fields, nothing is saved.
    await first.getByTestId('link-decide').click()
    await dialog.waitFor()
    await dialog.getByTestId('link-decision-override').click()
    await field(dialog, 'link-decision-correlation').fill('1.5')
    await field(dialog, 'link-decision-reason').fill('Shared')
    await dialog.getByTestId('link-decision-save').click()
    await expect.poll(() => dialog.getByTestId('link-decision-correlation').innerText()).toContain('Give a correlation above −1 and below 1')
    await expect.poll(() => dialog.getByTestId('link-decision-reason').innerText()).toContain('Say why in at least 10 characters')
    await s.shot('link-reconciliation-02-dialog-errors')
    // The pointer leaves the Save button it clicked (its hover shade is not what the dialog shows at rest).
    await page.mouse.move(0, 0)
    await expectAccessible(page, 'link decision dialog')
    await field(dialog, 'link-decision-correlation').fill('0.9')
    await expect.poll(() => dialog.getByTestId('link-decision-meaning').innerText()).toBe('A correlation of 0.9 means a chance of 86 % that the second is above its middle value when the first is above its own.')
    await field(dialog, 'link-decision-reason').fill('Both districts lose water through the same ageing trunk main.')
    await dialog.getByTestId('link-decision-save').click()
    await dialog.waitFor({ state: 'hidden' })
    await expect.poll(() => first.getAttribute('data-source')).toBe('overridden')
    await expect(first.getByTestId('link-status').innerText()).resolves.toContain('Reason: “Both districts lose water through the same ageing trunk main.”')
    const saved = await inPage(page, async (call, { studyId }) => call<{ links: { linkId: number; saved: { decision: string; correlation: number; version: number } }[] }>('GET', `/api/studies/${studyId}/linked-quantities`), { studyId: setup.studyId })
    expect(saved.links.find((l) => l.linkId === setup.linkIds[0])!.saved).toMatchObject({ decision: 'override', correlation: 0.9, version: 2 })
  })

  it('reports correlations that cannot hold together with the repaired matrix; once all are reconciled shows the scatter, the CSV and the model code', async () => {
    const page = s.page
    await inPage(page, async (call, { setup }) => {
      for (const [linkId, correlation] of [[setup.linkIds[1], 0.9], [setup.linkIds[2], -0.9]])
        await call('PUT', `/api/links/${linkId}/reconciliation`, { decision: 'override', correlation, reason: 'Set to test how the matrix is repaired.', version: 0 })
      for (const quantityId of setup.quantityIds) {
        await call('PUT', `/api/quantities/${quantityId}/reconciliation`, {
          roundId: setup.roundId, method: 'linear', weights: 'equal', family: 'normal', reconciled: true, version: 0,
          rationale: 'Equal weights: both experts log the same districts; the normal fits the pool.',
        })
      }
    }, { setup })
    await page.reload()
    const section = page.getByTestId('linked-section')
    await section.getByTestId('linked-matrix-repaired').waitFor()
    await expect(section.getByTestId('linked-matrix-asked-cell').allInnerTexts()).resolves.toEqual(['1', '0.9', '-0.9', '0.9', '1', '0.9', '-0.9', '0.9', '1'])
    const view = await inPage(page, async (call, { studyId }) => call<{ sets: { repair: { matrix: number[][]; maxChange: number }; jointMatrix: number[][] }[] }>('GET', `/api/studies/${studyId}/linked-quantities`), { studyId: setup.studyId })
    const repair = view.sets[0].repair
    const shown = await section.getByTestId('linked-matrix-repair-cell').allInnerTexts()
    expect(shown).toHaveLength(9)
    expect(Number(shown[1].split(' ')[0])).toBeCloseTo(repair.matrix[0][1], 3)
    await expect(section.getByTestId('linked-matrix-repaired').innerText()).resolves.toContain('smallest eigenvalue -0.8')

    await section.getByTestId('joint-scatter').waitFor()
    // The chart drew its points: coloured pixels on the canvas.
    await expect.poll(() => section.getByTestId('joint-scatter').locator('canvas').evaluate((c: HTMLCanvasElement) => {
      const { data } = c.getContext('2d')!.getImageData(0, 0, c.width, c.height)
      let inked = 0
      for (let i = 3; i < data.length; i += 4) if (data[i] > 0) inked++
      return inked
    })).toBeGreaterThan(2000)
    await expect(section.getByTestId('joint-scatter-caption').innerText()).resolves.toMatch(/^1000 joint draws of District A losses \(across\) and District B losses \(up\)/)
    await section.scrollIntoViewIfNeeded()
    await s.shot('link-reconciliation-03-matrix-and-draws')

    // A bad number of draws is named beside its field and the download is held back.
    await field(section, 'joint-draws-n').fill('many')
    await expect.poll(() => section.getByTestId('joint-draws-n').innerText()).toContain('Ask for a whole number of draws from 1 to 100000')
    await expect(section.getByTestId('joint-draws-download').count()).resolves.toBe(0)
    await field(section, 'joint-draws-n').fill('200')
    await field(section, 'joint-draws-seed').fill('5')
    const [download] = await Promise.all([page.waitForEvent('download'), section.getByTestId('joint-draws-download').click()])
    expect(download.suggestedFilename()).toBe('joint-draws-loss_a-loss_b-loss_c-seed5-n200.csv')
    const file = await readFile((await download.path())!, 'utf8')
    const fromApi = await page.evaluate(async (url) => (await fetch(url)).text(), `/api/quantities/${setup.quantityIds[1]}/joint-draws?n=200&seed=5`)
    expect(file).toBe(fromApi)
    expect(file.split('\n')[0]).toBe('loss_a,loss_b,loss_c')
    expect(file.trimEnd().split('\n')).toHaveLength(201)

    const code = section.getByTestId('composition-model-code')
    await expect(code.evaluateAll((els) => els.map((e) => e.getAttribute('data-language')))).resolves.toEqual(['stan', 'pymc', 'jags', 'brms'])
    await expect(code.first().innerText()).resolves.toContain('joint_loss_a_loss_b_loss_c ~ multi_normal(')
    await expect(section.getByTestId('composition-model-check').evaluateAll((els) => els.map((e) => e.getAttribute('data-ok')))).resolves.toEqual(['true', 'true', 'true', 'true'])
    await expectAccessible(page, 'linked quantities on the reconcile screen')
  })
})
