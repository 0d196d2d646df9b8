import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzePrior, bayesFactor } from '../../shared/stats/index'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { check } from '../unit/stats/checks'
import outside from './fixtures/impact-checks.json'
import conflictFixture from '../unit/stats/fixtures/conflict.json'

let h: ApiHarness
let analyst: Client
let studyId: number
let flowId: number
let countsId: number
let shareId: number

const X = [2.2, 3.5, 2.8, 3.9, 2.6] // constructed pilot data: n = 5, mean 3.0 (the sample of tests/unit/stats/fixtures/checks.json)
const csv = (text: string) => Buffer.from(text, 'utf8')

function upload(fields: Record<string, string | number>, file: Buffer, filename = 'pilot.csv') {
  let req = analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
  for (const [k, v] of Object.entries(fields)) req = req.field(k, String(v))
  return req.attach('file', file, { filename, contentType: 'text/csv' })
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Impact test study', context: 'Testing pilot data and impact.' }).expect(201)).body.id
  const q = async (symbol: string, kind: string) => (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: symbol, symbol, unit: 'u', question: `What is ${symbol} for the Kestrel Valley network?`, support: { kind },
  }).expect(201)).body.id as number
  flowId = await q('flow', 'positive')
  countsId = await q('bursts', 'positive')
  shareId = await q('uptake', 'proportion')
})
afterAll(async () => {
  await h.close()
})

