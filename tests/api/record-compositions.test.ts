import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { formatNumber } from '../../shared/format'
import { dirichletFromMarginals, type Distribution } from '../../shared/stats/index'
import { contentHash } from '../../server/services/records'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

// Compositions (shares of a whole) in the prior record: its content, the JSON export against docs/prior-record.schema.json,
// the .docx, and a signed-off snapshot that later changes leave as it was.

let h: ApiHarness
let analyst: Client
let reviewer: Client
let studyId: number
const ids: Record<string, number> = {}
const compositionIds: Record<string, number> = {}

// Constructed reconciled priors: means 0.3, 0.2, 0.5 (they add up to 1), with different spreads.
const FINALS: Record<string, Distribution> = {
  p_join: { family: 'beta', alpha: 30, beta: 70 },
  p_meter: { family: 'beta', alpha: 6, beta: 24 },
  p_decline: { family: 'beta', alpha: 40, beta: 40 },
  crew_a: { family: 'beta', alpha: 40, beta: 60 },
  meter_new: { family: 'beta', alpha: 6, beta: 4 },
  meter_old: { family: 'beta', alpha: 4, beta: 6 },
}
const UPTAKE = ['p_join', 'p_meter', 'p_decline']

async function reconciled(symbol: string, distribution: Distribution): Promise<void> {
  // Fixture: a reconciled prior (the reconciliation workflow itself is tested in reconciliation.test.ts).
  await h.db('reconciliations').insert({
    quantity_id: ids[symbol], method: 'linear', weights_mode: 'equal', family: 'beta', distribution: JSON.stringify(distribution),
    status: 'reconciled', rationale: 'Fixture for the composition record test.',
  }).onConflict('quantity_id').merge(['distribution'])
}

const record = async (version?: number) => (await analyst.get(`/api/studies/${studyId}/record${version ? `?version=${version}` : ''}`).expect(200)).body
const composition = (content: { compositions: { name: string }[] }, name: string) => content.compositions.find((c) => c.name === name) as any

async function docxText(version?: number): Promise<string> {
  const res = await analyst.get(`/api/studies/${studyId}/record.docx${version ? `?version=${version}` : ''}`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (c: Buffer) => chunks.push(c))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
  expect(res.status).toBe(200)
  return (await mammoth.extractRawText({ buffer: res.body as Buffer })).value
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'jrecord: shares in the record', context: 'Household uptake of the Kestrel Valley leak-alert offer.' }).expect(201)).body.id
  const users = (await analyst.get('/api/users/directory').expect(200)).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: users.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  for (const [symbol, name] of [
    ['p_join', 'Join the leak-alert scheme'], ['p_meter', 'Ask for a smart meter only'], ['p_decline', 'Decline both offers'],
    ['crew_a', 'Bursts repaired by crew A'], ['crew_b', 'Bursts repaired by crew B'], ['meter_new', 'New meters'], ['meter_old', 'Old meters'],
  ]) {
    ids[symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, {
      name, symbol, question: `What share of the Kestrel Valley pilot area is “${name.toLowerCase()}”?`, support: { kind: 'proportion' },
    }).expect(201)).body.id
  }
  const make = async (name: string, symbols: string[], residual = false) => (await analyst.post(`/api/studies/${studyId}/compositions`, {
    name, wording: `How the pilot area splits: ${name.toLowerCase()}.`, quantityIds: symbols.map((s) => ids[s]), residual,
  }).expect(201)).body.id as number
  compositionIds.uptake = await make('Household uptake', UPTAKE)
  compositionIds.crews = await make('Repair crews', ['crew_a', 'crew_b'], true)
  compositionIds.meters = await make('Meter ages', ['meter_new', 'meter_old'])
  for (const [symbol, d] of Object.entries(FINALS)) await reconciled(symbol, d)
  await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: ids.meter_old, reason: 'Old meters are being replaced before the pilot starts.' }).expect(201)
})
afterAll(async () => {
  await h.close()
})

