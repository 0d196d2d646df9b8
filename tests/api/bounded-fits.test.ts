import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fitAnswer } from '../../shared/elicitation/answers'
import { MAX_OUTSIDE_SHARE } from '../../shared/elicitation/fits'
import { cdf, pdf, sf, type Distribution, type Support } from '../../shared/stats/index'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

// Issue 14: an answer with plausible bounds 5 and 25 and quartiles 8 / 10 / 12 (and its mirror image) must get a default
// fit that leaves no part of [5, 25] impossible; the stored fits, the browser's fits and the record must agree.
let h: ApiHarness
let analyst: Client
let expert: Client
let studyId: number
let roundId: number
const day = 24 * 3600 * 1000

const CASES: { symbol: string; support: Support; q: number[]; tail: (d: Distribution) => number; tailWords: string }[] = [
  { symbol: 'leakPos', support: { kind: 'positive' }, q: [8, 10, 12], tail: (d) => sf(d, 14), tailWords: 'P(X > 14)' },
  { symbol: 'leakReal', support: { kind: 'real' }, q: [8, 10, 12], tail: (d) => sf(d, 14), tailWords: 'P(X > 14)' },
  { symbol: 'mirrorPos', support: { kind: 'positive' }, q: [18, 20, 22], tail: (d) => cdf(d, 16), tailWords: 'P(X < 16)' },
  { symbol: 'mirrorReal', support: { kind: 'real' }, q: [18, 20, 22], tail: (d) => cdf(d, 16), tailWords: 'P(X < 16)' },
  { symbol: 'mirrorBounded', support: { kind: 'bounded', lower: 0, upper: 30 }, q: [18, 20, 22], tail: (d) => cdf(d, 16), tailWords: 'P(X < 16)' },
]
const ids: Record<string, number> = {}
const stored: Record<string, { distribution: Distribution; warnings: string[] }[]> = {}
const body = (q: number[], version: number) => ({
  method: 'quantile', lower: 5, upper: 25, points: q.map((value, i) => ({ value, prob: [0.25, 0.5, 0.75][i] })), version,
  rationale: 'Kestrel Valley burst logs and the 2024 pressure survey.',
})

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  expert = await signedIn(h, 'expert2@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Bounded fits study', context: 'Fits that honour the plausible bounds.' }).expect(201)).body.id
  for (const c of CASES) {
    ids[c.symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, {
      name: c.symbol, symbol: c.symbol, unit: 'L/s', question: `Night flow (${c.symbol}) on the Kestrel Valley network?`, support: c.support,
    }).expect(201)).body.id
  }
  roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'Bounds round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
    items: CASES.map((c) => ({ quantityId: ids[c.symbol], method: 'quantile' })),
  }).expect(201)).body.id
  await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
})
afterAll(async () => {
  await h.close()
})

describe('default fits honour the plausible bounds through the API (issue 14)', () => {
  for (const c of CASES) {
    it(`${c.symbol}: bounds 5 / 25, quartiles ${c.q.join(' / ')} on a ${c.support.kind} support`, async () => {
      const res = await expert.put(`/api/rounds/${roundId}/judgements/${ids[c.symbol]}`, body(c.q, 0)).expect(200)
      const d = res.body.fits[0].distribution as Distribution
      expect(d.family).not.toBe('uniform')
      for (let x = 5; x <= 25; x += 0.25) expect(pdf(d, x), `density at ${x}`).toBeGreaterThan(0)
      expect(c.tail(d), c.tailWords).toBeGreaterThanOrEqual(0.05)
      expect(cdf(d, 5) + sf(d, 25)).toBeLessThanOrEqual(MAX_OUTSIDE_SHARE)
      // The uniform stays on offer, with the plain warning.
      const box = res.body.fits.find((f: { distribution: Distribution }) => f.distribution.family === 'uniform')
      expect(box.contradicts).toBe(true)
      expect(box.warnings[0]).toMatch(/^This shape says values above 1\d(\.\d+)? are impossible, but you said 25 is plausible\.$|^This shape says values above 24 are impossible, but you said 25 is plausible\.$/)
      // The browser runs the same code on the same answer.
      const browser = fitAnswer({ method: 'quantile' }, { lower: 5, upper: 25, points: body(c.q, 0).points }, c.support)
      expect(res.body.fits).toEqual(JSON.parse(JSON.stringify(browser.fits)))
      stored[c.symbol] = res.body.fits
    })
  }

  it('the record carries the same default fits and their warnings once the answers are submitted', async () => {
    await expert.post(`/api/rounds/${roundId}/submit`).expect(200)
    const content = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body.content
    for (const c of CASES) {
      const q = content.quantities.find((x: { symbol: string }) => x.symbol === c.symbol)
      expect(q.judgements).toHaveLength(1)
      expect(q.judgements[0].fit.distribution).toEqual(stored[c.symbol][0].distribution)
      expect(q.judgements[0].fit.warnings).toEqual(stored[c.symbol][0].warnings)
    }
    // Choosing the uniform on purpose is allowed, and the record then carries its warning.
    const reopen = await analyst.post(`/api/rounds/${roundId}/reopen`, { expertId: (await expert.get('/api/auth/me')).body.id, reason: 'Check the uniform choice' })
    expect(reopen.status).toBe(204)
    const [j] = (await expert.get(`/api/rounds/${roundId}/judgements`)).body.filter((x: { quantityId: number }) => x.quantityId === ids.leakPos)
    await expert.put(`/api/rounds/${roundId}/judgements/${ids.leakPos}`, { ...body([8, 10, 12], j.version), chosenFamily: 'uniform' }).expect(200)
    await expert.post(`/api/rounds/${roundId}/submit`).expect(200)
    const again = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body.content
    const fit = again.quantities.find((x: { symbol: string }) => x.symbol === 'leakPos').judgements[0].fit
    expect(fit.distribution.family).toBe('uniform')
    expect(fit.warnings).toContain('This shape says values above 14 are impossible, but you said 25 is plausible.')
  })
})
