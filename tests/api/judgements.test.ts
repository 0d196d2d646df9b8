import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fitAnswer } from '../../shared/elicitation/answers'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

const BOUNDED = JSON.parse(readFileSync(new URL('../unit/stats/fixtures/bounded-fits.json', import.meta.url), 'utf8'))

let h: ApiHarness
let analyst: Client
let expert1: Client
let expert2: Client
let studyId: number
let roundId: number
const q: Record<string, number> = {}
const day = 24 * 3600 * 1000

const quantile = (values: { lower?: number; upper?: number; q25?: number; q50?: number; q75?: number }, version: number, extra: object = {}) => ({
  method: 'quantile',
  lower: values.lower ?? null,
  upper: values.upper ?? null,
  points: [
    ...(values.q25 !== undefined ? [{ value: values.q25, prob: 0.25 }] : []),
    ...(values.q50 !== undefined ? [{ value: values.q50, prob: 0.5 }] : []),
    ...(values.q75 !== undefined ? [{ value: values.q75, prob: 0.75 }] : []),
  ],
  version,
  ...extra,
})

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  expert1 = await signedIn(h, 'expert1@kestrel.example')
  expert2 = await signedIn(h, 'expert2@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Judgements test study', context: 'Testing answers.' }).expect(201)).body.id
  for (const [symbol, support] of [['burst', { kind: 'positive' }], ['uptake', { kind: 'proportion' }], ['flow', { kind: 'real' }]] as const) {
    q[symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, { name: symbol, symbol, unit: 'u', question: `What is ${symbol} on the Kestrel Valley network?`, support }).expect(201)).body.id
  }
  await analyst.post(`/api/studies/${studyId}/calibration-questions`, { question: 'How many bursts were recorded in 2024?', unit: 'bursts', trueValue: 61 }).expect(201)
  const round = await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'Answering round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
    items: [
      { quantityId: q.burst, method: 'quantile' },
      { quantityId: q.uptake, method: 'fixed-interval', edges: [0, 0.1, 0.2, 0.3, 0.5, 1] },
      { quantityId: q.flow, method: 'chip-grid', edges: [0, 2, 4, 6, 8, 10], chips: 20 },
    ],
  }).expect(201)
  roundId = round.body.id
  await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
})
afterAll(async () => {
  await h.close()
})

