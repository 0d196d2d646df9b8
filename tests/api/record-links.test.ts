import { readFileSync } from 'node:fs'
import { inflateSync } from 'node:zlib'
import Ajv2020 from 'ajv/dist/2020'
import JSZip from 'jszip'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { RecordLinkedSet } from '../../shared/api/records'
import { formatNumber } from '../../shared/format'
import { RECORD_JOINT_DRAWS } from '../../shared/record/joint-draws'
import type { Distribution } from '../../shared/stats/index'
import { symmetricEigen } from '../../shared/stats/matrix'
import { Client, normalQuantileAnswer, signedIn, startApi, type ApiHarness } from '../support/api'
import { assertWellFormedXml } from '../support/xml'

// Linked quantities in the prior record: each linked set's confirmed correlations, its matrix and repair, the seeded draws
// of its scatter, the model code; the JSON export against docs/prior-record.schema.json; the .docx with a scatter per link.

let h: ApiHarness
let analyst: Client
let studyId: number
let roundId: number
const q: Record<string, number> = {}
const link: Record<string, number> = {}
const finals: Record<string, Distribution> = {}

const QUANTITIES: [string, string, number, number][] = [
  ['bursts', 'jrecord: Mains bursts per 100 km a year', 18, 4],
  ['repair', 'jrecord: Mean repair time (hours)', 9, 2],
  ['lossA', 'jrecord: District A losses (ML/d)', 3, 0.5],
  ['lossB', 'jrecord: District B losses (ML/d)', 4, 0.8],
  ['lossC', 'jrecord: District C losses (ML/d)', 5, 1],
  ['age', 'jrecord: Mean pipe age (years)', 40, 8],
  ['flow', 'jrecord: Night-flow reduction (L/s)', 12, 3],
]

