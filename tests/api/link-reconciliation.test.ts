import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { LinkReconciliationView, StudyLinkedQuantities } from '../../shared/api/link-reconciliation'
import { correlationWithEigenvalueFloor, nearestCorrelation, sampleJoint, type Distribution } from '../../shared/stats/index'
import { symmetricEigen } from '../../shared/stats/matrix'
import { Client, normalQuantileAnswer, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
let analyst: Client
let reviewer: Client
let experts: Client[]
let studyId: number
let roundId: number
let laterRoundId: number
const q: Record<string, number> = {}
const link: Record<string, number> = {}

const QUANTITIES: [string, string, number, number][] = [
  ['bursts', 'Mains bursts per 100 km a year', 18, 4],
  ['repair', 'Mean repair time (hours)', 9, 2],
  ['flow', 'Night-flow reduction (L/s)', 12, 3],
  ['lossA', 'linkrec: District A losses (ML/d)', 3, 0.5],
  ['lossB', 'linkrec: District B losses (ML/d)', 4, 0.8],
  ['lossC', 'linkrec: District C losses (ML/d)', 5, 1],
  ['alone', 'linkrec: Pipe age (years)', 40, 8],
]

async function linked(c: Client = analyst): Promise<StudyLinkedQuantities> {
  return (await c.get(`/api/studies/${studyId}/linked-quantities`).expect(200)).body
}
const linkView = (all: StudyLinkedQuantities, id: number): LinkReconciliationView => all.links.find((l) => l.linkId === id)!

async function reconcile(quantityId: number, weights: 'equal' | number[], version = 0): Promise<Distribution> {
  const res = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
    roundId, method: 'linear', weights, weightsReason: Array.isArray(weights) ? 'The first expert has run this network for twenty years.' : '', family: 'normal',
    reconciled: true, version, rationale: 'The normal follows the pooled answers closely.',
  }).expect(200)
  return res.body.saved.distribution
}

async function draftRound(title: string, quantityIds: number[]): Promise<number> {
  return (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 864e5).toISOString(),
    items: quantityIds.map((quantityId) => ({ quantityId, method: 'quantile' })),
  }).expect(201)).body.id
}
const addLink = async (round: number, first: string, second: string): Promise<number> =>
  (await analyst.post(`/api/rounds/${round}/links`, { firstQuantityId: q[first], secondQuantityId: q[second] }).expect(201)).body.id
async function openRound(round: number): Promise<void> {
  for (const email of ['expert1@kestrel.example', 'expert2@kestrel.example']) await analyst.post(`/api/rounds/${round}/invitations`, { email, name: 'Panel member' }).expect(201)
  await analyst.post(`/api/rounds/${round}/open`).expect(200)
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  experts = [await signedIn(h, 'expert1@kestrel.example'), await signedIn(h, 'expert2@kestrel.example')]
  studyId = (await analyst.post('/api/studies', { title: 'linkrec: links at reconciliation', context: 'Kestrel Valley bursts, repairs and losses.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory').expect(200)).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  for (const [symbol, name] of QUANTITIES) {
    q[symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, { name, symbol, question: `In the Kestrel Valley network, ${name.toLowerCase()}?`, support: { kind: 'real' } }).expect(201)).body.id
  }
  roundId = await draftRound('linkrec: round 1', Object.values(q))
  // Constructed answers: bursts–repair 80 % and 60 %, repair–flow 30 % and 45 %; bursts–flow not linked. The district losses
  // are linked pairwise; the analyst will set correlations that cannot hold together.
  const answers: [string, string, string, number, number][] = [
    ['burstsRepair', 'bursts', 'repair', 0.8, 0.6], ['repairFlow', 'repair', 'flow', 0.3, 0.45], ['ab', 'lossA', 'lossB', 0.85, 0.85], ['bc', 'lossB', 'lossC', 0.85, 0.85],
  ]
  for (const [name, first, second] of answers) link[name] = await addLink(roundId, first, second)
  await openRound(roundId)
  for (const [k, c] of experts.entries()) {
    for (const [symbol, , mu, sigma] of QUANTITIES) await c.put(`/api/rounds/${roundId}/judgements/${q[symbol]}`, { ...normalQuantileAnswer(mu + k, sigma), version: 0 }).expect(200)
    for (const [name, , , ...p] of answers) await c.put(`/api/rounds/${roundId}/link-answers/${link[name]}`, { probability: p[k], rationale: 'Both follow the winter pressure pattern.', version: 0 }).expect(200)
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
  // A later round links district losses A–C (nobody has answered it yet) and bursts–repair again (nobody answers either).
  laterRoundId = await draftRound('linkrec: round 2', [q.lossA, q.lossC, q.bursts, q.repair])
  link.ac = await addLink(laterRoundId, 'lossA', 'lossC')
  link.burstsRepairLater = await addLink(laterRoundId, 'bursts', 'repair')
  await openRound(laterRoundId)
}, 120_000)
afterAll(async () => {
  await h.close()
})