describe('saving answers', () => {
  it('saves an incomplete quantile draft without fits', async () => {
    const res = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 4, upper: 25 }, 0))
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ complete: false, fits: [], judgement: { version: 1, status: 'draft', answer: { lower: 4, upper: 25, points: [] } } })
  })

  it('refuses an incoherent answer with a plain message naming the problem, keeping the saved draft', async () => {
    const res = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 4, upper: 25, q25: 8, q50: 7, q75: 13 }, 1))
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ 'points.50 %': 'The 50 % value must be above the 25 % value (8)' })
    const outside = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 4, upper: 25, q25: 8, q50: 10, q75: 30 }, 1))
    expect(outside.body.error.fields).toEqual({ 'points.75 %': 'The 75 % value must be below your upper bound (25)' })
    const negative = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: -1, upper: 25 }, 1))
    expect(negative.body.error.fields).toEqual({ lower: 'The lower bound must be above 0' })
    const stored = (await expert1.get(`/api/rounds/${roundId}/judgements`)).body
    expect(stored[0].answer).toEqual({ lower: 4, upper: 25, points: [] })
  })

  it('fits a complete quantile answer on the server exactly as the shared engine does in the browser', async () => {
    const body = quantile({ lower: 4, upper: 25, q25: 8, q50: 10, q75: 13 }, 1)
    const res = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, body)
    expect(res.status).toBe(200)
    expect(res.body.complete).toBe(true)
    const browser = fitAnswer({ method: 'quantile' }, { lower: 4, upper: 25, points: body.points }, { kind: 'positive' })
    expect(res.body.fits).toEqual(JSON.parse(JSON.stringify(browser.fits)))
    // The quartiles with the bounds 4 and 25 as 1 % / 99 % points at weight 1/2: scipy's fit of the same answer
    // (tests/unit/stats/fixtures/bounded-fits.json, case right-skewed-positive) has the lognormal best.
    const ref = BOUNDED.cases.find((c: { id: string }) => c.id === 'right-skewed-positive').fits[0]
    expect(res.body.fits.map((f: { distribution: { family: string } }) => f.distribution.family)).toEqual(['lognormal', 'gamma', 'uniform'])
    expect(res.body.fits[0].distribution.meanlog).toBeCloseTo(ref.params.meanlog, 6)
    expect(res.body.fits[0].distribution.sdlog).toBeCloseTo(ref.params.sdlog, 6)
  })

  it('answers 409 to a stale version and keeps the newer answer', async () => {
    const stale = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 1, upper: 50, q25: 5, q50: 9, q75: 20 }, 1))
    expect(stale.status).toBe(409)
    const [j] = (await expert1.get(`/api/rounds/${roundId}/judgements`)).body
    expect(j.version).toBe(2)
    expect(j.answer.points.map((p: { value: number }) => p.value)).toEqual([8, 10, 13])
  })

  it('lets the expert choose another fitted family, but only a fitted one', async () => {
    const bad = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 4, upper: 25, q25: 8, q50: 10, q75: 13 }, 2, { chosenFamily: 'beta' }))
    expect(bad.body.error.fields).toEqual({ chosenFamily: 'Choose one of the fitted families' })
    const ok = await expert1.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 4, upper: 25, q25: 8, q50: 10, q75: 13 }, 2, { chosenFamily: 'gamma', rationale: 'Burst logs 2015–2025 and the neighbouring boards’ reports.' }))
    expect(ok.status).toBe(200)
    expect(ok.body.judgement.chosenFamily).toBe('gamma')
  })

  it('checks fixed-interval probabilities: over 100 % is refused, a full answer is fitted', async () => {
    const over = await expert1.put(`/api/rounds/${roundId}/judgements/${q.uptake}`, { method: 'fixed-interval', probs: [0.3, 0.4, 0.3, 0.2, null], version: 0 })
    expect(over.status).toBe(400)
    expect(over.body.error.fields).toEqual({ probs: 'Your probabilities add up to 120.0 %, more than 100 %' })
    const partial = await expert1.put(`/api/rounds/${roundId}/judgements/${q.uptake}`, { method: 'fixed-interval', probs: [0.1, 0.3, null, null, null], version: 0 })
    expect(partial.body.complete).toBe(false)
    const full = await expert1.put(`/api/rounds/${roundId}/judgements/${q.uptake}`, { method: 'fixed-interval', probs: [0.1, 0.3, 0.3, 0.2, 0.1], version: 1, rationale: 'The pilot survey and uptake of the smart-meter offer.' })
    expect(full.body.complete).toBe(true)
    expect(full.body.fits.map((f: { distribution: { family: string } }) => f.distribution.family).sort()).toEqual(['beta', 'uniform'])
    const wrongMethod = await expert1.put(`/api/rounds/${roundId}/judgements/${q.uptake}`, quantile({ lower: 0.1, upper: 0.5 }, 2))
    expect(wrongMethod.body.error.fields).toEqual({ method: 'This round uses the fixed-interval method here' })
  })

  it('checks chip counts against the round’s number of chips', async () => {
    const over = await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [5, 5, 5, 5, 5], version: 0 })
    expect(over.body.error.fields).toEqual({ chips: 'You placed 25 chips; this round has 20' })
    const ok = await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [1, 4, 8, 5, 2], version: 0 })
    expect(ok.body.complete).toBe(true)
    expect(ok.body.fits[0].sse).toBeLessThan(0.01)
  })

  it('keeps experts to their own answers and stops reviewers from answering', async () => {
    expect((await expert2.get(`/api/rounds/${roundId}/judgements`)).body).toEqual([])
    const reviewer = await signedIn(h, 'reviewer@kestrel.example')
    expect((await reviewer.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 1, upper: 2 }, 0))).status).toBe(403)
    const all = (await analyst.get(`/api/rounds/${roundId}/judgements`)).body
    expect(all.map((j: { expertName: string }) => j.expertName)).toEqual(['Tomasz Wierzbicki', 'Tomasz Wierzbicki', 'Tomasz Wierzbicki'])
  })

  it('refuses a save for the first thing wrong, in a fixed order: round, study membership, role, body, panel, quantity', async () => {
    const refusal = async (c: Client, round: number | string, quantity: number | string, body: object) => {
      const res = await c.put(`/api/rounds/${round}/judgements/${quantity}`, body)
      return [res.status, res.body.error?.message]
    }
    const good = quantile({ lower: 1, upper: 9 }, 0)
    const bad = { ...good, points: 'none' }
    const outsider = await signedIn(h, 'expert3@kestrel.example')
    const admin = await signedIn(h, 'admin@kestrel.example')
    const unasked = (await analyst.post(`/api/studies/${studyId}/quantities`, { name: 'load unasked', symbol: 'unasked', unit: 'u', question: 'What is not asked in the round?', support: { kind: 'real' } }).expect(201)).body.id
    // A second round of the study whose panel is expert 2 alone: expert 1 is a member of the study but not on it.
    const other = (await analyst.post(`/api/studies/${studyId}/rounds`, {
      title: 'load second round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + day).toISOString(), items: [{ quantityId: q.burst, method: 'quantile' }],
    }).expect(201)).body.id
    await analyst.post(`/api/rounds/${other}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
    await analyst.post(`/api/rounds/${other}/open`).expect(200)

    expect(await refusal(expert1, 2_000_000_000, q.burst, bad)).toEqual([404, 'Round not found'])
    expect(await refusal(outsider, roundId, 'x', bad)).toEqual([403, 'You are not a member of this study'])
    expect(await refusal(analyst, roundId, 'x', bad)).toEqual([403, 'Your role in this study does not allow this'])
    expect(await refusal(admin, roundId, 'x', bad)).toEqual([403, 'Only the experts on the panel answer'])
    expect((await refusal(expert1, other, 'x', bad))[0]).toBe(400)
    expect(await refusal(expert1, roundId, 'x', good)).toEqual([404, 'Quantity not found'])
    expect(await refusal(expert1, other, q.burst, good)).toEqual([403, 'You are not on the panel of this round'])
    expect(await refusal(expert1, roundId, unasked, good)).toEqual([404, 'This quantity is not part of the round'])
    expect(await refusal(expert2, other, q.burst, good)).toEqual([200, undefined])
  })
})

describe('submitting', () => {
  it('lists what is missing: a rationale and the calibration question', async () => {
    await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [1, 4, 8, 5, 2], version: 1, rationale: 'short' })
    const res = await expert1.post(`/api/rounds/${roundId}/submit`)
    expect(res.status).toBe(400)
    const calib = (await expert1.get(`/api/studies/${studyId}/calibration-questions`)).body[0]
    expect(res.body.error.fields).toEqual({
      [`quantity.${q.flow}`]: 'flow: say in a sentence or two what evidence drove your judgement',
      [`calibration.${calib.id}`]: 'Calibration question 1: give your 5 %, 50 % and 95 % values',
    })
  })

  it('checks calibration answers are increasing, then submits and freezes every answer', async () => {
    const calib = (await expert1.get(`/api/studies/${studyId}/calibration-questions`)).body[0]
    const bad = await expert1.put(`/api/rounds/${roundId}/calibration-answers/${calib.id}`, { q05: 40, q50: 30, q95: 90, version: 0 })
    expect(bad.body.error.fields).toEqual({ q50: 'The median must be above the 5 % value' })
    await expert1.put(`/api/rounds/${roundId}/calibration-answers/${calib.id}`, { q05: 30, q50: 55, q95: 90, version: 0 }).expect(200)
    await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [1, 4, 8, 5, 2], version: 2, rationale: 'The eight pilot districts measured in 2024–2025.' }).expect(200)
    const res = await expert1.post(`/api/rounds/${roundId}/submit`)
    expect(res.status).toBe(200)
    expect(res.body.map((j: { status: string }) => j.status)).toEqual(['submitted', 'submitted', 'submitted'])
    const frozen = await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [2, 4, 8, 4, 2], version: 4 })
    expect(frozen.status).toBe(409)
    const progress = (await analyst.get(`/api/rounds/${roundId}/progress`)).body
    const row = progress.experts.find((e: { email: string }) => e.email === 'expert1@kestrel.example')
    expect(row.submittedAt).not.toBeNull()
    expect(row.quantities.map((x: { status: string }) => x.status)).toEqual(['submitted', 'submitted', 'submitted'])
  })

  it('keeps every saved version in the history', async () => {
    const [burst] = (await expert1.get(`/api/rounds/${roundId}/judgements`)).body
    const history = (await expert1.get(`/api/judgements/${burst.id}/history`)).body
    expect(history.map((v: { version: number; status: string }) => [v.version, v.status])).toEqual([[1, 'draft'], [2, 'draft'], [3, 'draft'], [4, 'submitted']])
    expect((await expert2.get(`/api/judgements/${burst.id}/history`)).status).toBe(403)
  })

  it('lets the analyst reopen a submission with a reason; the expert can then revise', async () => {
    const me = (await expert1.get('/api/auth/me')).body
    expect((await analyst.post(`/api/rounds/${roundId}/reopen`, { expertId: me.id, reason: '' })).body.error.fields).toEqual({ reason: 'Say why the answers are reopened' })
    await analyst.post(`/api/rounds/${roundId}/reopen`, { expertId: me.id, reason: 'Expert asked to correct a typo' }).expect(204)
    const [, , flow] = (await expert1.get(`/api/rounds/${roundId}/judgements`)).body
    expect(flow.status).toBe('draft')
    const res = await expert1.put(`/api/rounds/${roundId}/judgements/${q.flow}`, { method: 'chip-grid', chips: [2, 4, 8, 4, 2], version: flow.version, rationale: 'The eight pilot districts measured in 2024–2025.' })
    expect(res.status).toBe(200)
  })
})

describe('feedback round', () => {
  it('shows an expert the others’ round-1 fits anonymised, beside their own', async () => {
    await expert2.put(`/api/rounds/${roundId}/judgements/${q.burst}`, quantile({ lower: 2, upper: 40, q25: 6, q50: 9, q75: 15 }, 0, { rationale: 'Regional statistics for old cast iron.' })).expect(200)
    await expert1.post(`/api/rounds/${roundId}/submit`).expect(200)
    await h.db('judgements').where({ round_id: roundId, quantity_id: q.burst }).update({ status: 'submitted' })
    // Feedback shows earlier rounds once they have closed (confidentiality.test.ts checks an open one shows nothing).
    await analyst.post(`/api/rounds/${roundId}/close`).expect(200)
    const r2 = await analyst.post(`/api/studies/${studyId}/rounds`, {
      title: 'Round 2 with feedback', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
      feedbackEnabled: true, items: [{ quantityId: q.burst, method: 'quantile' }],
    }).expect(201)
    await analyst.post(`/api/rounds/${r2.body.id}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
    await analyst.post(`/api/rounds/${r2.body.id}/open`).expect(200)
    const fb = await expert2.get(`/api/rounds/${r2.body.id}/feedback`)
    expect(fb.status).toBe(200)
    expect(fb.body).toHaveLength(1)
    expect(fb.body[0].previousRound.number).toBe(1)
    expect(fb.body[0].mine.answer.points.map((p: { value: number }) => p.value)).toEqual([6, 9, 15])
    expect(fb.body[0].others).toHaveLength(1)
    expect(fb.body[0].others[0].label).toBe('Expert 1')
    expect(fb.body[0].others[0].distribution.family).toBe('gamma')
    expect(JSON.stringify(fb.body)).not.toContain('Tomasz')
  })
})

