import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, normalQuantileAnswer as normalAnswer, openQuantileRound, signedIn, startApi, type ApiHarness } from '../support/api'

// A CONSTRUCTED two-expert panel (not from a publication): COOKE-worked-example of tests/unit/stats/fixtures/checks.json,
// whose expected values come from an independent Python implementation of Cooke's classical model (Cooke 1991, ch. 12;
// intrinsic range as in Blischke & Murthy 2003, §15.3.2; docs/methods/cooke.md): realisations and the 5/50/95 % values of
// experts A and B.
const REALISATIONS = [12, 35, 7.5, 150, 0.8, 48, 23, 5.2, 90, 310]
const EXPERT_A = [[5, 10, 20], [20, 40, 70], [2, 6, 12], [60, 120, 200], [0.3, 1, 3], [15, 30, 45], [10, 25, 50], [5.5, 9, 15], [40, 80, 160], [150, 350, 700]]
const EXPERT_B = [[13, 14, 15], [30, 33, 36], [8, 9, 10], [100, 110, 125], [0.5, 0.7, 0.9], [40, 50, 55], [25, 28, 30], [4.6, 4.9, 5.1], [60, 70, 80], [280, 320, 360]]

let h: ApiHarness
let analyst: Client
let experts: Client[]
let quantityId: number
let roundId: number
let studyId: number

// Quartiles of N(mu, sigma) with the bounds at its 1 % and 99 % points (how the fit reads them): least squares on the
// CDF recovers N(mu, sigma) exactly (FIT-normal-symmetric).

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  experts = [await signedIn(h, 'expert1@kestrel.example'), await signedIn(h, 'expert2@kestrel.example')]
  studyId = (await analyst.post('/api/studies', { title: 'Reconciliation test study', context: 'Testing pooling.' }).expect(201)).body.id
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body.id
  const questionIds: number[] = []
  for (const [i, r] of REALISATIONS.entries()) {
    questionIds.push((await analyst.post(`/api/studies/${studyId}/calibration-questions`, { question: `Seed question number ${i + 1} with a known answer`, unit: 'u', trueValue: r }).expect(201)).body.id)
  }
  roundId = await openQuantileRound(analyst, studyId, [quantityId], ['expert1@kestrel.example', 'expert2@kestrel.example'])
  const answers = [normalAnswer(10, 2), normalAnswer(14, 3)]
  const seeds = [EXPERT_A, EXPERT_B]
  for (const [k, c] of experts.entries()) {
    await c.put(`/api/rounds/${roundId}/judgements/${quantityId}`, { ...answers[k], version: 0 }).expect(200)
    for (const [i, qid] of questionIds.entries()) {
      const [q05, q50, q95] = seeds[k][i]
      await c.put(`/api/rounds/${roundId}/calibration-answers/${qid}`, { q05, q50, q95, version: 0 }).expect(200)
    }
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
})
afterAll(async () => {
  await h.close()
})

