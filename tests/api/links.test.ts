import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, normalQuantileAnswer, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
let analyst: Client
let expert1: Client
let expert2: Client
let reviewer: Client
let studyId: number
let roundId: number
const q: Record<string, number> = {}
const day = 24 * 3600e3

async function auditOf(roundId: number, action: string): Promise<Record<string, unknown>[]> {
  return (await h.db('audit_events').where({ subject: `round:${roundId}`, action }).orderBy('id').select('details')).map((r) => r.details)
}

async function draftRound(title: string, quantityIds: number[]): Promise<number> {
  return (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
    items: quantityIds.map((quantityId) => ({ quantityId, method: 'quantile' })),
  }).expect(201)).body.id
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  expert1 = await signedIn(h, 'expert1@kestrel.example')
  expert2 = await signedIn(h, 'expert2@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'links: quantities that move together', context: 'Mains bursts and the time to repair them.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory').expect(200)).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  for (const [symbol, name] of [['bursts', 'Mains burst rate'], ['repair', 'Repair time'], ['flow', 'Night-flow reduction'], ['kv', 'KV-07 pressure']] as const) {
    q[symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, { name, symbol, unit: 'u', question: `What is the ${name.toLowerCase()} on the Kestrel Valley network?`, support: { kind: 'positive' } }).expect(201)).body.id
  }
  roundId = await draftRound('links: round 1', [q.bursts, q.repair, q.flow])
})
afterAll(async () => {
  await h.close()
})

