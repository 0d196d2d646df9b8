import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

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
