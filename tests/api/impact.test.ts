import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createAnalysisQueue } from '../../server/compute/analysis-queue'
import { analyzePrior, bayesFactor } from '../../shared/stats/index'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { check } from '../unit/stats/checks'
import outside from './fixtures/impact-checks.json'
import conflictFixture from '../unit/stats/fixtures/conflict.json'
import { runImpact } from '../support/impact'
import { waitFor } from '../support/wait'

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
    const run = await runImpact(analyst, countsId, { datasetId: res.body.id, comparison: { family: 'gamma', shape: 1, rate: 0.1 } })
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
    const res = await runImpact(analyst, flowId, {
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
    const again = await runImpact(analyst, flowId, {
      datasetId, comparison: { family: 'uniform', lower: 0, upper: 40 }, decision: { direction: 'above', threshold: 2.5, probability: 0.8 },
    })
    expect(again.body.cached).toBe(true)
    expect((await h.db('impact_analyses').where({ quantity_id: flowId })).length).toBe(1)
  })

  it('flags a prior that conflicts with the data and one that dominates it', async () => {
    await h.db('reconciliations').where({ quantity_id: flowId }).update({ family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 10, sigma: 0.3 }) })
    const res = await runImpact(analyst, flowId, { datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 } })
    const rec = res.body.candidates.find((c: { kind: string }) => c.kind === 'reconciled')
    // ESS = σ²/τ² = 4/0.09 ≈ 44.4 > n = 5 (Morita, Thall & Müller 2008); Box p for N(10, 0.3²): z = (3 − 10)/√(0.09 + 0.8) ≈ −7.4
    // (values from fixtures/generate_impact_checks.py, scipy).
    expect(rec.priorEss).toBeCloseTo(outside.normal_10_0_3.ess, 9)
    expect(rec.priorPredictiveP / outside.normal_10_0_3.box_p_two_sided).toBeCloseTo(1, 6)
    expect(rec.flags).toEqual(expect.arrayContaining(['prior-dominates', 'prior-data-conflict']))
    expect(res.body.findings.some((f: string) => f.startsWith('Reconciled prior: the prior carries more information than the pilot data'))).toBe(true)
  })

  it('adds a robust mixture whose evidence is the weighted sum of its parts', async () => {
    const res = await runImpact(analyst, flowId, {
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
    const wrong = await runImpact(analyst, flowId, { datasetId: other, comparison: { family: 'normal', mu: 0, sigma: 1 } })
    expect(wrong.body.error.fields).toEqual({ datasetId: 'Choose a dataset of this quantity' })
    const bad = await runImpact(analyst, flowId, { datasetId, comparison: { family: 'normal', mu: 0, sigma: -1 } })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields)[0]).toMatch(/^comparison/)
    const expert = await signedIn(h, 'expert1@kestrel.example')
    expect((await runImpact(expert, flowId, { datasetId, comparison: { family: 'normal', mu: 0, sigma: 1 } })).status).toBe(403)
  })
})

