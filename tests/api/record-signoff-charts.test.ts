import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

// The audit trail tells what happened, once: a refused sign-off leaves no event, and the charts a reviewer reads
// in the .docx are the ones fixed when the record was submitted.

let h: ApiHarness
let analyst: Client
let reviewer: Client
let studyId: number

/** A PNG signature followed by `tag`, as the chart route's data URL. */
const png = (tag: string) => {
  const bytes = Buffer.concat([Buffer.from('89504e470d0a1a0a', 'hex'), Buffer.from(tag)])
  return { bytes, url: `data:image/png;base64,${bytes.toString('base64')}` }
}
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex')
const eventsOf = (action: string) => h.db('audit_events').where({ study_id: studyId, action }).orderBy('id').select('subject', 'details', 'actor_id')

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Record integrity study', context: 'Sign-off races and chart changes.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  const q = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body
  // Fixture: a reconciled prior (the reconciliation workflow is tested in reconciliation.test.ts).
  await h.db('reconciliations').insert({
    quantity_id: q.id, method: 'linear', weights_mode: 'equal', family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 3.2, sigma: 1.1 }),
    status: 'reconciled', rationale: 'Fixture for the sign-off and chart test.',
  })
  await analyst.put(`/api/quantities/${q.id}/impact/not-run`, { reason: 'No pilot data exist for this quantity yet.' }).expect(200)
})
afterAll(async () => {
  await h.close()
})

describe('record charts', () => {
  it('lets the analyst store a draft’s chart with an audit event naming its SHA-256, and not a reviewer', async () => {
    const first = png('first drawing')
    expect((await reviewer.post(`/api/studies/${studyId}/record/charts`, { symbol: 'flow', png: first.url })).status).toBe(403)
    await analyst.post(`/api/studies/${studyId}/record/charts`, { symbol: 'flow', png: first.url }).expect(204)
    // The same picture sent again (another page load) changes nothing and is not logged twice.
    await analyst.post(`/api/studies/${studyId}/record/charts`, { symbol: 'flow', png: first.url }).expect(204)
    const events = await eventsOf('record.chart')
    expect(events).toEqual([expect.objectContaining({ subject: 'record:v1', details: { symbol: 'flow', sha256: sha(first.bytes) } })])
  })

  it('fixes the charts at submission: the submit event carries their hashes and no one replaces them in review', async () => {
    await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
    const [submit] = await eventsOf('record.submit')
    expect(submit.details.charts).toEqual({ flow: sha(png('first drawing').bytes) })
    for (const c of [analyst, reviewer]) {
      const res = await c.post(`/api/studies/${studyId}/record/charts`, { symbol: 'flow', png: png('replacement').url })
      expect([403, 409]).toContain(res.status)
    }
    const res = await analyst.post(`/api/studies/${studyId}/record/charts`, { symbol: 'flow', png: png('replacement').url })
    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('The record is in review; its charts were fixed when it was submitted. Return it to draft to change them.')
    const stored = await h.db('record_charts as c').join('prior_records as r', 'r.id', 'c.record_id').where({ 'r.study_id': studyId }).first('c.png')
    expect(sha(stored.png)).toBe(sha(png('first drawing').bytes))
    expect(await eventsOf('record.chart')).toHaveLength(1)
  })
})

describe('sign-off race', () => {
  it('gives five simultaneous sign-offs one 200 and four 409s, and writes exactly one sign-off event', async () => {
    const results = await Promise.all(Array.from({ length: 5 }, () => reviewer.post(`/api/studies/${studyId}/record/sign-off`)))
    expect(results.map((r) => r.status).sort()).toEqual([200, 409, 409, 409, 409])
    const signOffs = await eventsOf('record.sign-off')
    expect(signOffs).toHaveLength(1)
    const winner = results.find((r) => r.status === 200)!.body
    expect(winner.record.status).toBe('signed_off')
    expect(winner.changeHistory.at(-1)).toMatchObject({ action: 'record.sign-off', hash: winner.record.auditHead })
    expect(winner.auditChain.intact).toBe(true)
  })
})