describe('the analyst links two quantities of a draft round', () => {
  let linkId: number

  it('creates a link with the default question in plain words, lists it in the round, and audits it in the same transaction', async () => {
    const res = await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q.bursts, secondQuantityId: q.repair })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      roundId, position: 1, version: 1,
      first: { quantityId: q.bursts, name: 'Mains burst rate', symbol: 'bursts' },
      second: { quantityId: q.repair, name: 'Repair time', symbol: 'repair' },
      wording: 'Suppose mains burst rate turned out above your middle value. How likely is it that repair time is also above yours?',
    })
    linkId = res.body.id
    const round = (await analyst.get(`/api/rounds/${roundId}`).expect(200)).body
    expect(round.links.map((l: { id: number }) => l.id)).toEqual([linkId])
    expect((await reviewer.get(`/api/links/${linkId}`).expect(200)).body.wording).toBe(res.body.wording)
    expect(await auditOf(roundId, 'link.create')).toEqual([{ linkId, firstQuantityId: q.bursts, secondQuantityId: q.repair }])
  })

  it('keeps an abbreviation as written in the default question and takes the analyst’s own wording when given', async () => {
    const abbreviated = (await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q.flow, secondQuantityId: q.bursts }).expect(201)).body
    expect(abbreviated.wording).toBe('Suppose night-flow reduction turned out above your middle value. How likely is it that mains burst rate is also above yours?')
    await analyst.delete(`/api/links/${abbreviated.id}`).expect(204)
    const own = '  If the night flow fell more than you expect, would repairs also take longer than you expect?  '
    const worded = (await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q.flow, secondQuantityId: q.repair, wording: own }).expect(201)).body
    expect(worded).toMatchObject({ wording: own.trim(), position: 2 })
    await analyst.delete(`/api/links/${worded.id}`).expect(204)
    const kvRound = await draftRound('links: abbreviations', [q.kv, q.repair])
    const kv = (await analyst.post(`/api/rounds/${kvRound}/links`, { firstQuantityId: q.kv, secondQuantityId: q.repair }).expect(201)).body
    expect(kv.wording).toBe('Suppose KV-07 pressure turned out above your middle value. How likely is it that repair time is also above yours?')
  })

  it.each([
    ['the same quantity twice', () => ({ firstQuantityId: q.bursts, secondQuantityId: q.bursts }), { secondQuantityId: 'Choose two different quantities' }],
    ['a quantity not asked in the round', () => ({ firstQuantityId: q.bursts, secondQuantityId: q.kv }), { secondQuantityId: 'Choose a quantity asked in this round' }],
    ['a pair already linked, in the same order', () => ({ firstQuantityId: q.bursts, secondQuantityId: q.repair }), { secondQuantityId: 'These two quantities are already linked in this round' }],
    ['a pair already linked, in the other order', () => ({ firstQuantityId: q.repair, secondQuantityId: q.bursts }), { secondQuantityId: 'These two quantities are already linked in this round' }],
    ['no first quantity', () => ({ secondQuantityId: q.bursts }), { firstQuantityId: 'Choose the first quantity' }],
    ['a first quantity that is text', () => ({ firstQuantityId: 'bursts', secondQuantityId: q.repair }), { firstQuantityId: 'Choose the first quantity' }],
    ['a wording too long', () => ({ firstQuantityId: q.flow, secondQuantityId: q.repair, wording: 'x'.repeat(1001) }), { wording: 'Use at most 1000 characters' }],
    ['an unknown field', () => ({ firstQuantityId: q.flow, secondQuantityId: q.repair, rho: 0.5 }), { rho: 'Unknown field: rho' }],
  ])('refuses %s with 400 and the field’s message, saving nothing', async (_, body, fields) => {
    const before = await h.db('round_links').where({ round_id: roundId }).count({ n: '*' })
    const res = await analyst.post(`/api/rounds/${roundId}/links`, body())
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toMatchObject(fields)
    expect(await h.db('round_links').where({ round_id: roundId }).count({ n: '*' })).toEqual(before)
  })

  it('edits the order of the pair (the default wording follows), refuses a stale version with 409, and audits before and after', async () => {
    const res = await analyst.patch(`/api/links/${linkId}`, { firstQuantityId: q.repair, secondQuantityId: q.bursts, version: 1 }).expect(200)
    expect(res.body).toMatchObject({ version: 2, first: { quantityId: q.repair }, second: { quantityId: q.bursts } })
    expect(res.body.wording).toBe('Suppose repair time turned out above your middle value. How likely is it that mains burst rate is also above yours?')
    const stale = await analyst.patch(`/api/links/${linkId}`, { firstQuantityId: q.bursts, secondQuantityId: q.repair, version: 1 })
    expect(stale.status).toBe(409)
    expect(stale.body.error.message).toMatch(/changed this link since you opened it/)
    expect((await analyst.get(`/api/links/${linkId}`).expect(200)).body.first.quantityId).toBe(q.repair)
    const [event] = await auditOf(roundId, 'link.update')
    expect(event).toMatchObject({ linkId, before: { firstQuantityId: q.bursts, secondQuantityId: q.repair }, after: { firstQuantityId: q.repair, secondQuantityId: q.bursts } })
    await analyst.patch(`/api/links/${linkId}`, { firstQuantityId: q.bursts, secondQuantityId: q.repair, version: 2 }).expect(200)
  })

  it('reorders the round’s links; a list that leaves one out or names a stranger is refused', async () => {
    const second = (await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q.flow, secondQuantityId: q.repair }).expect(201)).body
    const reordered = (await analyst.put(`/api/rounds/${roundId}/links/order`, { linkIds: [second.id, linkId] }).expect(200)).body
    expect(reordered.map((l: { id: number; position: number }) => [l.id, l.position])).toEqual([[second.id, 1], [linkId, 2]])
    for (const linkIds of [[linkId], [linkId, second.id, 999999], [linkId, linkId]]) {
      const res = await analyst.put(`/api/rounds/${roundId}/links/order`, { linkIds })
      expect(res.status).toBe(400)
      expect(res.body.error.fields.linkIds).toBe('List every link of this round once')
    }
    expect((await analyst.get(`/api/rounds/${roundId}`).expect(200)).body.links.map((l: { id: number }) => l.id)).toEqual([second.id, linkId])
    expect(await auditOf(roundId, 'link.reorder')).toEqual([{ before: [linkId, second.id], after: [second.id, linkId] }])
    await analyst.delete(`/api/links/${second.id}`).expect(204)
  })

  it('drops a link, with its audit event, when the round stops asking one of its quantities', async () => {
    const other = await draftRound('links: items change', [q.bursts, q.repair, q.flow])
    const link = (await analyst.post(`/api/rounds/${other}/links`, { firstQuantityId: q.flow, secondQuantityId: q.repair }).expect(201)).body
    const kept = (await analyst.post(`/api/rounds/${other}/links`, { firstQuantityId: q.bursts, secondQuantityId: q.repair }).expect(201)).body
    const round = (await analyst.get(`/api/rounds/${other}`).expect(200)).body
    const res = await analyst.patch(`/api/rounds/${other}`, { items: [{ quantityId: q.bursts, method: 'quantile' }, { quantityId: q.repair, method: 'quantile' }], version: round.version }).expect(200)
    expect(res.body.links.map((l: { id: number }) => l.id)).toEqual([kept.id])
    expect(await auditOf(other, 'link.delete')).toEqual([{ linkId: link.id, firstQuantityId: q.flow, secondQuantityId: q.repair, reason: 'quantity no longer in the round' }])
  })

  it('only the study’s analysts change links: a reviewer and an expert get 403', async () => {
    const body = { firstQuantityId: q.flow, secondQuantityId: q.bursts }
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz' }).expect(201)
    for (const c of [reviewer, expert1]) {
      expect((await c.post(`/api/rounds/${roundId}/links`, body)).status).toBe(403)
      expect((await c.patch(`/api/links/${linkId}`, { ...body, version: 1 })).status).toBe(403)
      expect((await c.delete(`/api/links/${linkId}`)).status).toBe(403)
    }
  })
})

