import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { dirichletFromMarginals, type Distribution } from '../../shared/stats/index'
import { Client, signedIn, startApi, Z75, type ApiHarness } from '../support/api'

let h: ApiHarness
let analyst: Client
let expert1: Client
let reviewer: Client
let studyId: number
let otherStudyId: number
const ids: Record<string, number> = {}

const question = (what: string) => `Of the households in the Kestrel Valley pilot area, what share would ${what}?`

async function quantity(study: number, symbol: string, name: string, kind = 'proportion'): Promise<number> {
  return (await analyst.post(`/api/studies/${study}/quantities`, { name, symbol, question: question(name.toLowerCase()), support: { kind } }).expect(201)).body.id
}

async function auditOf(subject: string): Promise<{ action: string; details: Record<string, unknown> }[]> {
  return h.db('audit_events').where({ subject }).orderBy('id').select('action', 'details')
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  expert1 = await signedIn(h, 'expert1@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'joint: composition study', context: 'Household uptake of the leak-alert scheme.' }).expect(201)).body.id
  otherStudyId = (await analyst.post('/api/studies', { title: 'joint: another study', context: 'A second study for cross-study checks.' }).expect(201)).body.id
  const users = (await analyst.get('/api/users/directory').expect(200)).body as { id: number; email: string }[]
  for (const [email, studyRole] of [['expert1@kestrel.example', 'expert'], ['reviewer@kestrel.example', 'reviewer']])
    await analyst.post(`/api/studies/${studyId}/members`, { userId: users.find((u) => u.email === email)!.id, studyRole }).expect(201)
  ids.alerts = await quantity(studyId, 'p_alerts', 'Join the leak-alert scheme')
  ids.meter = await quantity(studyId, 'p_meter', 'Ask for a smart meter only')
  ids.none = await quantity(studyId, 'p_none', 'Decline both offers')
  ids.flow = await quantity(studyId, 'flow', 'Night-flow reduction', 'real')
  ids.foreign = await quantity(otherStudyId, 'p_foreign', 'Join in the other study')
})
afterAll(async () => {
  await h.close()
})