describe('pilot data uploads', () => {
  it('previews the first rows and the columns', async () => {
    const res = await analyst.agent.post(`/api/studies/${studyId}/datasets/preview`).set('x-csrf-token', analyst.token)
      .attach('file', csv('district,value\nA,1.5\nB,2.5\n'), { filename: 'p.csv', contentType: 'text/csv' })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ columns: ['district', 'value'], rows: [['A', '1.5'], ['B', '2.5']], rowCount: 2 })
  })

  it('stores a normal dataset with known σ, versioned per quantity', async () => {
    const body = `district,reduction\n${X.map((x, i) => `D${i},${x}`).join('\n')}\n`
    const first = await upload({ quantityId: flowId, name: 'Pilot districts', model: 'normal-known-sigma', valueColumn: 'reduction', sigma: 2 }, csv(body))
    expect(first.status).toBe(201)
    expect(first.body).toMatchObject({ version: 1, model: 'normal-known-sigma', rowCount: 5, data: { model: 'normal-known-sigma', sigma: 2, values: X } })
    expect(first.body.preview[0]).toEqual(['district', 'reduction'])
    // The same file again (same SHA-256) is not stored silently: 409 naming the version already on file.
    const again = await upload({ quantityId: flowId, name: 'Pilot districts', model: 'normal-known-sigma', valueColumn: 'reduction', sigma: 2 }, csv(body))
    expect(again.status).toBe(409)
    expect(again.body.error).toMatchObject({
      code: 'duplicate-file', duplicateOfVersion: 1, duplicateOfName: 'Pilot districts',
      message: 'This file is the same as version 1 (“Pilot districts”) already stored for this quantity. Keep that version, or upload again with allowDuplicate to store it as a new version.',
    })
    expect(await h.db('pilot_datasets').where({ quantity_id: flowId })).toHaveLength(1)
    const second = await upload({ quantityId: flowId, name: 'Pilot districts', model: 'normal-known-sigma', valueColumn: 'reduction', sigma: 2, allowDuplicate: 'true' }, csv(body))
    expect(second.status).toBe(201)
    expect(second.body.version).toBe(2)
  })

  it('adds up decimal exposures exactly: the burst logs total 8 exposure units, not 7.999999999999999', async () => {
    // Exposures written with two decimals, as in the demo burst logs; their floating-point sum is 7.999999999999999.
    const text = 'district,bursts,exposure\nKV-01,11,1.10\nKV-02,7,0.85\nKV-03,16,1.40\nKV-04,9,0.95\nKV-05,13,1.25\nKV-06,5,0.60\nKV-07,12,1.05\nKV-08,8,0.80\n'
    const res = await upload({ quantityId: countsId, name: 'Burst logs (sum check)', model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }, csv(text))
    expect(res.status).toBe(201)
    expect(res.body.summary.n).toBe(8)
    expect(res.body.summary.description).toBe('81 events over 8 exposure units')
    const run = await analyst.post(`/api/quantities/${countsId}/impact`, { datasetId: res.body.id, comparison: { family: 'gamma', shape: 1, rate: 0.1 } })
    expect(run.status).toBe(200)
    expect(run.body.n).toBe(8)
  })

  it('reads a 0/1 column as binomial successes and trials', async () => {
    const res = await upload({ quantityId: shareId, name: 'Survey', model: 'binomial', binomialLayout: 'binary', binaryColumn: 'joins' }, csv('id,joins\n1,1\n2,0\n3,1\n4,0\n5,0\n'))
    expect(res.status).toBe(201)
    expect(res.body.data).toEqual({ model: 'binomial', successes: 2, trials: 5, rows: { successes: [1, 0, 1, 0, 0], trials: [1, 1, 1, 1, 1] } })
  })

  const badFiles: [string, Record<string, string | number>, string, string][] = [
    ['wrong delimiter', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }, 'district;bursts;exposure\nA;3;1.2\n',
      'Line 1: The file has a single column; its lines look separated by semicolons. Choose that delimiter, or save the file with the one chosen.'],
    ['missing column', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'km_years' }, 'district,bursts,exposure\nA,3,1.2\n',
      'Line 1: There is no column "km_years". The columns are: "district", "bursts", "exposure".'],
    ['non-numeric cell', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }, 'district,bursts,exposure\nA,3,1.2\nB,three,0.9\n',
      'Line 3, column "bursts": expected a number, found "three"'],
    ['negative count', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }, 'district,bursts,exposure\nA,-2,1.2\n',
      'Line 2, column "bursts": expected a whole number 0 or more, found "-2"'],
    ['successes above trials', { model: 'binomial', binomialLayout: 'counts', successesColumn: 's', trialsColumn: 't' }, 's,t\n3,10\n12,10\n',
      'Line 3, column "s": 12 successes is more than the 10 trials on this line'],
    ['header only', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }, 'district,bursts,exposure\n',
      'Line 2: The file has a header but no data rows.'],
  ]
  for (const [name, fields, text, message] of badFiles) {
    it(`refuses a file with a ${name}, with a located message, storing nothing`, async () => {
      const before = (await h.db('pilot_datasets').where({ quantity_id: countsId })).length
      const res = await upload({ quantityId: countsId, name: 'Burst logs', ...fields }, csv(text))
      expect(res.status).toBe(400)
      expect(res.body.error.fields).toEqual({ file: message })
      expect(await h.db('pilot_datasets').where({ quantity_id: countsId })).toHaveLength(before)
    })
  }

  it('refuses every line whose field count differs from the header, with its line and column as data', async () => {
    const fields = { quantityId: countsId, name: 'Burst logs', model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }
    const before = (await h.db('pilot_datasets').where({ quantity_id: countsId })).length
    // An exposure written with a thousands separator splits into an extra field on line 3.
    const extra = await upload(fields, csv('district,bursts,exposure\nKV-01,11,1.10\nEast,4,1,250.5\nKV-03,16,1.40\n'))
    expect(extra.status).toBe(400)
    expect(extra.body.error).toMatchObject({ line: 3, column: 4, fields: { file: 'Line 3: expected 3 fields like the header, found 4.' } })
    // A short line after a blank line and a quoted value spanning two lines keeps its own line number.
    const short = await upload(fields, csv('district,bursts,exposure\n"KV\n01",11,1.10\n\nKV-02,7\n'))
    expect(short.status).toBe(400)
    expect(short.body.error).toMatchObject({ line: 5, column: 3, fields: { file: 'Line 5: expected 3 fields like the header, found 2.' } })
    const cell = await upload(fields, csv('district,bursts,exposure\nA,3,1.2\nB,three,0.9\n'))
    expect(cell.body.error).toMatchObject({ line: 3, column: 2 })
    expect(await h.db('pilot_datasets').where({ quantity_id: countsId })).toHaveLength(before)
    const preview = await analyst.agent.post(`/api/studies/${studyId}/datasets/preview`).set('x-csrf-token', analyst.token)
      .attach('file', csv('a,b\n1,2\n3,4,5\n'), { filename: 'p.csv', contentType: 'text/csv' })
    expect(preview.status).toBe(400)
    expect(preview.body.error).toMatchObject({ line: 3, column: 3 })
  })

  it('refuses an empty file and one over 2 MB', async () => {
    const fields = { quantityId: countsId, name: 'Burst logs', model: 'poisson', countColumn: 'bursts', exposureColumn: 'exposure' }
    const empty = await upload(fields, Buffer.alloc(0))
    expect(empty.body.error.fields).toEqual({ file: 'The file is empty.' })
    const big = await upload(fields, Buffer.alloc(2 * 1024 * 1024 + 1, 0x31))
    expect(big.body.error.fields).toEqual({ file: 'Pilot data files may be at most 2 MB.' })
  })

  it('answers 400 with field errors for a bad mapping form', async () => {
    const res = await upload({ quantityId: countsId, name: '', model: 'normal-known-sigma', valueColumn: 'x', sigma: -1 }, csv('x\n1\n'))
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ name: 'Name the dataset', sigma: 'σ must be above 0' })
  })
})