const content = async () => (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body.content
const setOf = (c: { linkedSets: RecordLinkedSet[] }, name: string) => c.linkedSets.find((s) => s.name === name)!

const addLink = async (first: string, second: string): Promise<number> =>
  (await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q[first], secondQuantityId: q[second] }).expect(201)).body.id

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  const experts = [await signedIn(h, 'expert1@kestrel.example'), await signedIn(h, 'expert2@kestrel.example')]
  studyId = (await analyst.post('/api/studies', { title: 'jrecord: links in the record', context: 'Kestrel Valley bursts, repairs and losses.' }).expect(201)).body.id
  for (const [symbol, name] of QUANTITIES) {
    q[symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, { name, symbol, question: `In the Kestrel Valley network, ${name.toLowerCase()}?`, support: { kind: 'real' } }).expect(201)).body.id
  }
  roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'jrecord: round 1', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
    items: Object.values(q).map((quantityId) => ({ quantityId, method: 'quantile' })),
  }).expect(201)).body.id
  // Constructed answers: bursts–repair 80 % and 60 % (pooled 1/φ, to be confirmed); the three district losses linked pairwise
  // (the analyst will set correlations that cannot hold together); pipe age–flow answered but left undecided.
  const answers: [string, string, string, number, number][] = [
    ['burstsRepair', 'bursts', 'repair', 0.8, 0.6], ['ab', 'lossA', 'lossB', 0.85, 0.85], ['bc', 'lossB', 'lossC', 0.85, 0.85],
    ['ac', 'lossA', 'lossC', 0.3, 0.3], ['ageFlow', 'age', 'flow', 0.35, 0.4],
  ]
  for (const [name, first, second] of answers) link[name] = await addLink(first, second)
  for (const email of ['expert1@kestrel.example', 'expert2@kestrel.example']) await analyst.post(`/api/rounds/${roundId}/invitations`, { email, name: 'Panel member' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
  for (const [k, c] of experts.entries()) {
    for (const [symbol, , mu, sigma] of QUANTITIES) await c.put(`/api/rounds/${roundId}/judgements/${q[symbol]}`, { ...normalQuantileAnswer(mu + k, sigma), version: 0 }).expect(200)
    for (const [name, , , ...p] of answers) await c.put(`/api/rounds/${roundId}/link-answers/${link[name]}`, { probability: p[k], rationale: 'Both follow the winter pressure pattern.', version: 0 }).expect(200)
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
  for (const symbol of Object.keys(q)) {
    finals[symbol] = (await analyst.put(`/api/quantities/${q[symbol]}/reconciliation`, {
      roundId, method: 'linear', weights: 'equal', family: 'normal', reconciled: true, version: 0, rationale: 'The normal follows the pooled answers closely.',
    }).expect(200)).body.saved.distribution
  }
  await analyst.put(`/api/links/${link.burstsRepair}/reconciliation`, { decision: 'confirm', version: 0 }).expect(200)
  for (const [id, correlation] of [[link.ab, 0.9], [link.bc, 0.9], [link.ac, -0.9]])
    await analyst.put(`/api/links/${id}/reconciliation`, { decision: 'override', correlation, reason: 'The districts share one trunk main; set from the 2025 flow logs.', version: 0 }).expect(200)
}, 120_000)
afterAll(async () => {
  await h.close()
})

describe('linked quantities in the prior record', () => {
  it('states a confirmed link: the answers under the study’s labels, the pool, the matrix, the draws and model code that reads back', async () => {
    const c = await content()
    expect(c.linkedSets.map((s: RecordLinkedSet) => [s.name, s.inPrior])).toEqual([['joint_bursts_repair', true], ['joint_lossA_lossB_lossC', true], ['joint_age_flow', false]])
    const set = setOf(c, 'joint_bursts_repair')
    expect(set.quantities).toEqual([
      { name: 'jrecord: Mains bursts per 100 km a year', symbol: 'bursts', distribution: finals.bursts },
      { name: 'jrecord: Mean repair time (hours)', symbol: 'repair', distribution: finals.repair },
    ])
    const [l] = set.links
    expect(l.answers.map((a) => [a.expert, a.probability, a.weight])).toEqual([[{ code: 'Expert 1' }, 0.8, 0.5], [{ code: 'Expert 2' }, 0.6, 0.5]])
    // sin(0.3π) = φ/2 and sin(0.1π) = 1/(2φ); pooled with equal weights on Fisher's z scale: 1/φ (constructed, by hand).
    expect(l.answers[0].correlation).toBeCloseTo(0.809016994374947, 14)
    expect(l.pooledCorrelation).toBeCloseTo(0.618033988749895, 13)
    expect(l).toMatchObject({ round: 1, source: 'confirmed', reason: '', stale: false, correlation: l.pooledCorrelation })
    expect(set.matrix).toEqual([[1, l.correlation], [l.correlation, 1]])
    expect(set).toMatchObject({ positiveSemiDefinite: true, repair: null, jointMatrix: set.matrix, notInPriorReason: null, draws: RECORD_JOINT_DRAWS, unlinkedPairs: [] })
    expect(set.modelCode.map((m) => [m.language, m.form, m.check?.ok])).toEqual([
      ['stan', 'multivariate-normal', true], ['pymc', 'multivariate-normal', true], ['jags', 'multivariate-normal', true], ['brms', 'multivariate-normal', true],
    ])
    expect(set.modelCode[0].code).toContain('joint_bursts_repair')
  })

  it('states a set whose decided correlations cannot hold together with its nearest correlation matrix and how far each entry moved', async () => {
    const c = await content()
    const set = setOf(c, 'joint_lossA_lossB_lossC')
    const decided = [[1, 0.9, -0.9], [0.9, 1, 0.9], [-0.9, 0.9, 1]]
    expect(set.matrix).toEqual(decided)
    expect(set.links.map((l) => [l.first.symbol, l.second.symbol, l.source, l.correlation])).toEqual([['lossA', 'lossB', 'overridden', 0.9], ['lossB', 'lossC', 'overridden', 0.9], ['lossA', 'lossC', 'overridden', -0.9]])
    expect(set.links[2].reason).toBe('The districts share one trunk main; set from the 2025 flow logs.')
    // The same set as the reconcile screen shows it.
    const atReconciliation = (await analyst.get(`/api/studies/${studyId}/linked-quantities`).expect(200)).body.sets
      .find((x: { linkIds: number[] }) => x.linkIds.includes(link.ab))
    expect(set.repair).toEqual(atReconciliation.repair)
    expect(set.minEigenvalue).toBe(atReconciliation.minEigenvalue)
    expect(set.positiveSemiDefinite).toBe(false)
    // The decided matrix has eigenvalues 1.9, 1.9 and −0.8; by symmetry its nearest correlation matrix has ±0.5 off the
    // diagonal, eigenvalues 1.5, 1.5 and 0 (constructed by hand); the floor lifts the 0 to 1e-6, moving entries by 5e-7.
    const repaired = set.repair!.matrix
    expect(set.minEigenvalue).toBeCloseTo(-0.8, 12)
    expect(repaired.map((row) => row.map((x) => Math.round(x * 1e4) / 1e4))).toEqual([[1, 0.5, -0.5], [0.5, 1, 0.5], [-0.5, 0.5, 1]])
    expect(Math.min(...symmetricEigen(repaired).values)).toBeCloseTo(1e-6, 9)
    expect(set.repair!.changes).toEqual(repaired.map((row, i) => row.map((x, j) => x - decided[i][j])))
    expect(set.repair!.maxChange).toBe(Math.max(...set.repair!.changes.flat().map(Math.abs)))
    expect(set.jointMatrix).toEqual(repaired)
    const nearest = set.repair!
    expect(c.cautions).toContainEqual({
      rule: 'correlations-repaired', quantity: 'jrecord: District A losses (ML/d), jrecord: District B losses (ML/d), jrecord: District C losses (ML/d)',
      text: `Linked quantities jrecord: District A losses (ML/d), jrecord: District B losses (ML/d), jrecord: District C losses (ML/d): the correlations as decided cannot all hold together; the joint prior uses the nearest correlation matrix, whose entries moved by up to ${formatNumber(nearest.maxChange, 3)}.`,
    })
  })

  it('lists a set with a correlation the analyst has not decided as not part of the prior, with why', async () => {
    const c = await content()
    const set = setOf(c, 'joint_age_flow')
    expect(set).toMatchObject({
      inPrior: false, draws: null, modelCode: [],
      notInPriorReason: 'Not part of the prior: the analyst has not confirmed or set the correlation of jrecord: Mean pipe age (years) and jrecord: Night-flow reduction (L/s).',
    })
    // Equal weights pool sin(−0.15π) and sin(−0.1π) on Fisher's z scale (constructed).
    const pooled = Math.tanh((Math.atanh(Math.sin(-0.15 * Math.PI)) + Math.atanh(Math.sin(-0.1 * Math.PI))) / 2)
    expect(set.links[0]).toMatchObject({ source: 'pooled', correlation: expect.closeTo(pooled, 12) })
    expect(c.cautions.filter((x: { rule: string }) => x.rule === 'linked-set-not-in-prior').map((x: { text: string }) => x.text)).toEqual([
      'Linked quantities jrecord: Mean pipe age (years), jrecord: Night-flow reduction (L/s): not part of the prior: the analyst has not confirmed or set the correlation of jrecord: Mean pipe age (years) and jrecord: Night-flow reduction (L/s).',
    ])
  })

  it('exports JSON the record schema accepts, and refuses a correlation outside [-1, 1] or an unknown source', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(res.body), JSON.stringify(validate.errors)).toBe(true)
    const bad = structuredClone(res.body)
    bad.linkedSets[0].matrix[0][1] = 1.5
    expect(validate(bad)).toBe(false)
    const badSource = structuredClone(res.body)
    badSource.linkedSets[0].links[0].source = 'guessed'
    expect(validate(badSource)).toBe(false)
    const missing = structuredClone(res.body)
    delete missing.linkedSets
    expect(validate(missing)).toBe(false)
  })

  it('writes each linked set into the .docx: answers, matrices, repair, a PNG scatter of the recorded draws per link, model code', async () => {
    const c = await content()
    const res = await analyst.get(`/api/studies/${studyId}/record.docx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = []
      r.on('data', (x: Buffer) => chunks.push(x))
      r.on('end', () => cb(null, Buffer.concat(chunks)))
    })
    expect(res.status).toBe(200)
    const text = (await mammoth.extractRawText({ buffer: res.body as Buffer })).value
    const set = setOf(c, 'joint_bursts_repair')
    for (const expected of [
      '11. Joint priors', '11.1 Linked: jrecord: Mains bursts per 100 km a year, jrecord: Mean repair time (hours) (joint_bursts_repair)',
      'Expert 1: 80 % (correlation 0.809, weight 0.5); Expert 2: 60 % (correlation 0.309, weight 0.5)', formatNumber(set.links[0].correlation, 3),
      'the experts’ pooled value, confirmed by the analyst', set.modelCode[0].code.split('\n')[0], 'passed: the same parameters come out of the code',
      `Figure: 1000 joint draws (seed ${RECORD_JOINT_DRAWS.seed}) from the linked set’s joint prior: jrecord: Mains bursts per 100 km a year (bursts) across, jrecord: Mean repair time (hours) (repair) up.`,
      'The correlations as decided cannot all hold together', 'Not part of the prior: the analyst has not confirmed or set the correlation',
      'set by the analyst: The districts share one trunk main; set from the 2025 flow logs.',
    ]) expect(text).toContain(expected)
    // One scatter per link of the sets in the prior (1 + 3), each a 720 × 480 truecolour PNG whose pixels decode.
    const zip = await JSZip.loadAsync(res.body as Buffer)
    for (const name of Object.keys(zip.files).filter((n) => /\.(xml|rels)$/.test(n))) assertWellFormedXml(await zip.file(name)!.async('string'), name)
    const pngs = Object.keys(zip.files).filter((n) => /^word\/media\/.*\.png$/.test(n))
    expect(pngs).toHaveLength(4)
    const png = await zip.file(pngs[0])!.async('nodebuffer')
    expect(png.subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))
    expect([png.readUInt32BE(16), png.readUInt32BE(20), png[24], png[25]]).toEqual([720, 480, 8, 2])
    const idat = png.subarray(png.indexOf('IDAT') + 4, png.indexOf('IEND') - 8)
    expect(inflateSync(idat).length).toBe((720 * 3 + 1) * 480)
  })
})