describe('saves racing each other', () => {
  it('lets exactly one of several simultaneous saves of the same version through, and keeps a gapless history', async () => {
    // Two windows (or a retried autosave) sending the same version at once: optimistic concurrency must pick one.
    const race = await analyst.post(`/api/studies/${studyId}/rounds`, {
      title: 'Race round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
      items: [{ quantityId: q.burst, method: 'quantile' }],
    }).expect(201)
    await analyst.post(`/api/rounds/${race.body.id}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)
    await analyst.post(`/api/rounds/${race.body.id}/open`).expect(200)
    const url = `/api/rounds/${race.body.id}/judgements/${q.burst}`
    const put = (median: number, version: number) => expert1.put(url, quantile({ lower: 1, upper: 40, q25: median - 2, q50: median, q75: median + 3 }, version))

    const firsts = await Promise.all([8, 9, 10, 11, 12, 13].map((m) => put(m, 0)))
    expect(firsts.map((r) => r.status).sort()).toEqual([200, 409, 409, 409, 409, 409])
    const seconds = await Promise.all([14, 15, 16, 17, 18, 19].map((m) => put(m, 1)))
    expect(seconds.map((r) => r.status).sort()).toEqual([200, 409, 409, 409, 409, 409])
    expect(seconds.find((r) => r.status === 409)!.body.error.message).toMatch(/saved from another window or device/)

    const winner = seconds.find((r) => r.status === 200)!.body.judgement
    const [stored] = (await expert1.get(`/api/rounds/${race.body.id}/judgements`)).body
    expect(stored.version).toBe(2)
    expect(stored.answer).toEqual(winner.answer)
    const history = (await expert1.get(`/api/judgements/${stored.id}/history`)).body
    expect(history.map((v: { version: number }) => v.version)).toEqual([1, 2])
  })
})