describe('pooled correlation of a link', () => {
  it('turns each answer into a correlation and pools them on Fisher’s z scale with equal weights before reconciliation', async () => {
    const v = linkView(await linked(), link.burstsRepair)
    // sin(0.3π) = φ/2 and sin(0.1π) = 1/(2φ); with equal weights tanh(mean atanh ρ) = 1/φ = 0.6180339887… (constructed, by hand).
    expect(v.answers.map((a) => [a.label, a.probability, a.weight])).toEqual([['Expert 1', 0.8, 0.5], ['Expert 2', 0.6, 0.5]])
    // The analyst reads each expert's reason beside their chance.
    expect(v.answers.map((a) => a.rationale)).toEqual(['Both follow the winter pressure pattern.', 'Both follow the winter pressure pattern.'])
    expect(v.answers[0].correlation).toBeCloseTo(0.809016994374947, 14)
    expect(v.answers[1].correlation).toBeCloseTo(0.309016994374947, 14)
    expect(v.pooledCorrelation).toBeCloseTo(0.618033988749895, 13)
    expect(v.pooledProbability).toBeCloseTo(0.5 + Math.asin(0.618033988749895) / Math.PI, 12)
    expect(v.spread!.min).toBeCloseTo(0.309016994374947, 14)
    expect(v.spread!.max).toBeCloseTo(0.809016994374947, 14)
    expect(v.weightRule).toBe('Equal weights: neither quantity is reconciled yet')
    expect(v).toMatchObject({ saved: null, source: 'pooled', stale: false, first: { symbol: 'bursts' }, second: { symbol: 'repair' }, roundId })
  })

  it('uses the average of the two reconciliations’ weights once the quantities are reconciled', async () => {
    // Bursts reconciled with hand weights 3 : 1 (first expert : second), repair time with equal weights:
    // the link's weights are (0.75 + 0.5)/2 = 0.625 and (0.25 + 0.5)/2 = 0.375, and the pool is
    // tanh(0.625 atanh(sin 0.3π) + 0.375 atanh(sin 0.1π)) = 0.676378159951234 (constructed, mpmath at 30 digits).
    await reconcile(q.bursts, [3, 1])
    await reconcile(q.repair, 'equal')
    const v = linkView(await linked(), link.burstsRepair)
    expect(v.answers.map((a) => a.weight)).toEqual([0.625, 0.375])
    expect(v.pooledCorrelation).toBeCloseTo(0.676378159951234, 13)
    expect(v.weightRule).toBe('The average of the experts’ weights in the two quantities’ reconciliations')
    // Repair time reconciled, flow not: the flow side gives equal weights.
    const rf = linkView(await linked(), link.repairFlow)
    expect(rf.answers.map((a) => a.weight)).toEqual([0.5, 0.5])
    expect(rf.weightRule).toBe('The average of the experts’ weights in the reconciled quantity and equal weights for the one not reconciled yet')
    // sin(−0.2π) and sin(−0.05π) pooled with equal weights: −0.393557456208211 (constructed, mpmath).
    expect(rf.pooledCorrelation).toBeCloseTo(-0.393557456208211, 13)
  })

  it('reconciles a pair linked in two rounds from the latest round with answers, and refuses a decision on the other link', async () => {
    const all = await linked()
    expect(all.links.map((l) => [l.linkId, l.roundId])).toEqual([
      [link.burstsRepair, roundId], [link.repairFlow, roundId], [link.ab, roundId], [link.bc, roundId], [link.ac, laterRoundId],
    ])
    const res = await analyst.put(`/api/links/${link.burstsRepairLater}/reconciliation`, { decision: 'confirm', version: 0 })
    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('This pair is reconciled from its link in another round (the latest with answers); open that one')
  })

  it('lists the linked set with unlinked pairs at 0, the reconciled priors it uses, and waits for the rest', async () => {
    const all = await linked()
    const set = all.sets.find((s) => s.marginals.some((m) => m.quantityId === q.bursts))!
    expect(set.marginals.map((m) => m.symbol)).toEqual(['bursts', 'repair', 'flow'])
    expect(set.marginals.map((m) => m.distribution?.family ?? null)).toEqual(['normal', 'normal', null])
    expect(set.unlinkedPairs).toEqual([{ first: 'Mains bursts per 100 km a year', second: 'Night-flow reduction (L/s)' }])
    const br = linkView(all, link.burstsRepair).correlation
    const rf = linkView(all, link.repairFlow).correlation
    expect(set.matrix).toEqual([[1, br, 0], [br, 1, rf], [0, rf, 1]])
    expect(set.positiveSemiDefinite).toBe(true)
    expect(set.repair).toBeNull()
    expect(set.jointMatrix).toEqual(set.matrix)
    expect(set).toMatchObject({ decided: false, waitingFor: ['Night-flow reduction (L/s)'], modelCode: [] })
    // A quantity with no link is in no set.
    expect(all.sets.some((s) => s.marginals.some((m) => m.quantityId === q.alone))).toBe(false)
    expect(all.sets).toHaveLength(2)
  })
})