describe('compositions in the prior record', () => {
  it('states a fully reconciled composition’s Dirichlet, each share beside it, the warnings and model code that reads back', async () => {
    const { content } = await record()
    expect(content.schemaVersion).toBe('1.2')
    expect(content.compositions.map((c: { name: string; inPrior: boolean }) => [c.name, c.inPrior])).toEqual([['Household uptake', true], ['Repair crews', false], ['Meter ages', false]])
    const c = composition(content, 'Household uptake')
    const engine = dirichletFromMarginals(UPTAKE.map((s) => FINALS[s]))
    expect(c).toMatchObject({ symbol: 'household_uptake', residual: false, notInPriorReason: null, wording: 'How the pilot area splits: household uptake.' })
    expect(c.dirichlet).toEqual({ alpha: engine.alpha, totalConcentration: engine.totalConcentration, meanSum: engine.meanSum, warnings: engine.warnings })
    // The constructed shares hold very different certainty (implied concentrations 100, 30 and 80: more than 3× apart).
    expect(c.dirichlet.meanSum).toBeCloseTo(1, 12)
    expect(c.dirichlet.warnings.map((w: { code: string }) => w.code)).toEqual(['unequal-certainty'])
    expect(content.cautions).toContainEqual({ rule: 'dirichlet-unequal-certainty', quantity: 'Household uptake', text: `Household uptake: ${c.dirichlet.warnings[0].message}` })
    expect(c.shares.map((s: { name: string; symbol: string; prior: Distribution }) => [s.name, s.symbol, s.prior])).toEqual(UPTAKE.map((s, i) => [
      ['Join the leak-alert scheme', 'Ask for a smart meter only', 'Decline both offers'][i], s, FINALS[s],
    ]))
    c.shares.forEach((s: Record<string, any>, i: number) => {
      expect(s.elicitedMean).toBeCloseTo([0.3, 0.2, 0.5][i], 14)
      expect(s.alpha).toBe(engine.alpha[i])
      expect(s.dirichletMean).toBeCloseTo(engine.alpha[i] / engine.totalConcentration, 14)
      expect(s.marginal).toEqual({ family: 'beta', alpha: engine.alpha[i], beta: engine.totalConcentration - engine.alpha[i] })
      expect(s.mismatch).toBe(engine.mismatch[i])
      expect(s.impliedConcentration).toBeCloseTo([100, 30, 80][i], 9)
    })
    expect(c.modelCode.map((m: { language: string; check: { ok: boolean } }) => [m.language, m.check.ok])).toEqual([['stan', true], ['pymc', true], ['jags', true], ['brms', true]])
    const stan = c.modelCode[0].code as string
    expect(stan.split('\n')[0]).toBe('// household_uptake: shares in order: p_join, p_meter, p_decline')
    expect(JSON.parse(/dirichlet\((\[[^\]]*\])/.exec(stan)![1]).map((a: number, i: number) => a / engine.alpha[i])).toEqual([1, 1, 1].map(() => expect.closeTo(1, 12)))
    expect(c.impact).toBeNull()
  })

  it('lists a composition not fully reconciled, or with a share left out of the record, as not part of the prior, with why', async () => {
    const { content } = await record()
    const crews = composition(content, 'Repair crews')
    expect(crews).toMatchObject({ inPrior: false, dirichlet: null, modelCode: [], impact: null, notInPriorReason: 'Not part of the prior: still to reconcile: Bursts repaired by crew B.' })
    expect(crews.shares.map((s: { name: string; symbol: string | null; prior: unknown; alpha: unknown }) => [s.name, s.symbol, s.prior !== null, s.alpha])).toEqual([
      ['Bursts repaired by crew A', 'crew_a', true, null], ['Bursts repaired by crew B', 'crew_b', false, null], ['Other', null, false, null],
    ])
    const meters = composition(content, 'Meter ages')
    expect(meters).toMatchObject({ inPrior: false, dirichlet: null, notInPriorReason: 'Not part of the prior: Old meters is left out of this record.' })
    // Reconciled shares still show their own priors, but no Dirichlet numbers.
    expect(meters.shares.map((s: { prior: unknown; alpha: unknown; mismatch: unknown }) => [s.prior, s.alpha, s.mismatch])).toEqual([[FINALS.meter_new, null, null], [FINALS.meter_old, null, null]])
    const raised = content.cautions.filter((c: { rule: string }) => c.rule === 'composition-not-in-prior')
    expect(raised).toEqual([
      { rule: 'composition-not-in-prior', quantity: 'Repair crews', text: 'Repair crews: not part of the prior: still to reconcile: Bursts repaired by crew B.' },
      { rule: 'composition-not-in-prior', quantity: 'Meter ages', text: 'Meter ages: not part of the prior: Old meters is left out of this record.' },
    ])
  })

  it('keeps the newest impact analysis run on this very Dirichlet: log evidence, Bayes factor against the flat Dirichlet, sweep', async () => {
    const ds = (await analyst.post(`/api/compositions/${compositionIds.uptake}/datasets`, {
      name: 'jrecord: uptake survey', filename: 'survey.csv', csv: 'joined,meter_only,declined\n31,17,52\n', layout: 'columns', categoryColumns: ['joined', 'meter_only', 'declined'],
    }).expect(201)).body
    const run = (await analyst.post(`/api/compositions/${compositionIds.uptake}/impact`, { datasetId: ds.id }).expect(201)).body.result
    const c = composition((await record()).content, 'Household uptake')
    const alpha = c.dirichlet.alpha as number[]
    expect(c.impact.dataset).toEqual({ name: 'jrecord: uptake survey', version: 1, rows: 1, summary: ds.summary, sha256: ds.sha256 })
    expect(c.impact.observations).toBe(100)
    expect(c.impact.prior.alpha).toEqual(alpha)
    expect(c.impact.prior.posteriorAlpha).toEqual(alpha.map((a, j) => a + [31, 17, 52][j]))
    expect(c.impact.prior.logEvidence).toBe(run.prior.analysis.logEvidence)
    expect(c.impact.prior.priorEss).toBeCloseTo(alpha.reduce((s, a) => s + a, 0), 10)
    // The flat Dirichlet makes every split of 100 households into 3 shares equally likely: 1 / C(102, 2) = 1/5151 (constructed).
    expect(c.impact.comparison).toEqual({ label: 'Comparison prior: flat Dirichlet(1, …, 1)', alpha: [1, 1, 1], logEvidence: expect.closeTo(-Math.log(5151), 10) })
    expect(c.impact.bayesFactor.logBF).toBeCloseTo(c.impact.prior.logEvidence + Math.log(5151), 10)
    expect(c.impact.bayesFactor).toMatchObject({ twoLnBF: 2 * c.impact.bayesFactor.logBF, label: run.bayesFactor.category, favours: run.bayesFactor.logBF >= 0 ? 'prior' : 'comparison' })
    expect(c.impact.sweep.evidenceRatio).toBe(run.sweep.evidenceRatio)
    expect(c.impact.sweep.points.map((p: { factor: number }) => p.factor)).toEqual([0.25, 0.35, 0.5, 0.71, 1, 1.41, 2, 2.83, 4, 5.66, 8])
    expect(c.impact.sweep.points[4].totalConcentration).toBeCloseTo(c.dirichlet.totalConcentration, 10)
    expect(c.impact.findings).toEqual(run.findings)
    expect(c.impact).not.toHaveProperty('createdAt')
  })

  it('exports JSON the record schema accepts, refusing a bad Dirichlet, and older schema versions without compositions', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(res.body), JSON.stringify(validate.errors)).toBe(true)
    const badAlpha = structuredClone(res.body)
    badAlpha.compositions[0].dirichlet.alpha[1] = -2
    expect(validate(badAlpha)).toBe(false)
    const badFlag = structuredClone(res.body)
    badFlag.compositions[0].impact.flags = ['looks-fine']
    expect(validate(badFlag)).toBe(false)
    const missing = structuredClone(res.body)
    delete missing.compositions
    expect(validate(missing)).toBe(false)
    missing.schemaVersion = '1.1'
    expect(validate(missing), JSON.stringify(validate.errors)).toBe(true)
  })

  it('writes the joint priors into the .docx: the Dirichlet, its shares, model code with the check, the impact, and why not', async () => {
    const { content } = await record()
    const c = composition(content, 'Household uptake')
    const text = await docxText()
    for (const expected of [
      '11. Joint priors', '11.1 Household uptake (shares of a whole, household_uptake)', '11.2 Repair crews (shares of a whole, repair_crews)', '12. Cautions',
      c.dirichlet.warnings[0].message,
      `Dirichlet(${c.dirichlet.alpha.map((a: number) => formatNumber(a)).join(', ')}): total concentration ${formatNumber(c.dirichlet.totalConcentration)}`,
      'Beta(30, 70)', c.modelCode[0].code.split('\n')[1], c.modelCode[1].code.split('\n')[1],
      'passed: the same parameters come out of the code', 'Not part of the prior: still to reconcile: Bursts repaired by crew B.',
      'Not part of the prior: Old meters is left out of this record.', 'Impact on the pilot counts jrecord: uptake survey, version 1',
      `log Bayes factor ${formatNumber(c.impact.bayesFactor.logBF, 4)}`, formatNumber(c.impact.prior.logEvidence, 6),
    ]) expect(text).toContain(expected)
  })
})