describe('reconciliation workspace', () => {
  it('is closed to experts', async () => {
    const res = await experts[0].get(`/api/quantities/${quantityId}/reconciliation`)
    expect(res.status).toBe(403)
    expect((await experts[0].put(`/api/quantities/${quantityId}/reconciliation`, { roundId, method: 'linear', version: 0 })).status).toBe(403)
  })

  it('pools the panel with equal weights by default: the linear pool of N(10,2²) and N(14,3²)', async () => {
    const res = await analyst.get(`/api/quantities/${quantityId}/reconciliation`).expect(200)
    expect(res.body.experts.map((e: { name: string; label: string }) => [e.name, e.label])).toEqual([['Tomasz Wierzbicki', 'Expert 1'], ['Helen Okafor', 'Expert 2']])
    expect(res.body.experts[0].distribution.mu).toBeCloseTo(10, 6)
    expect(res.body.experts[0].distribution.sigma).toBeCloseTo(2, 6)
    expect(res.body.weights).toEqual([0.5, 0.5])
    // POOL-linear-2 of tests/unit/stats/fixtures/checks.json (mpmath; Stone 1961; Genest & Zidek 1986): 5 % 7.28598745543, median 11.6, 95 % 17.8454032129, mean 12, sd 3.2403703492.
    expect(res.body.pool.q50).toBeCloseTo(11.6, 5)
    expect(res.body.pool.q05).toBeCloseTo(7.28598745543, 5)
    expect(res.body.pool.q95).toBeCloseTo(17.8454032129, 5)
    expect(res.body.pool.mean).toBeCloseTo(12, 5)
    expect(res.body.pool.sd).toBeCloseTo(3.2403703492, 5)
    expect(res.body.fits.map((f: { distribution: { family: string } }) => f.distribution.family).sort()).toEqual(['normal', 'student-t', 'uniform'])
  })

  it('computes Cooke performance weights from the calibration answers', async () => {
    const res = await analyst.get(`/api/quantities/${quantityId}/reconciliation`).expect(200)
    // COOKE-worked-example (independent Python implementation): calibration 0.82830817168 / 0.00180500257881; normalised weights at α = 0: 0.957753869124 / 0.0422461308765.
    expect(res.body.calibration.questionCount).toBe(10)
    const [a, b] = res.body.calibration.scores
    expect(a.calibration).toBeCloseTo(0.82830817168, 9)
    expect(b.calibration).toBeCloseTo(0.00180500257881, 11)
    expect(a.normalizedWeight).toBeCloseTo(0.957753869124, 9)
    expect(b.normalizedWeight).toBeCloseTo(0.0422461308765, 9)
    const cut = await analyst.get(`/api/quantities/${quantityId}/reconciliation?cutoff=0.05`).expect(200)
    expect(cut.body.calibration.scores.map((s: { normalizedWeight: number }) => s.normalizedWeight)).toEqual([1, 0])
  })

  it('saves a logarithmic pool with performance weights, refuses marking it reconciled without a rationale', async () => {
    const log = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, { roundId, method: 'logarithmic', weights: 'equal', family: 'normal', version: 0 })
    expect(log.status).toBe(200)
    // POOL-log-normal-2 of tests/unit/stats/fixtures/checks.json: normal with mean 146/13 = 11.2307692308, sd 2.35339362166.
    expect(log.body.saved.distribution.mu).toBeCloseTo(146 / 13, 6)
    expect(log.body.saved.distribution.sigma).toBeCloseTo(2.35339362166, 6)
    const noWhy = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, { roundId, method: 'linear', weights: 'performance', family: 'normal', reconciled: true, version: 1 })
    expect(noWhy.status).toBe(400)
    expect(noWhy.body.error.fields).toEqual({ rationale: 'Explain the choice in at least 20 characters; it goes into the prior record' })
    const custom = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, { roundId, method: 'linear', weights: [3, 1], family: 'normal', version: 1 })
    expect(custom.body.error.fields).toEqual({ weightsReason: 'Say why you set the weights by hand' })
  })

  it('marks the quantity reconciled, keeps history, and answers 409 to a stale save by another analyst', async () => {
    const ok = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
      roundId, method: 'linear', weights: 'performance', family: 'normal', reconciled: true, version: 1,
      rationale: 'Performance weights favour the better-calibrated expert; the normal fits the pool closely.',
    })
    expect(ok.status).toBe(200)
    expect(ok.body.saved).toMatchObject({ status: 'reconciled', method: 'linear', weightsMode: 'performance', family: 'normal', version: 2 })
    expect(ok.body.saved.weights[0]).toBeCloseTo(0.957753869124, 9)
    expect(ok.body.history.map((v: { version: number; status: string }) => [v.version, v.status])).toEqual([[2, 'reconciled'], [1, 'draft']])
    const admin = await signedIn(h, 'admin@kestrel.example')
    const stale = await admin.put(`/api/quantities/${quantityId}/reconciliation`, { roundId, method: 'linear', weights: 'equal', family: 'normal', version: 1 })
    expect(stale.status).toBe(409)
    const detail = (await analyst.get(`/api/studies/${studyId}`)).body
    expect(detail.quantities[0].stage).toBe('reconciled')
  })

  it('cautions that performance weights rest on 2 experts, fewer than the stated minimum, on the screen and in the record', async () => {
    const view = await analyst.get(`/api/quantities/${quantityId}/reconciliation`).expect(200)
    expect(view.body.settings.weights).toBe('performance')
    expect(view.body.weightCautions).toEqual([
      'Performance weights here compare 2 experts; this tool asks for at least 4 before the weights say much. With so few, the weights mostly pick one person: compare the result with equal weights before relying on it.',
    ])
    const content = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body.content
    expect(content.quantities[0].combination.weightCautions).toEqual(view.body.weightCautions)
    expect(content.cautions).toContainEqual({ rule: 'performance-weights', quantity: 'Night-flow reduction', text: `Night-flow reduction: ${view.body.weightCautions[0]}` })
    const equal = await analyst.get(`/api/quantities/${quantityId}/reconciliation?roundId=${roundId}`).expect(200)
    expect(equal.body.calibration.questionCount).toBe(10)
  })

  it('records a hand adjustment only with a reason, and fits an agreed consensus', async () => {
    const noReason = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
      roundId, method: 'linear', weights: 'equal', family: 'normal', distribution: { family: 'normal', mu: 12, sigma: 3 }, version: 2,
    })
    expect(noReason.body.error.fields).toEqual({ adjustReason: 'Say why you adjusted the parameters by hand' })
    const badParams = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
      roundId, method: 'linear', weights: 'equal', family: 'normal', distribution: { family: 'normal', mu: 12, sigma: -3 }, adjustReason: 'Rounded for reporting purposes', version: 2,
    })
    expect(badParams.status).toBe(400)
    const consensus = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
      roundId, method: 'consensus', family: 'normal', version: 2,
      consensus: { points: [{ value: 11, prob: 0.5 - 0.25 }, { value: 12, prob: 0.5 }, { value: 13, prob: 0.75 }], participants: 'Both experts and the analyst', notes: 'Agreed after discussing district KV-07.' },
    })
    expect(consensus.status).toBe(200)
    expect(consensus.body.saved.distribution.mu).toBeCloseTo(12, 6)
    // Its 90 % interval (about 9.56–14.44) is wider than the spread of the experts' medians (10 to 14 = 4): no warning.
    expect(consensus.body.consensusCheck.narrow).toBe(false)
    expect(consensus.body.consensusCheck.spread).toBeCloseTo(4, 6)
  })
})