describe('the analyst’s decision', () => {
  it('confirms the pooled correlation with its audit event in the same transaction, and answers 409 to a stale decision', async () => {
    const before = linkView(await linked(), link.burstsRepair)
    const res = await analyst.put(`/api/links/${link.burstsRepair}/reconciliation`, { decision: 'confirm', version: 0 }).expect(200)
    expect(res.body).toMatchObject({ source: 'confirmed', correlation: before.pooledCorrelation, stale: false })
    expect(res.body.saved).toMatchObject({ decision: 'confirm', correlation: before.pooledCorrelation, pooledCorrelation: before.pooledCorrelation, reason: '', version: 1 })
    const events = await h.db('audit_events').where({ subject: `link:${link.burstsRepair}` }).select('action', 'details')
    expect(events).toEqual([{ action: 'link.confirm', details: { correlation: before.pooledCorrelation, pooledCorrelation: before.pooledCorrelation, reason: '', version: 1 } }])
    expect(await h.db('link_reconciliation_versions as v').join('link_reconciliations as r', 'r.id', 'v.link_reconciliation_id')
      .where('r.link_id', link.burstsRepair).select('v.version')).toEqual([{ version: 1 }])
    const stale = await analyst.put(`/api/links/${link.burstsRepair}/reconciliation`, { decision: 'override', correlation: 0.2, reason: 'A second opinion that should be refused.', version: 0 })
    expect(stale.status).toBe(409)
    expect(linkView(await linked(), link.burstsRepair).saved).toMatchObject({ decision: 'confirm', version: 1 })
  })

  it.each([
    ['a correlation of 1', { decision: 'override', correlation: 1, reason: 'Bursts and repairs move in lockstep.' }, { correlation: 'Give a correlation above −1 and below 1' }],
    ['text for a correlation', { decision: 'override', correlation: 'high', reason: 'Bursts and repairs move in lockstep.' }, { correlation: 'Give a correlation above −1 and below 1' }],
    ['no correlation', { decision: 'override', reason: 'Bursts and repairs move in lockstep.' }, { correlation: 'Give a correlation above −1 and below 1' }],
    ['a short reason', { decision: 'override', correlation: 0.5, reason: 'Because' }, { reason: 'Say why in at least 10 characters; it goes into the prior record' }],
    ['no decision', { correlation: 0.5 }, { decision: 'Choose to confirm or override' }],
    ['another decision', { decision: 'average' }, { decision: 'Choose to confirm or override' }],
  ])('refuses %s with a field error and keeps the saved decision', async (_, body, fields) => {
    const res = await analyst.put(`/api/links/${link.burstsRepair}/reconciliation`, { ...body, version: 1 })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual(fields)
    expect(linkView(await linked(), link.burstsRepair).saved).toMatchObject({ decision: 'confirm', version: 1 })
  })

  it('refuses to confirm a link nobody has answered, pointing to an override', async () => {
    const res = await analyst.put(`/api/links/${link.ac}/reconciliation`, { decision: 'confirm', version: 0 })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ decision: 'No expert with weight has answered this question yet: override with a value and a reason instead' })
    expect(await h.db('link_reconciliations').where({ link_id: link.ac })).toEqual([])
  })

  it('overrides with a value and a reason, versioned and audited', async () => {
    const res = await analyst.put(`/api/links/${link.burstsRepair}/reconciliation`, { decision: 'override', correlation: 0.5, reason: 'Repair crews were doubled in 2026, so long repairs after many bursts are less likely.', version: 1 }).expect(200)
    expect(res.body).toMatchObject({ source: 'overridden', correlation: 0.5, saved: { decision: 'override', correlation: 0.5, version: 2 } })
    expect(res.body.saved.pooledCorrelation).toBeCloseTo(0.676378159951234, 13)
    expect((await h.db('audit_events').where({ subject: `link:${link.burstsRepair}` }).orderBy('id').select('action')).map((e) => e.action)).toEqual(['link.confirm', 'link.override'])
  })

  it('marks a confirmation stale when the pool moves afterwards, and keeps using the confirmed value', async () => {
    const confirmed = (await analyst.put(`/api/links/${link.repairFlow}/reconciliation`, { decision: 'confirm', version: 0 }).expect(200)).body
    expect(confirmed).toMatchObject({ source: 'confirmed', stale: false })
    // Repair time reconciled again with weights 1 : 3: the link's weights become (0.25 + 0.5)/2 and (0.75 + 0.5)/2.
    await reconcile(q.repair, [1, 3], 1)
    const v = linkView(await linked(), link.repairFlow)
    expect(v.answers.map((a) => a.weight)).toEqual([0.375, 0.625])
    expect(v.pooledCorrelation).not.toBeCloseTo(confirmed.correlation, 6)
    expect(v).toMatchObject({ stale: true, source: 'confirmed', correlation: confirmed.correlation, saved: { decision: 'confirm', version: 1 } })
  })

  it('keeps one of two first decisions sent at the same moment and answers 409 to the other', async () => {
    const body = { decision: 'override', correlation: 0.9, reason: 'Set by the analyst to test the repair report.', version: 0 }
    const both = await Promise.all([analyst.put(`/api/links/${link.ab}/reconciliation`, body), analyst.put(`/api/links/${link.ab}/reconciliation`, body)])
    expect(both.map((r) => r.status).sort()).toEqual([200, 409])
    expect(await h.db('link_reconciliations').where({ link_id: link.ab }).select('version')).toEqual([{ version: 1 }])
    expect(await h.db('audit_events').where({ subject: `link:${link.ab}` }).count('* as n').first()).toEqual({ n: '1' })
  })

  it('reports a set whose correlations cannot hold together and repairs it to the nearest correlation matrix', async () => {
    for (const [id, correlation, version] of [[link.bc, 0.9, 0], [link.ac, -0.9, 0]] as const)
      await analyst.put(`/api/links/${id}/reconciliation`, { decision: 'override', correlation, reason: 'Set by the analyst to test the repair report.', version }).expect(200)
    const set = (await linked()).sets.find((s) => s.marginals.some((m) => m.quantityId === q.lossA))!
    const asked = [[1, 0.9, -0.9], [0.9, 1, 0.9], [-0.9, 0.9, 1]]
    expect(set.matrix).toEqual(asked)
    expect(set.unlinkedPairs).toEqual([])
    expect(set.decided).toBe(true)
    expect(set.positiveSemiDefinite).toBe(false)
    // The eigenvalues of this matrix are 1.9 (twice) and −0.8 (constructed: it is 1.9 I − 0.9 vvᵀ with v = (1, −1, 1)).
    expect(set.minEigenvalue).toBeCloseTo(-0.8, 12)
    // The nearest correlation matrix (Higham 2002) with its eigenvalues raised to 10⁻⁶, as the engine gives it.
    const engine = correlationWithEigenvalueFloor(nearestCorrelation(asked).matrix, 1e-6)
    expect(set.repair).toEqual({ matrix: engine, changes: engine.map((row, i) => row.map((x, j) => x - asked[i][j])), maxChange: expect.any(Number), iterations: nearestCorrelation(asked).iterations })
    expect(set.jointMatrix).toEqual(engine)
    const repaired = set.repair!.matrix
    expect(repaired.map((row, i) => row[i])).toEqual([1, 1, 1])
    // By symmetry the nearest matrix has off-diagonals ±½ (eigenvalues 0, 1.5, 1.5; constructed); the floor moves them by about 10⁻⁶.
    expect(repaired[0][1]).toBeCloseTo(0.5, 5)
    expect(repaired[1][2]).toBeCloseTo(0.5, 5)
    expect(repaired[0][2]).toBeCloseTo(-0.5, 5)
    expect(Math.min(...symmetricEigen(repaired).values)).toBeGreaterThan(0.99e-6)
    expect(set.repair!.maxChange).toBe(Math.max(...set.repair!.changes.flat().map(Math.abs)))
    expect(set.repair!.maxChange).toBeCloseTo(0.4, 5)
  })
})