describe('impact analysis', () => {
  let datasetId: number
  beforeAll(async () => {
    datasetId = (await h.db('pilot_datasets').where({ quantity_id: flowId, version: 1 }).first('id')).id
    // The analyst's reconciled prior: U(0, 10) on the mean (docs/methods/width-sweep.md).
    await h.db('reconciliations').insert({
      quantity_id: flowId, method: 'linear', weights_mode: 'equal', family: 'uniform', distribution: JSON.stringify({ family: 'uniform', lower: 0, upper: 10 }),
      status: 'reconciled', rationale: 'Test fixture: a flat prior over the plausible range.',
    })
  })

  it('stores the engine’s values: U(0,10) against a 4× wider comparison prior gives BF 4, posterior unchanged (WIDTH-uniform, mpmath)', async () => {
    const res = await analyst.post(`/api/quantities/${flowId}/impact`, {
      datasetId, comparison: { family: 'uniform', lower: 0, upper: 40 }, decision: { direction: 'above', threshold: 2.5, probability: 0.8 },
    })
    expect(res.status).toBe(200)
    expect(res.body.cached).toBe(false)
    const rec = res.body.candidates.find((c: { kind: string }) => c.kind === 'reconciled')
    const ref = res.body.candidates.find((c: { kind: string }) => c.kind === 'comparison')
    const data = { model: 'normal-known-sigma' as const, sigma: 2, values: X }
    const engine = analyzePrior({ family: 'uniform', lower: 0, upper: 10 }, data)
    expect(rec.logEvidence).toBe(engine.logEvidence)
    expect(rec.posterior).toEqual(engine.posterior)
    // Outside values: WIDTH-uniform of tests/unit/stats/fixtures/checks.json (closed form at 40 digits, mpmath).
    const width = check('WIDTH-uniform').expected.table
    expect(rec.logEvidence).toBeCloseTo(width['10'].log_ml, 9)
    expect(ref.logEvidence).toBeCloseTo(width['40'].log_ml, 9)
    expect(Math.exp(rec.bayesFactor.logBF)).toBeCloseTo(4, 10)
    expect(rec.bayesFactor.twoLnBF).toBeCloseTo(2.77258872224, 9)
    expect(rec.bayesFactor.label).toBe(bayesFactor(engine.logEvidence, ref.logEvidence).label)
    expect(rec.bayesFactor.label).toMatch(/^positive/)
    expect(rec.posterior.mean).toBeCloseTo(width['10'].post_mean, 9)
    expect(rec.flags).toContain('prior-driven-bayes-factor')
    expect(res.body.sweep.priorDriven).toBe(true)
    // Over k in [0.5, 2] the sweep spans U(0, 5) to U(0, 20); U(0, 5) cuts off a little likelihood, so the ratio is just under 4.
    const z5 = analyzePrior({ family: 'uniform', lower: 0, upper: 5 }, data).logEvidence
    const z20 = analyzePrior({ family: 'uniform', lower: 0, upper: 20 }, data).logEvidence
    expect(res.body.sweep.evidenceRatio).toBeCloseTo(Math.exp(z5 - z20), 9)
    expect(res.body.sweep.evidenceRatio).toBeGreaterThan(3)
    expect(res.body.findings[0]).toBe('Widening the reconciled prior 4× moves the posterior mean from 3 to 3 (barely) and divides the evidence by about 4.')
    // P(μ > 2.5 | x) by scipy quad (fixtures/generate_impact_checks.py): 0.712 < 0.8, so the decision rule does not act.
    expect(rec.decision.probability).toBeCloseTo(outside.uniform_0_10_prob_mean_above_2_5, 8)
    expect(rec.decision.act).toBe(false)
    expect(res.body.tipping.centreNote).toBe('A centre shift is not defined for the uniform family here; the spread test still applies.')
  })

  it('returns the cached analysis for the same inputs', async () => {
    const again = await analyst.post(`/api/quantities/${flowId}/impact`, {
      datasetId, comparison: { family: 'uniform', lower: 0, upper: 40 }, decision: { direction: 'above', threshold: 2.5, probability: 0.8 },
    })
    expect(again.body.cached).toBe(true)
    expect((await h.db('impact_analyses').where({ quantity_id: flowId })).length).toBe(1)
  })

  it('flags a prior that conflicts with the data and one that dominates it', async () => {
    await h.db('reconciliations').where({ quantity_id: flowId }).update({ family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 10, sigma: 0.3 }) })
    const res = await analyst.post(`/api/quantities/${flowId}/impact`, { datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 } })
    const rec = res.body.candidates.find((c: { kind: string }) => c.kind === 'reconciled')
    // ESS = σ²/τ² = 4/0.09 ≈ 44.4 > n = 5 (Morita, Thall & Müller 2008); Box p for N(10, 0.3²): z = (3 − 10)/√(0.09 + 0.8) ≈ −7.4
    // (values from fixtures/generate_impact_checks.py, scipy).
    expect(rec.priorEss).toBeCloseTo(outside.normal_10_0_3.ess, 9)
    expect(rec.priorPredictiveP / outside.normal_10_0_3.box_p_two_sided).toBeCloseTo(1, 6)
    expect(rec.flags).toEqual(expect.arrayContaining(['prior-dominates', 'prior-data-conflict']))
    expect(res.body.findings.some((f: string) => f.startsWith('Reconciled prior: the prior carries more information than the pilot data'))).toBe(true)
  })

  it('adds a robust mixture whose evidence is the weighted sum of its parts', async () => {
    const res = await analyst.post(`/api/quantities/${flowId}/impact`, {
      datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 }, mixtureWeight: 0.2, mixtureWide: { family: 'normal', mu: 3, sigma: 20 },
    })
    const mix = res.body.candidates.find((c: { kind: string }) => c.kind === 'mixture')
    const rec = res.body.candidates.find((c: { kind: string }) => c.kind === 'reconciled')
    const ref = res.body.candidates.find((c: { kind: string }) => c.kind === 'comparison')
    const expected = Math.log(0.8 * Math.exp(rec.logEvidence) + 0.2 * Math.exp(ref.logEvidence))
    expect(mix.logEvidence).toBeCloseTo(expected, 10)
    expect(mix.label).toBe('Robust mixture (20 % on the wide component)')
    expect(ref.label).toBe('Comparison prior')
    // Outside values (scipy, fixtures/generate_impact_checks.py): the data outweigh N(10, 0.3²) by ~1e10, so the mixture's
    // posterior is the wide component's and its mean is 3.0000000006.
    const mixed = outside.mixture_0_8_normal_10_0_3_and_0_2_normal_3_20
    expect(mix.logEvidence).toBeCloseTo(mixed.log_evidence, 9)
    expect(mix.posterior.mean).toBeCloseTo(mixed.posterior_mean, 8)
  })

  it('refuses a dataset of another quantity and an invalid comparison prior, and is closed to experts', async () => {
    const other = (await h.db('pilot_datasets').where({ quantity_id: shareId }).first('id')).id
    const wrong = await analyst.post(`/api/quantities/${flowId}/impact`, { datasetId: other, comparison: { family: 'normal', mu: 0, sigma: 1 } })
    expect(wrong.body.error.fields).toEqual({ datasetId: 'Choose a dataset of this quantity' })
    const bad = await analyst.post(`/api/quantities/${flowId}/impact`, { datasetId, comparison: { family: 'normal', mu: 0, sigma: -1 } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields)[0]).toMatch(/^comparison/)
    const expert = await signedIn(h, 'expert1@kestrel.example')
    expect((await expert.post(`/api/quantities/${flowId}/impact`, { datasetId, comparison: { family: 'normal', mu: 0, sigma: 1 } })).status).toBe(403)
  })
})