describe('compositions', () => {
  let compositionId: number

  it('creates a composition of ordered shares, lists it for every member, and audits it in the same transaction', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/compositions`, {
      name: 'Household uptake', wording: 'How the pilot area’s households split between the three answers to the offer.', quantityIds: [ids.none, ids.alerts, ids.meter],
    })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ studyId, name: 'Household uptake', residual: false, residualLabel: '', version: 1 })
    expect(res.body.shares).toEqual([
      { quantityId: ids.none, name: 'Decline both offers', symbol: 'p_none', position: 1 },
      { quantityId: ids.alerts, name: 'Join the leak-alert scheme', symbol: 'p_alerts', position: 2 },
      { quantityId: ids.meter, name: 'Ask for a smart meter only', symbol: 'p_meter', position: 3 },
    ])
    compositionId = res.body.id
    for (const c of [expert1, reviewer]) {
      const list = (await c.get(`/api/studies/${studyId}/compositions`).expect(200)).body
      expect(list.map((x: { id: number }) => x.id)).toEqual([compositionId])
    }
    expect((await expert1.get(`/api/compositions/${compositionId}`).expect(200)).body.shares.map((s: { symbol: string }) => s.symbol)).toEqual(['p_none', 'p_alerts', 'p_meter'])
    const events = await auditOf(`composition:${compositionId}`)
    expect(events).toEqual([{ action: 'composition.create', details: { name: 'Household uptake', quantityIds: [ids.none, ids.alerts, ids.meter], residual: false } }])
  })

  it('gives the "other" share a label, "Other" when none is given', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/compositions`, {
      name: 'joint: uptake with rest', wording: 'Shares of households, the rest doing something else.', quantityIds: [ids.alerts, ids.meter], residual: true,
    }).expect(201)
    expect(res.body).toMatchObject({ residual: true, residualLabel: 'Other' })
    const named = await analyst.patch(`/api/compositions/${res.body.id}`, {
      name: 'joint: uptake with rest', wording: 'Shares of households, the rest doing something else.', quantityIds: [ids.alerts, ids.meter], residual: true, residualLabel: 'Undecided', version: 1,
    }).expect(200)
    expect(named.body).toMatchObject({ residual: true, residualLabel: 'Undecided', version: 2 })
    await analyst.delete(`/api/compositions/${res.body.id}`).expect(204)
  })

  const body = (quantityIds: unknown) => ({ name: 'joint: bad', wording: 'Shares that should not be saved at all.', quantityIds })
  it.each([
    ['one share', () => [ids.alerts], 'Choose 2 to 10 quantities as shares'],
    ['eleven shares', () => Array.from({ length: 11 }, (_, i) => ids.alerts + i), 'Choose 2 to 10 quantities as shares'],
    ['no shares', () => [], 'Choose 2 to 10 quantities as shares'],
    ['a quantity twice', () => [ids.alerts, ids.meter, ids.alerts], 'Each quantity can be a share only once'],
    ['a quantity not on the proportion scale', () => [ids.alerts, ids.flow], '“Night-flow reduction” is not a proportion. Only quantities on the proportion scale (between 0 and 1) can be shares.'],
    ['a quantity of another study', () => [ids.alerts, ids.foreign], 'This quantity does not belong to this study'],
    ['a quantity that does not exist', () => [ids.alerts, 2_000_000_000], 'This quantity does not belong to this study'],
  ])('refuses %s with a field error and saves nothing', async (_, quantityIds, message) => {
    const before = await h.db('compositions').where({ study_id: studyId }).count('* as n').first()
    const res = await analyst.post(`/api/studies/${studyId}/compositions`, body(quantityIds()))
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ quantityIds: message })
    expect(await h.db('compositions').where({ study_id: studyId }).count('* as n').first()).toEqual(before)
  })

  it('refuses missing name and wording per field', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/compositions`, { quantityIds: [ids.alerts, ids.meter] })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ name: 'Enter a name', wording: 'Say what the shares are shares of, as experts will read it' })
  })

  it('a bad edit changes nothing: the shares and version stay as saved', async () => {
    const res = await analyst.patch(`/api/compositions/${compositionId}`, { ...body([ids.alerts, ids.flow]), version: 1 })
    expect(res.status).toBe(400)
    const kept = (await analyst.get(`/api/compositions/${compositionId}`).expect(200)).body
    expect(kept).toMatchObject({ name: 'Household uptake', version: 1 })
    expect(kept.shares.map((s: { quantityId: number }) => s.quantityId)).toEqual([ids.none, ids.alerts, ids.meter])
  })

  it('reorders shares with the version seen, audits before and after, and answers 409 to a stale edit', async () => {
    const next = { name: 'Household uptake', wording: 'How the pilot area’s households split between the three answers to the offer.', quantityIds: [ids.alerts, ids.meter, ids.none] }
    const res = await analyst.patch(`/api/compositions/${compositionId}`, { ...next, version: 1 }).expect(200)
    expect(res.body.version).toBe(2)
    expect(res.body.shares.map((s: { symbol: string }) => s.symbol)).toEqual(['p_alerts', 'p_meter', 'p_none'])
    const stale = await analyst.patch(`/api/compositions/${compositionId}`, { ...next, quantityIds: [ids.meter, ids.none], version: 1 })
    expect(stale.status).toBe(409)
    expect((await analyst.get(`/api/compositions/${compositionId}`)).body.shares).toHaveLength(3)
    const update = (await auditOf(`composition:${compositionId}`)).find((e) => e.action === 'composition.update')
    expect(update?.details).toEqual({
      before: { name: 'Household uptake', quantityIds: [ids.none, ids.alerts, ids.meter], residual: false },
      after: { name: 'Household uptake', quantityIds: [ids.alerts, ids.meter, ids.none], residual: false },
    })
  })

  it('keeps a share on the proportion scale: its support cannot change while it is in a composition', async () => {
    const q = (await analyst.get(`/api/quantities/${ids.meter}`).expect(200)).body
    const res = await analyst.patch(`/api/quantities/${ids.meter}`, { name: q.name, symbol: q.symbol, question: q.question, support: { kind: 'positive' }, version: q.version })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ support: 'This quantity is a share of “Household uptake”: take it out of that composition before changing its scale' })
    expect((await analyst.get(`/api/quantities/${ids.meter}`)).body.support).toEqual({ kind: 'proportion' })
  })

  it('refuses writes to experts and reviewers, and reads to non-members', async () => {
    for (const c of [expert1, reviewer]) {
      expect((await c.post(`/api/studies/${studyId}/compositions`, body([ids.alerts, ids.meter]))).status).toBe(403)
      expect((await c.delete(`/api/compositions/${compositionId}`)).status).toBe(403)
    }
    const outsider = await signedIn(h, 'expert3@kestrel.example')
    expect((await outsider.get(`/api/compositions/${compositionId}`)).status).toBe(403)
    expect((await outsider.get(`/api/studies/${studyId}/compositions`)).status).toBe(403)
  })

  it('deletes a composition with its audit event, leaving its quantities', async () => {
    const extra = (await analyst.post(`/api/studies/${studyId}/compositions`, { ...body([ids.alerts, ids.meter]), name: 'joint: to delete' }).expect(201)).body
    await analyst.delete(`/api/compositions/${extra.id}`).expect(204)
    expect((await analyst.get(`/api/compositions/${extra.id}`)).status).toBe(404)
    expect(await h.db('composition_shares').where({ composition_id: extra.id })).toEqual([])
    expect((await analyst.get(`/api/quantities/${ids.alerts}`)).status).toBe(200)
    expect((await auditOf(`composition:${extra.id}`)).map((e) => e.action)).toEqual(['composition.create', 'composition.delete'])
  })
})

describe('the joint prior of a composition (Dirichlet from the reconciled shares)', () => {
  let wholeId: number
  let roundId: number
  const uptake: Record<string, number> = {}
  /** An expert's quartile answer for a share with median m and spread s (constructed values). */
  const answer = (m: number, s: number) => ({ method: 'quantile', lower: Math.max(0.01, m - 4 * s), upper: Math.min(0.99, m + 4 * s), points: [{ value: m - s * Z75, prob: 0.25 }, { value: m, prob: 0.5 }, { value: m + s * Z75, prob: 0.75 }], rationale: 'Uptake of similar offers in two neighbouring boards.', version: 0 })

  beforeAll(async () => {
    for (const [symbol, name] of [['u_join', 'Join (joint prior)'], ['u_meter', 'Meter only (joint prior)'], ['u_decline', 'Decline (joint prior)']])
      uptake[symbol] = await quantity(studyId, symbol, name)
    wholeId = (await analyst.post(`/api/studies/${studyId}/compositions`, {
      name: 'Household uptake (joint prior)', wording: 'How households answer the offer, in three shares.', quantityIds: Object.values(uptake),
    }).expect(201)).body.id
    roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
      title: 'joint: uptake shares', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
      askCalibration: false, items: Object.values(uptake).map((quantityId) => ({ quantityId, method: 'quantile' })),
    }).expect(201)).body.id
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert1@kestrel.example', name: 'Expert 1' }).expect(201)
    await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
    await expert1.put(`/api/rounds/${roundId}/declaration`, { expertise: 'Twenty years of customer surveys at the Board.', interests: 'none', interestsText: '', seenPilotData: false }).expect(200)
    for (const [symbol, [m, sd]] of Object.entries({ u_join: [0.3, 0.06], u_meter: [0.2, 0.05], u_decline: [0.5, 0.07] }))
      await expert1.put(`/api/rounds/${roundId}/judgements/${uptake[symbol]}`, answer(m, sd)).expect(200)
    await expert1.post(`/api/rounds/${roundId}/submit`).expect(200)
  }, 60_000)

  async function reconcile(quantityId: number): Promise<Distribution> {
    const res = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
      roundId, method: 'linear', weights: 'equal', family: 'beta', reconciled: true, version: 0, rationale: 'One expert answered; the beta fits the answer closely.',
    }).expect(200)
    return res.body.saved.distribution
  }

  it('waits for every share to be reconciled, naming those still open', async () => {
    await reconcile(uptake.u_join)
    const res = await analyst.get(`/api/compositions/${wholeId}/dirichlet`).expect(200)
    expect(res.body).toMatchObject({ compositionId: wholeId, symbol: 'household_uptake_joint_prior', fit: null, problem: null, modelCode: [] })
    expect(res.body.waitingFor).toEqual(['Meter only (joint prior)', 'Decline (joint prior)'])
    expect(res.body.shares.map((s: { prior: unknown }) => s.prior !== null)).toEqual([true, false, false])
  })

  it('fits the Dirichlet to the reconciled priors once all are in, with the mismatch per share and model code that reads back', async () => {
    await reconcile(uptake.u_meter)
    await reconcile(uptake.u_decline)
    const finals = await Promise.all(Object.values(uptake).map(async (id) => (await analyst.get(`/api/quantities/${id}/reconciliation`).expect(200)).body.saved.distribution as Distribution))
    expect(finals.map((d) => d.family)).toEqual(['beta', 'beta', 'beta'])
    const res = await reviewer.get(`/api/compositions/${wholeId}/dirichlet`).expect(200)
    const engine = dirichletFromMarginals(finals)
    expect(res.body.waitingFor).toEqual([])
    expect(res.body.fit).toEqual(JSON.parse(JSON.stringify(engine)))
    // Means in proportion to the reconciled means (constructed answers add up to about 1).
    const sumAlpha = engine.alpha.reduce((a, b) => a + b, 0)
    expect(res.body.fit.meanSum).toBeGreaterThan(0.95)
    expect(res.body.fit.meanSum).toBeLessThan(1.05)
    res.body.shares.forEach((s: { alpha: number; elicitedMean: number; marginal: Distribution; mismatch: number }, i: number) => {
      expect(s.alpha).toBe(engine.alpha[i])
      expect(s.alpha / sumAlpha).toBeCloseTo(s.elicitedMean / engine.meanSum, 12)
      expect(s.marginal).toEqual({ family: 'beta', alpha: engine.alpha[i], beta: sumAlpha - engine.alpha[i] })
      expect(s.mismatch).toBe(engine.mismatch[i])
    })
    expect(res.body.modelCode.map((m: { language: string; check: { ok: boolean } }) => [m.language, m.check.ok])).toEqual([['stan', true], ['pymc', true], ['jags', true], ['brms', true]])
    expect(res.body.modelCode[0].code).toMatch(/^\/\/ household_uptake_joint_prior: shares in order: u_join, u_meter, u_decline\nhousehold_uptake_joint_prior ~ dirichlet\(\[/)
  })

  it('refuses the joint prior to experts', async () => {
    expect((await expert1.get(`/api/compositions/${wholeId}/dirichlet`)).status).toBe(403)
  })

  describe('pilot counts and the impact of the joint prior', () => {
    const csvColumns = 'district,joined,meter_only,declined\nKV-01,31,17,52\nKV-02,28,22,50\n'
    const upload = (body: object) => analyst.post(`/api/compositions/${wholeId}/datasets`, { name: 'joint: survey 2026', filename: 'survey.csv', ...body })

    it('stores counts with one column per share, or one answer per row, in the shares\' order', async () => {
      const byColumn = await upload({ csv: csvColumns, layout: 'columns', categoryColumns: ['joined', 'meter_only', 'declined'] }).expect(201)
      expect(byColumn.body).toMatchObject({ compositionId: wholeId, version: 1, rowCount: 2, summary: { rows: 2, n: 200, description: 'joined 59, meter_only 39, declined 102 (200 in all)' } })
      const byRow = await upload({ csv: 'household,answer\n1,yes\n2,no\n3,meter\n4,yes\n', layout: 'rows', categoryColumn: 'answer', categories: ['yes', 'meter', 'no'] }).expect(201)
      expect(byRow.body).toMatchObject({ version: 2, summary: { n: 4, description: 'yes 2, meter 1, no 1 (4 in all)' } })
      const list = (await reviewer.get(`/api/compositions/${wholeId}/datasets`).expect(200)).body
      expect(list.map((d: { version: number }) => d.version)).toEqual([2, 1])
      expect((await auditOf(`composition:${wholeId}`)).filter((e) => e.action === 'composition.dataset-upload')).toHaveLength(2)
    })

    it.each([
      ['a column too few', { csv: csvColumns, layout: 'columns', categoryColumns: ['joined', 'declined'] }, 'categoryColumns', 'Give one column for each of the 3 shares: Join (joint prior), Meter only (joint prior), Decline (joint prior)'],
      ['one column for two shares', { csv: csvColumns, layout: 'columns', categoryColumns: ['joined', 'joined', 'declined'] }, 'categoryColumns', 'Each share needs its own column'],
      ['a count that is not a whole number', { csv: 'joined,meter_only,declined\n3,2.5,1\n', layout: 'columns', categoryColumns: ['joined', 'meter_only', 'declined'] }, 'csv', expect.stringMatching(/^Line 2, column "meter_only"/)],
      ['an answer that is no share', { csv: 'answer\nyes\nperhaps\n', layout: 'rows', categoryColumn: 'answer', categories: ['yes', 'meter', 'no'] }, 'csv', expect.stringContaining('found "perhaps"')],
      ['no layout', { csv: csvColumns }, 'layout', 'Choose how the file records the shares'],
    ])('refuses %s with a field error and stores nothing', async (_, body, field, message) => {
      const before = await h.db('composition_datasets').where({ composition_id: wholeId }).count('* as n').first()
      const res = await upload(body)
      expect(res.status).toBe(400)
      expect(res.body.error.fields[field]).toEqual(message)
      expect(await h.db('composition_datasets').where({ composition_id: wholeId }).count('* as n').first()).toEqual(before)
    })

    it('runs the Dirichlet on the counts against the flat Dirichlet, keeps the result and audits it', async () => {
      const [dataset] = (await analyst.get(`/api/compositions/${wholeId}/datasets`).expect(200)).body.filter((d: { version: number }) => d.version === 1)
      expect((await reviewer.get(`/api/compositions/${wholeId}/impact`).expect(200)).body).toEqual({ analysis: null })
      const res = await analyst.post(`/api/compositions/${wholeId}/impact`, { datasetId: dataset.id }).expect(201)
      const prior = (await analyst.get(`/api/compositions/${wholeId}/dirichlet`).expect(200)).body
      const r = res.body.result
      expect(r.prior.alpha).toEqual(prior.fit.alpha)
      expect(r.prior.analysis.posteriorAlpha).toEqual(prior.fit.alpha.map((a: number, j: number) => a + [59, 39, 102][j]))
      expect(r.comparison.alpha).toEqual([1, 1, 1])
      expect(r.bayesFactor.logBF).toBeCloseTo(r.prior.analysis.logEvidence - r.comparison.analysis.logEvidence, 12)
      expect(r.sweep.points.map((p: { factor: number }) => p.factor)).toEqual([0.25, 0.35, 0.5, 0.71, 1, 1.41, 2, 2.83, 4, 5.66, 8])
      expect(res.body).toMatchObject({ datasetId: dataset.id, datasetVersion: 1, datasetName: 'joint: survey 2026' })
      expect((await reviewer.get(`/api/compositions/${wholeId}/impact`).expect(200)).body.analysis.id).toBe(res.body.id)
      expect((await auditOf(`composition:${wholeId}`)).at(-1)?.action).toBe('composition.impact')
    })

    it('refuses a dataset of another composition, and experts', async () => {
      const other = (await analyst.post(`/api/studies/${studyId}/compositions`, { name: 'joint: other whole', wording: 'Another split of the same households.', quantityIds: [ids.alerts, ids.meter] }).expect(201)).body
      const [dataset] = (await analyst.get(`/api/compositions/${wholeId}/datasets`).expect(200)).body
      const res = await analyst.post(`/api/compositions/${other.id}/impact`, { datasetId: dataset.id })
      expect(res.status).toBe(400)
      expect(res.body.error.fields).toEqual({ datasetId: 'Choose a dataset of this composition' })
      expect((await expert1.post(`/api/compositions/${wholeId}/impact`, { datasetId: dataset.id })).status).toBe(403)
    })

    it('answers 409 while a share still waits for reconciliation', async () => {
      const waiting = (await analyst.post(`/api/studies/${studyId}/compositions`, { name: 'joint: waiting whole', wording: 'Shares not reconciled yet.', quantityIds: [ids.alerts, ids.meter] }).expect(201)).body
      const d = (await analyst.post(`/api/compositions/${waiting.id}/datasets`, { name: 'joint: two shares', filename: 'two.csv', csv: 'a,b\n3,4\n', layout: 'columns', categoryColumns: ['a', 'b'] }).expect(201)).body
      const res = await analyst.post(`/api/compositions/${waiting.id}/impact`, { datasetId: d.id })
      expect(res.status).toBe(409)
      expect(res.body.error.message).toBe('Reconcile every share first; still to reconcile: Join the leak-alert scheme, Ask for a smart meter only')
    })
  })
})