describe('impact analyses as jobs on the queue', () => {
  let datasetId: number
  beforeAll(async () => {
    datasetId = (await h.db('pilot_datasets').where({ quantity_id: flowId, version: 1 }).first('id')).id
  })
  const pick = (row: Record<string, unknown>) => ({ quantity_id: row.quantity_id, dataset_id: row.dataset_id, input: JSON.stringify(row.input), created_by: row.created_by, progress_total: row.progress_total })
  const body = (threshold: number) => ({ datasetId, comparison: { family: 'normal', mu: 3, sigma: 20 }, decision: { direction: 'above', threshold, probability: 0.8 } })

  it('answers at once with 202 and a queued job; the job, read at its Location, ends done with the analysis, stored once with one audit event', async () => {
    const res = await analyst.post(`/api/quantities/${flowId}/impact`, body(2.75))
    expect(res.status).toBe(202)
    expect(res.headers.location).toBe(`/api/impact-jobs/${res.body.id}`)
    // Each candidate prior (the reconciled one and the comparison prior) with its sensitivity, the fractional Bayes
    // factors, the 11 sweep widths with the two curves, the tipping point, and storing the result.
    const candidates = (await h.db('impact_jobs').where({ id: res.body.id }).first('task')).task.compute.candidates.length
    const total = 2 * candidates + 1 + 11 + 2 + 1 + 1
    expect(res.body).toMatchObject({ quantityId: flowId, state: 'queued', progress: { done: 0, total }, result: null, error: null, startedAt: null })
    const job = await waitFor('the job done', async () => {
      const read = (await analyst.get(res.headers.location).expect(200)).body
      return read.state === 'queued' || read.state === 'running' ? null : read
    })
    expect(job).toMatchObject({ id: res.body.id, state: 'done', progress: { done: total, total }, error: null })
    expect(job.result).toMatchObject({ cached: false, quantityId: flowId, decision: { threshold: 2.75 } })
    expect(job.result.candidates.map((c: { kind: string }) => c.kind)).toEqual(['reconciled', 'comparison'].slice(0, candidates))
    const stored = await h.db('impact_analyses').where({ job_id: res.body.id })
    expect(stored).toHaveLength(1)
    expect(job.result.id).toBe(stored[0].id)
    const events = await h.db('audit_events').where({ action: 'impact.run' }).whereRaw(`(details->>'analysisId')::int = ?`, [stored[0].id])
    expect(events).toHaveLength(1)
    expect(events[0].actor_id).toBe((await h.db('users').where({ email: 'analyst@kestrel.example' }).first('id')).id)
  })

  it('answers the same inputs again with 200 and a job already done with the cached analysis, queueing nothing', async () => {
    const first = await runImpact(analyst, flowId, body(3.25))
    expect(first.submitted.status).toBe(202)
    const before = await h.db('impact_analyses').where({ quantity_id: flowId }).count({ n: '*' })
    const again = await analyst.post(`/api/quantities/${flowId}/impact`, body(3.25))
    expect(again.status).toBe(200)
    expect(again.body).toMatchObject({ state: 'done', result: { id: first.body.id, cached: true }, error: null })
    expect(await h.db('impact_analyses').where({ quantity_id: flowId }).count({ n: '*' })).toEqual(before)
    expect((await h.db.raw(`SELECT count(*)::int AS n FROM pgboss.job WHERE id = ?`, [again.body.id])).rows[0].n).toBe(0)
  })

  it('reports inputs the engine refuses while computing as a failed job with status 400 and the field, and stores nothing', async () => {
    // The route checks what it can before queueing (a comparison prior too narrow to compute with is refused at once)…
    const refused = await analyst.post(`/api/quantities/${flowId}/impact`, { datasetId, comparison: { family: 'lognormal', meanlog: 700, sdlog: 1e-300 } })
    expect(refused.status).toBe(400)
    expect(refused.body.error.fields.comparison).toMatch(/too narrow for its location/)
    // …and the worker reports what only the engine finds. Constructed: a queued job whose sweep has a negative width
    // factor (the request schema refuses one), put on the queue as the route does.
    const { job } = await runImpact(analyst, flowId, body(4.25))
    const prepared = await h.db('impact_jobs').where({ id: job!.id }).first()
    const task = { ...prepared.task, compute: { ...prepared.task.compute, factors: [0.5, -1, 2] } }
    const before = await h.db('impact_analyses').count({ n: '*' })
    const queue = createAnalysisQueue({ databaseUrl: inject('databaseUrl'), db: h.db, timeLimitSeconds: 600 })
    let id = ''
    try {
      await h.db.transaction(async (trx) => {
        const [row] = await trx('impact_jobs').insert({ ...pick(prepared), input_hash: 'e'.repeat(64), task: JSON.stringify(task) }).returning('id')
        id = row.id
        await queue.enqueue(trx, id)
      })
    } finally {
      await queue.close()
    }
    const failed = await waitFor('the job failed', async () => {
      const read = (await analyst.get(`/api/impact-jobs/${id}`).expect(200)).body
      return read.state === 'failed' ? read : null
    })
    expect(failed).toMatchObject({ result: null, error: { status: 400, message: 'The analysis cannot be run with these inputs', fields: { factors: 'Width factors must be positive numbers.' } } })
    expect(await h.db('impact_analyses').count({ n: '*' })).toEqual(before)
  })

  it('lets the study’s analysts and reviewers read a job, and no one else', async () => {
    const { job } = await runImpact(analyst, flowId, body(3.5))
    const url = `/api/impact-jobs/${job!.id}`
    const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
    await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
    const reviewer = await signedIn(h, 'reviewer@kestrel.example')
    expect((await reviewer.get(url).expect(200)).body.result.id).toBe((job!.result as { id: number }).id)
    await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'expert2@kestrel.example')!.id, studyRole: 'expert' }).expect(201)
    const member = await signedIn(h, 'expert2@kestrel.example')
    expect((await member.get(url)).status).toBe(403)
    const outsider = await signedIn(h, 'expert3@kestrel.example')
    const refused = await outsider.get(url)
    expect(refused.status).toBe(403)
    expect(refused.body.result).toBeUndefined()
    expect((await new Client(h).get(url)).status).toBe(401)
    expect((await analyst.get('/api/impact-jobs/00000000-0000-4000-8000-000000000000')).status).toBe(404)
    expect((await analyst.get('/api/impact-jobs/not-a-job')).body).toEqual({ error: { message: 'Analysis job not found' } })
  })

  it('reports a job that nothing will finish as failed: its queue entry is gone or failed while the job row still says running', async () => {
    const { job } = await runImpact(analyst, flowId, body(3.75))
    // Constructed: the state a worker leaves when it stops for good mid-run on the last attempt the queue allows.
    const [stuck] = await h.db('impact_jobs').insert({
      quantity_id: flowId, dataset_id: datasetId, input_hash: 'f'.repeat(64), input: JSON.stringify(body(4)), state: 'running', progress_total: 5, progress_done: 2,
      created_by: (await h.db('impact_jobs').where({ id: job!.id }).first('created_by')).created_by, started_at: h.db.fn.now(),
    }).returning('id')
    const read = (await analyst.get(`/api/impact-jobs/${stuck.id}`).expect(200)).body
    expect(read).toMatchObject({ state: 'failed', result: null, error: { status: 500, fields: {} } })
    expect(read.error.message).toBe('The analysis stopped before it finished (its worker stopped or ran out of time). Run it again.')
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
    const res = await runImpact(analyst, qid, { datasetId, comparison: { family: 'uniform', lower: 0, upper: 0.01 } })
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
    const res = await runImpact(analyst, qid, { datasetId, comparison: { family: 'uniform', lower: 0, upper: 1 } })
    expect(res.status).toBe(200)
    const ref = res.body.candidates.find((c: { kind: string }) => c.kind === 'comparison')
    const expected = conflict('poisson', 'uniform')
    expect(ref.logEvidence).toBeCloseTo(expected.logEvidence, 6)
    expect(ref.logPriorPredictiveP).toBeCloseTo(expected.logBoxP, 6)
    expect(ref.flags).toContain('prior-data-conflict')
    expect(res.body.findings.some((f: string) => /10\^-35664, practically zero\); prior and data conflict\.$/.test(f))).toBe(true)
  })
})