describe('a signed-off record with compositions', () => {
  it('keeps its snapshot when a share is reconciled again; the new draft shows the new Dirichlet without the old analysis', async () => {
    await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: ids.crew_b, reason: 'Crew B is disbanded before the pilot starts.' }).expect(201)
    for (const s of [...UPTAKE, 'crew_a', 'meter_new'])
      await analyst.put(`/api/quantities/${ids[s]}/impact/not-run`, { reason: 'The shares are analysed together as a composition.' }).expect(200)
    await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
    await reviewer.post(`/api/studies/${studyId}/record/sign-off`).expect(200)
    const signed = await record(1)
    expect(signed.record.status).toBe('signed_off')
    expect(composition(signed.content, 'Repair crews').notInPriorReason).toBe('Not part of the prior: Bursts repaired by crew B is left out of this record.')
    const before = composition(signed.content, 'Household uptake')
    expect(before.impact).not.toBeNull()

    await reconciled('p_join', { family: 'beta', alpha: 15, beta: 35 })
    const again = await record(1)
    expect(again.content.compositions).toEqual(signed.content.compositions)
    expect(again.record.contentHash).toBe(contentHash(again.content))
    expect(again.record.contentHash).toBe(signed.record.contentHash)

    await analyst.post(`/api/studies/${studyId}/record/new-version`).expect(201)
    const draft = composition((await record()).content, 'Household uptake')
    expect(draft.dirichlet.alpha).toEqual(dirichletFromMarginals([{ family: 'beta', alpha: 15, beta: 35 }, FINALS.p_meter, FINALS.p_decline]).alpha)
    expect(draft.dirichlet.alpha).not.toEqual(before.dirichlet.alpha)
    // The stored analysis ran on the old Dirichlet: it is not this prior's impact.
    expect(draft.impact).toBeNull()
  })
})