describe('joint draws', () => {
  const draws = (quantityId: number, query = '', c: Client = analyst) => c.get(`/api/quantities/${quantityId}/joint-draws${query}`)

  it('waits until every quantity of the set is reconciled, naming the open ones', async () => {
    const res = await draws(q.bursts, '?n=10')
    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('Joint draws need every linked quantity reconciled; still open: Night-flow reduction (L/s)')
    const alone = await draws(q.alone)
    expect(alone.status).toBe(409)
    expect(alone.body.error.message).toBe('This quantity is not linked to another one')
  })

  it('gives the same draws as the engine, byte for byte on every download, with columns named by the symbols', async () => {
    const flow = await reconcile(q.flow, 'equal')
    const all = await linked()
    const set = all.sets.find((s) => s.marginals.some((m) => m.quantityId === q.flow))!
    expect(set.waitingFor).toEqual([])
    const res = await draws(q.flow, '?n=500&seed=7').expect(200)
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8')
    expect(res.headers['content-disposition']).toBe('attachment; filename="joint-draws-bursts-repair-flow-seed7-n500.csv"')
    const marginals = set.marginals.map((m) => m.distribution!)
    expect(marginals[2]).toEqual(flow)
    const engine = sampleJoint(marginals, set.jointMatrix, 500, 7)
    const lines = res.text.trimEnd().split('\n')
    expect(lines[0]).toBe('bursts,repair,flow')
    expect(lines.slice(1).map((l) => l.split(',').map(Number))).toEqual(engine)
    // The same file again, from another reader and another quantity of the set.
    expect((await draws(q.bursts, '?n=500&seed=7', reviewer).expect(200)).text).toBe(res.text)
    expect((await draws(q.flow, '?n=500&seed=8').expect(200)).text).not.toBe(res.text)
    // Defaults: 10,000 draws at the fixed seed.
    const byDefault = await draws(q.repair).expect(200)
    expect(byDefault.text.trimEnd().split('\n')).toHaveLength(10_001)
    expect(byDefault.headers['content-disposition']).toBe('attachment; filename="joint-draws-bursts-repair-flow-seed20261203-n10000.csv"')
  })

  it('uses the repaired matrix for a set that needed repair, in the draws and in model code every language accepts', async () => {
    for (const id of [q.lossA, q.lossB, q.lossC]) await reconcile(id, 'equal')
    const set = (await linked()).sets.find((s) => s.marginals.some((m) => m.quantityId === q.lossA))!
    // JAGS's dmnorm needs the inverse covariance: it exists because the repair keeps the eigenvalues above 10⁻⁶.
    expect(set.modelCode.map((m) => [m.language, m.check?.ok])).toEqual([['stan', true], ['pymc', true], ['jags', true], ['brms', true]])
    const res = await draws(q.lossB, '?n=50&seed=3').expect(200)
    expect(res.text.trimEnd().split('\n').slice(1).map((l) => l.split(',').map(Number))).toEqual(sampleJoint(set.marginals.map((m) => m.distribution!), set.repair!.matrix, 50, 3))
  })

  it.each([
    ['?n=0', { n: 'Ask for a whole number of draws from 1 to 100000' }],
    ['?n=100001', { n: 'Ask for a whole number of draws from 1 to 100000' }],
    ['?n=2.5', { n: 'Ask for a whole number of draws from 1 to 100000' }],
    ['?n=many', { n: 'Ask for a whole number of draws from 1 to 100000' }],
    ['?seed=-1', { seed: 'The seed is a whole number from 0 to 2147483647' }],
    ['?seed=1e12', { seed: 'The seed is a whole number from 0 to 2147483647' }],
    ['?n=5&seed=x', { seed: 'The seed is a whole number from 0 to 2147483647' }],
    ['?n=', { n: 'Ask for a whole number of draws from 1 to 100000' }],
    ['?n=1&n=2', { n: 'Must be a number' }],
    ['?draws=5', { draws: 'Unknown field: draws' }],
  ])('refuses %s with a field error', async (query, fields) => {
    const res = await draws(q.bursts, query)
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual(fields)
  })

  it('gives the linked set model code that reads back: a multivariate normal when every prior is normal', async () => {
    const set = (await linked()).sets.find((s) => s.marginals.some((m) => m.quantityId === q.bursts))!
    expect(set.modelCode.map((m) => [m.language, m.form, m.check?.ok])).toEqual([
      ['stan', 'multivariate-normal', true], ['pymc', 'multivariate-normal', true], ['jags', 'multivariate-normal', true], ['brms', 'multivariate-normal', true],
    ])
    expect(set.modelCode[0].code).toContain('joint_bursts_repair_flow ~ multi_normal(')
  })
})