// Outside values: tests/unit/stats/fixtures/conflict.json (mpmath at 50 digits, generate_conflict.py).
describe('strong prior–data conflict on the impact route', () => {
  const conflict = (model: string, family: string) => (conflictFixture.cases as { model: string; prior: { family: string; lower?: number }; logEvidence: number; logBoxP: number }[])
    .find((c) => c.model === model && c.prior.family === family && (family !== 'uniform' || c.prior.lower === 0))!
  /** A study of its own with one quantity and one uploaded dataset (a single Kestrel Valley district). */
  async function conflictDataset(kind: string, mapping: Record<string, string>, text: string) {
    const sid = (await analyst.post('/api/studies', { title: `engine conflict ${kind}`, context: 'Prior far from the data.' }).expect(201)).body.id
    const qid = (await analyst.post(`/api/studies/${sid}/quantities`, {
      name: `engine ${kind}`, symbol: 'q', unit: '', question: 'What is this quantity for the Kestrel Valley network?', support: { kind },
    }).expect(201)).body.id as number
    let req = analyst.agent.post(`/api/studies/${sid}/datasets`).set('x-csrf-token', analyst.token)
    for (const [k, v] of Object.entries({ quantityId: String(qid), name: `engine ${kind} data`, ...mapping })) req = req.field(k, v)
    const ds = await req.attach('file', csv(text), { filename: `engine-${kind}.csv`, contentType: 'text/csv' })
    expect(ds.status).toBe(201)
    return { qid, datasetId: ds.body.id as number }
  }

  it('answers 200 with the evidence, ln p and the conflict flag for a uniform(0, 0.01) prior and 900 of 1000', async () => {
    const { qid, datasetId } = await conflictDataset('proportion', { model: 'binomial', binomialLayout: 'counts', successesColumn: 'joined', trialsColumn: 'asked' }, 'district,joined,asked\nKV-01,900,1000\n')
    const res = await analyst.post(`/api/quantities/${qid}/impact`, { datasetId, comparison: { family: 'uniform', lower: 0, upper: 0.01 } })
    expect(res.status).toBe(200)
    const ref = res.body.candidates.find((c: { kind: string }) => c.kind === 'comparison')
    const expected = conflict('binomial', 'uniform')
    expect(ref.logEvidence).toBeCloseTo(expected.logEvidence, 6)
    expect(ref.logEvidence).toBeCloseTo(-3830.547298, 6)
    expect(ref.logPriorPredictiveP).toBeCloseTo(expected.logBoxP, 6)
    expect(ref.priorPredictiveP).toBe(0)
    expect(ref.flags).toContain('prior-data-conflict')
    expect(res.body.findings).toContain("Comparison prior: the pilot data sit in the tail of what this prior predicts (Box's prior predictive p is about 10^-1663, practically zero); prior and data conflict.")
  })

  it('answers 200 for a uniform(0, 1) prior on a rate against a count of 10,000', async () => {
    const { qid, datasetId } = await conflictDataset('positive', { model: 'poisson', countColumn: 'bursts', exposureColumn: 'km' }, 'district,bursts,km\nKV-01,10000,1\n')
    const res = await analyst.post(`/api/quantities/${qid}/impact`, { datasetId, comparison: { family: 'uniform', lower: 0, upper: 1 } })
    expect(res.status).toBe(200)
    const ref = res.body.candidates.find((c: { kind: string }) => c.kind === 'comparison')
    const expected = conflict('poisson', 'uniform')
    expect(ref.logEvidence).toBeCloseTo(expected.logEvidence, 6)
    expect(ref.logPriorPredictiveP).toBeCloseTo(expected.logBoxP, 6)
    expect(ref.flags).toContain('prior-data-conflict')
    expect(res.body.findings.some((f: string) => /10\^-35664, practically zero\); prior and data conflict\.$/.test(f))).toBe(true)
  })
})