describe('experts answer the link’s question', () => {
  let linkId: number
  let answerId: number

  beforeAll(async () => {
    linkId = (await analyst.get(`/api/rounds/${roundId}`).expect(200)).body.links[0].id
    await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen' }).expect(201)
    await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
  })

  it('once the round is open the links are frozen: 409 with a message that says why', async () => {
    for (const res of [
      await analyst.post(`/api/rounds/${roundId}/links`, { firstQuantityId: q.flow, secondQuantityId: q.bursts }),
      await analyst.patch(`/api/links/${linkId}`, { firstQuantityId: q.repair, secondQuantityId: q.bursts, version: 3 }),
      await analyst.delete(`/api/links/${linkId}`),
      await analyst.put(`/api/rounds/${roundId}/links/order`, { linkIds: [linkId] }),
    ]) {
      expect(res.status).toBe(409)
      expect(res.body.error.message).toBe('Links can be changed only while the round is a draft: once it is open, every expert must read the same questions')
    }
    expect((await expert1.get(`/api/rounds/${roundId}`).expect(200)).body.links).toHaveLength(1)
  })

  it('autosaves a draft (the chance may still be empty), versions every save, and refuses a stale version', async () => {
    const empty = await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: null, rationale: 'Bursts in frost', version: 0 })
    expect(empty.status).toBe(200)
    expect(empty.body).toMatchObject({ linkId, probability: null, status: 'draft', version: 1 })
    expect(empty.body.expertName).toBeUndefined()
    answerId = empty.body.id
    const saved = await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.7, rationale: 'Bursts in frost keep crews busy.', version: 1 })
    expect(saved.body).toMatchObject({ probability: 0.7, version: 2 })
    const stale = await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.9, rationale: '', version: 1 })
    expect(stale.status).toBe(409)
    const history = (await expert1.get(`/api/link-answers/${answerId}/history`).expect(200)).body
    expect(history.map((v: { version: number; probability: number | null; status: string }) => [v.version, v.probability, v.status])).toEqual([[1, null, 'draft'], [2, 0.7, 'draft']])
  })

  it.each([
    ['0 %', 0], ['100 %', 1], ['below 0', -0.2], ['above 1', 1.5], ['a percentage typed as a number', 70], ['text', 'seventy'],
  ])('refuses a chance of %s with 400 on the field, keeping the saved answer', async (_, probability) => {
    const res = await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability, rationale: '', version: 2 })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ probability: 'Give a chance above 0 % and below 100 %' })
    expect((await h.db('link_answers').where({ id: answerId }).first('probability', 'version'))).toEqual({ probability: 0.7, version: 2 })
  })

  it('an expert sees only their own answer; the study team sees everyone’s under the study’s expert labels; nobody writes another’s', async () => {
    await expert2.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.35, rationale: '', version: 0 }).expect(200)
    const mine = (await expert2.get(`/api/rounds/${roundId}/link-answers`).expect(200)).body
    expect(mine.map((a: { probability: number }) => a.probability)).toEqual([0.35])
    expect((await expert2.get(`/api/link-answers/${answerId}/history`)).status).toBe(403)
    // A save always writes the caller's own answer: expert 2 cannot reach expert 1's.
    await expert2.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.2, rationale: '', version: 1 }).expect(200)
    expect((await h.db('link_answers').where({ id: answerId }).first('probability')).probability).toBe(0.7)
    const all = (await analyst.get(`/api/rounds/${roundId}/link-answers`).expect(200)).body
    expect(all.map((a: { probability: number; expertLabel: string }) => a.probability).sort()).toEqual([0.2, 0.7])
    expect(all.every((a: { expertLabel: string; expertName: string }) => /^Expert \d+$/.test(a.expertLabel) && a.expertName)).toBe(true)
    expect((await reviewer.get(`/api/link-answers/${answerId}/history`).expect(200)).body).toHaveLength(2)
    for (const c of [analyst, reviewer]) expect((await c.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.5, rationale: '', version: 2 })).status).toBe(403)
    expect((await expert1.put(`/api/rounds/${roundId}/link-answers/999999`, { probability: 0.5, rationale: '', version: 0 })).status).toBe(404)
  })

  it('the analyst’s progress counts answers per link, with no values', async () => {
    const progress = (await analyst.get(`/api/rounds/${roundId}/progress`).expect(200)).body
    expect(progress.links).toEqual([{
      linkId, first: { quantityId: q.bursts, name: 'Mains burst rate', symbol: 'bursts' }, second: { quantityId: q.repair, name: 'Repair time', symbol: 'repair' }, answered: 2, submitted: 0,
    }])
    expect((await reviewer.get(`/api/rounds/${roundId}/progress`).expect(200)).body.links[0].answered).toBe(2)
  })

  it('an unanswered link blocks submission with a clear message; submitting freezes the answer with a version', async () => {
    for (const symbol of ['bursts', 'repair', 'flow']) {
      const saved = await expert1.put(`/api/rounds/${roundId}/judgements/${q[symbol]}`, { ...normalQuantileAnswer(20, 4), chosenFamily: null, version: 0 })
      expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    }
    const current = (await expert1.get(`/api/rounds/${roundId}/link-answers`).expect(200)).body[0]
    await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: null, rationale: '', version: current.version }).expect(200)
    const blocked = await expert1.post(`/api/rounds/${roundId}/submit`)
    expect(blocked.status).toBe(400)
    expect(blocked.body.error.fields).toEqual({ [`link.${linkId}`]: 'Mains burst rate and Repair time: say how likely the second is above your middle value when the first is' })
    await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.8, rationale: '', version: current.version + 1 }).expect(200)
    await expert1.post(`/api/rounds/${roundId}/submit`).expect(200)
    const frozen = (await expert1.get(`/api/rounds/${roundId}/link-answers`).expect(200)).body[0]
    expect(frozen).toMatchObject({ probability: 0.8, status: 'submitted', version: current.version + 3 })
    expect(frozen.submittedAt).toEqual(expect.any(String))
    const late = await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.6, rationale: '', version: frozen.version })
    expect(late.status).toBe(409)
    expect(late.body.error.message).toMatch(/You have submitted this round/)
    const history = (await expert1.get(`/api/link-answers/${answerId}/history`).expect(200)).body
    expect(history.at(-1)).toMatchObject({ version: frozen.version, probability: 0.8, status: 'submitted' })
    const [submit] = (await auditOf(roundId, 'round.submit'))
    expect(submit).toEqual({ judgements: 3, linkAnswers: 1 })
    expect((await analyst.get(`/api/rounds/${roundId}/progress`).expect(200)).body.links[0]).toMatchObject({ answered: 2, submitted: 1 })
  })

  it('reopening the expert’s submission makes the link answer a draft again', async () => {
    const expertId = (await h.db('users').where({ email: 'expert1@kestrel.example' }).first('id')).id
    await analyst.post(`/api/rounds/${roundId}/reopen`, { expertId, reason: 'links: asked to revisit' }).expect(204)
    const reopened = (await expert1.get(`/api/rounds/${roundId}/link-answers`).expect(200)).body[0]
    expect(reopened).toMatchObject({ status: 'draft', submittedAt: null, probability: 0.8 })
    await expert1.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.75, rationale: '', version: reopened.version }).expect(200)
  })

  it('a closed round takes no more answers', async () => {
    await analyst.post(`/api/rounds/${roundId}/close`).expect(200)
    const res = await expert2.put(`/api/rounds/${roundId}/link-answers/${linkId}`, { probability: 0.5, rationale: '', version: 2 })
    expect(res.status).toBe(409)
    expect(res.body.error.message).toBe('This round is closed; answers can no longer change')
  })
})