describe('weights from reconciliations that leave an expert out', () => {
  it('gives an expert left out of one quantity’s reconciliation no weight from that side', async () => {
    const second = (await h.db('users').where({ email: 'expert2@kestrel.example' }).first('id')).id as number
    // Night flow reconciled again without the second expert; repair time keeps its 1 : 3 weights. The link's weights are
    // (1 + 0.25)/2 = 0.625 and (0 + 0.75)/2 = 0.375 (constructed, by hand).
    await analyst.put(`/api/quantities/${q.flow}/reconciliation`, {
      roundId, method: 'linear', weights: 'equal', excludedExperts: [second], family: 'normal', reconciled: true, version: 1,
      rationale: 'The second expert has not worked on the night-flow loggers.',
    }).expect(200)
    const v = linkView(await linked(), link.repairFlow)
    expect(v.answers.map((a) => [a.label, a.weight])).toEqual([['Expert 1', 0.625], ['Expert 2', 0.375]])
  })
})

describe('access', () => {
  it('is the study team’s: experts and outsiders are refused, reviewers read but do not decide', async () => {
    expect((await experts[0].get(`/api/studies/${studyId}/linked-quantities`)).status).toBe(403)
    expect((await experts[0].get(`/api/quantities/${q.bursts}/joint-draws`)).status).toBe(403)
    expect((await experts[0].put(`/api/links/${link.repairFlow}/reconciliation`, { decision: 'confirm', version: 0 })).status).toBe(403)
    expect((await reviewer.put(`/api/links/${link.repairFlow}/reconciliation`, { decision: 'confirm', version: 0 })).status).toBe(403)
    const outsider = await signedIn(h, 'expert3@kestrel.example')
    expect((await outsider.get(`/api/studies/${studyId}/linked-quantities`)).status).toBe(403)
    expect((await analyst.put('/api/links/2000000000/reconciliation', { decision: 'confirm', version: 0 })).status).toBe(404)
    expect((await linked(reviewer)).links.map((l) => l.linkId)).toEqual([link.burstsRepair, link.repairFlow, link.ab, link.bc, link.ac])
    expect(await h.db('link_reconciliations').where({ link_id: link.repairFlow }).select('version', 'decision')).toEqual([{ version: 1, decision: 'confirm' }])
  })
})
