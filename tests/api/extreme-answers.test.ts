import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedIn, startApi, type ApiHarness, type Client } from '../support/api'
import { runImpact } from '../support/impact'

let h: ApiHarness
let analyst: Client
let experts: Client[]
let studyId: number
let quantityId: number
let roundId: number
let datasetId: number
const expertIds: number[] = []

const quantile = (lower: number, upper: number, q: [number, number, number], version: number, rationale = 'Pressure logs of the last three winters.') => ({
  method: 'quantile', lower, upper, points: [{ value: q[0], prob: 0.25 }, { value: q[1], prob: 0.5 }, { value: q[2], prob: 0.75 }], rationale, version,
})

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  experts = [await signedIn(h, 'expert1@kestrel.example'), await signedIn(h, 'expert2@kestrel.example'), await signedIn(h, 'expert3@kestrel.example')]
  for (const e of experts) expertIds.push((await e.get('/api/auth/me')).body.id)
  studyId = (await analyst.post('/api/studies', { title: 'Extreme answers study', context: 'Answers at the edge of the number range.' }).expect(201)).body.id
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night flow change', symbol: 'dflow', unit: 'L/s', question: 'Change of night flow in district KV-07 after the valve works?', support: { kind: 'real' },
  }).expect(201)).body.id
  roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'Edge round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 86400e3).toISOString(),
    items: [{ quantityId, method: 'quantile' }], askCalibration: false,
  }).expect(201)).body.id
  for (const email of ['expert1@kestrel.example', 'expert2@kestrel.example', 'expert3@kestrel.example']) {
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email, name: email.slice(0, 7) }).expect(201)
  }
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
  datasetId = (await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantityId)).field('name', 'Pilot').field('model', 'normal-known-sigma').field('valueColumn', 'v').field('sigma', '2')
    .attach('file', Buffer.from('v\n2.2\n3.5\n2.8\n3.9\n2.6\n'), { filename: 'p.csv', contentType: 'text/csv' }).expect(201)).body.id
})
afterAll(async () => {
  await h.close()
})

describe('answers with values at the edge of the number range', () => {
  it('bounds at ±1.79e308: 400 with a plain message, and the saved draft is kept', async () => {
    const e = experts[0]
    const saved = await e.put(`/api/rounds/${roundId}/judgements/${quantityId}`, quantile(-10, 20, [0, 3, 6], 0)).expect(200)
    expect(saved.body.fits.length).toBeGreaterThan(0)
    for (const q of [[-1e308, 0, 1e308], [-1.78e308, -1.75e308, -1.72e308]] as [number, number, number][]) {
      const res = await e.put(`/api/rounds/${roundId}/judgements/${quantityId}`, quantile(-1.79e308, 1.79e308, q, 1))
      expect(res.status, JSON.stringify(q)).toBe(400)
      expect(res.body.error.fields.points).toMatch(/^No distribution can be fitted to values this large/)
    }
    const stored = await h.db('judgements').where({ round_id: roundId, quantity_id: quantityId, expert_id: expertIds[0] }).first()
    expect(stored.version).toBe(1)
    expect(stored.answer).toMatchObject({ lower: -10, upper: 20 })
  })

  it('no stored fit of any answer is improper: finite parameters, positive widths, lower below upper', async () => {
    const rows = await h.db('judgements').where({ round_id: roundId }).select('fits')
    for (const { fits } of rows) {
      for (const { distribution: d } of fits as { distribution: Record<string, number | string> }[]) {
        for (const [k, v] of Object.entries(d)) if (k !== 'family') expect(Number.isFinite(v), `${d.family}.${k}`).toBe(true)
        if ('lower' in d) expect(d.lower).toBeLessThan(d.upper as number)
      }
    }
  })
})

describe('impact analysis with an expert that cannot be computed with', () => {
  it('answers 400 naming the expert (never 500), and leaves the expert out on request, saying so', async () => {
    await experts[0].post(`/api/rounds/${roundId}/submit`).expect(200)
    await experts[1].put(`/api/rounds/${roundId}/judgements/${quantityId}`, quantile(-5, 15, [1, 3, 5], 0)).expect(200)
    await experts[1].post(`/api/rounds/${roundId}/submit`).expect(200)
    await experts[2].put(`/api/rounds/${roundId}/judgements/${quantityId}`, quantile(-8, 12, [0, 2, 4], 0)).expect(200)
    await experts[2].post(`/api/rounds/${roundId}/submit`).expect(200)
    // A fit stored before fits were checked: a uniform of zero width, as the old code stored for ±1.79e308.
    const broken = [{ distribution: { family: 'uniform', lower: -1e308, upper: -1e308 }, sse: 0.375 }]
    await h.db('judgements').where({ round_id: roundId, quantity_id: quantityId, expert_id: expertIds[1] })
      .update({ fits: JSON.stringify(broken), chosen_family: 'uniform' })
    const comparison = { family: 'normal', mu: 0, sigma: 10 }
    const refused = await runImpact(analyst, quantityId, { datasetId, comparison })
    expect(refused.status).toBe(400)
    expect(Object.keys(refused.body.error.fields)).toEqual(['components[1]'])
    const left = await runImpact(analyst, quantityId, { datasetId, comparison, excludedExperts: [expertIds[1]] })
    expect(left.status, JSON.stringify(left.body)).toBe(200)
    expect(left.body.excludedExperts).toEqual([{ expertId: expertIds[1], label: 'Expert 2' }])
    expect(left.body.candidates.map((c: { label: string }) => c.label)).toEqual(['Expert 1', 'Expert 3', 'Pooled (linear, equal weights)', 'Comparison prior'])
  })

  it('a comparison prior too narrow to compute with, lognormal(700, 1e-300), answers 400 on the comparison field', async () => {
    const res = await runImpact(analyst, quantityId, { datasetId, comparison: { family: 'lognormal', meanlog: 700, sdlog: 1e-300 }, excludedExperts: [expertIds[1]] })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.comparison).toMatch(/too narrow for its location/)
  })
})
