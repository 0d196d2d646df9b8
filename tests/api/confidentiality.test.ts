import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

// What an expert may learn: never the calibration true values, never another expert's answer from a round that is
// still open, never the names a record hides. The record belongs to analysts and reviewers; feedback comes only from
// earlier rounds that have closed, and only for a round the expert can open.

let h: ApiHarness
let analyst: Client
let reviewer: Client
let expert1: Client
let expert2: Client
let studyId: number
let quantityId: number
let round1: number
const day = 24 * 3600 * 1000
const TRUE_VALUE = 61.25
const HELEN_RATIONALE = 'Regional statistics for old cast iron, 2019 to 2024.'

const answer = (median: number, rationale: string) => ({
  method: 'quantile', lower: 2, upper: 40, version: 0, rationale,
  points: [{ value: median - 3, prob: 0.25 }, { value: median, prob: 0.5 }, { value: median + 6, prob: 0.75 }],
})

const docxText = async (c: Client, url: string) => {
  const res = await c.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (x: Buffer) => chunks.push(x))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
  expect(res.status).toBe(200)
  return (await mammoth.extractRawText({ buffer: res.body as Buffer })).value
}

async function roundWith(title: string, emails: string[], opts: { open: boolean; feedback: boolean }) {
  const round = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(),
    feedbackEnabled: opts.feedback, items: [{ quantityId, method: 'quantile' }],
  }).expect(201)).body
  for (const email of emails) await analyst.post(`/api/rounds/${round.id}/invitations`, { email, name: email.split('@')[0] }).expect(201)
  if (opts.open) await analyst.post(`/api/rounds/${round.id}/open`).expect(200)
  return round.id as number
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  expert1 = await signedIn(h, 'expert1@kestrel.example')
  expert2 = await signedIn(h, 'expert2@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Confidentiality study', context: 'What experts may see of each other.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  const reviewerId = directory.find((u) => u.email === 'reviewer@kestrel.example')!.id
  await analyst.post(`/api/studies/${studyId}/members`, { userId: reviewerId, studyRole: 'reviewer' }).expect(201)
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Burst rate', symbol: 'burst', unit: 'bursts/100 km/yr', question: 'Bursts per 100 km of old cast-iron main per year?', support: { kind: 'positive' },
  }).expect(201)).body.id
  await analyst.post(`/api/studies/${studyId}/calibration-questions`, { question: 'Bursts recorded on the Kestrel network in 2024?', unit: 'bursts', trueValue: TRUE_VALUE }).expect(201)
  round1 = await roundWith('Round one', ['expert1@kestrel.example', 'expert2@kestrel.example'], { open: true, feedback: false })
  await expert1.put(`/api/rounds/${round1}/judgements/${quantityId}`, answer(10, 'The 2023 burst register for the northern district.')).expect(200)
  await expert2.put(`/api/rounds/${round1}/judgements/${quantityId}`, answer(14, HELEN_RATIONALE)).expect(200)
  for (const c of [expert1, expert2]) {
    await c.put(`/api/rounds/${round1}/declaration`, { expertise: 'Twenty years of mains renewal planning.', interests: 'none', seenPilotData: false }).expect(200)
  }
  // Both submitted (the submit step itself, with its calibration answers, is tested in judgements.test.ts).
  await h.db('judgements').where({ round_id: round1 }).update({ status: 'submitted', submitted_at: h.db.fn.now() })
})
afterAll(async () => {
  await h.close()
})

describe('the prior record is not for experts', () => {
  it('refuses the record, its JSON and its .docx to an expert member, while round one is open', async () => {
    for (const path of ['record', 'record.json', 'record.docx']) {
      const res = await expert1.get(`/api/studies/${studyId}/${path}`)
      expect(res.status, path).toBe(403)
      expect(res.body.error.message).toBe('The prior record is for the study’s analysts and reviewers')
      expect(JSON.stringify(res.body)).not.toContain(String(TRUE_VALUE))
      expect(JSON.stringify(res.body)).not.toContain('Helen')
    }
  })

  it('still gives analysts and reviewers the record, with the true values they audit', async () => {
    for (const c of [analyst, reviewer]) {
      const res = await c.get(`/api/studies/${studyId}/record`).expect(200)
      expect(res.body.content.calibration.questions[0].trueValue).toBe(TRUE_VALUE)
    }
  })

  it('names no expert anywhere in the record while names are hidden, change history included, in every form', async () => {
    // The experts' own saves and the invitations are in the study's audit trail with the experts as actors.
    const view = (await reviewer.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(view.record.showNames).toBe(false)
    const actors = new Set(view.changeHistory.map((e: { actor: string }) => e.actor))
    expect(actors.has('Priya Natarajan')).toBe(true)
    const codes = view.content.panel.map((p: { code: string }) => p.code)
    expect(codes).toHaveLength(2)
    const expertActors = view.changeHistory.filter((e: { action: string }) => e.action === 'declaration.save').map((e: { actor: string }) => e.actor)
    expect(expertActors.sort()).toEqual([...codes].sort())
    for (const body of [JSON.stringify(view), JSON.stringify((await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)).body), await docxText(reviewer, `/api/studies/${studyId}/record.docx`)]) {
      for (const name of ['Tomasz', 'Wierzbicki', 'Helen Okafor', 'expert1@', 'expert2@']) expect(body).not.toContain(name)
    }
    // With names shown, the same history names them.
    await analyst.patch(`/api/studies/${studyId}/record`, { showNames: true }).expect(200)
    const named = (await reviewer.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(named.changeHistory.map((e: { actor: string }) => e.actor)).toContain('Tomasz Wierzbicki')
    await analyst.patch(`/api/studies/${studyId}/record`, { showNames: false }).expect(200)
  })
})

describe('feedback from earlier rounds', () => {
  it('refuses feedback for a draft round the expert cannot open', async () => {
    const draft = await roundWith('Round two (draft)', ['expert1@kestrel.example'], { open: false, feedback: true })
    expect((await expert1.get(`/api/rounds/${draft}`)).status).toBe(403)
    const res = await expert1.get(`/api/rounds/${draft}/feedback`)
    expect(res.status).toBe(403)
    expect(JSON.stringify(res.body)).not.toContain(HELEN_RATIONALE)
  })

  it('shows nothing from an earlier round that is still open, and the others’ answers once it has closed', async () => {
    const round2 = await roundWith('Round two', ['expert1@kestrel.example'], { open: true, feedback: true })
    const whileOpen = await expert1.get(`/api/rounds/${round2}/feedback`).expect(200)
    expect(whileOpen.body).toEqual([{ quantityId, previousRound: null, mine: null, others: [] }])
    expect(JSON.stringify(whileOpen.body)).not.toContain(HELEN_RATIONALE)

    await analyst.post(`/api/rounds/${round1}/close`).expect(200)
    const closed = await expert1.get(`/api/rounds/${round2}/feedback`).expect(200)
    expect(closed.body[0].previousRound).toEqual({ id: round1, number: 1 })
    expect(closed.body[0].others).toEqual([expect.objectContaining({ label: expect.stringMatching(/^Expert \d+$/), rationale: HELEN_RATIONALE })])
    expect(closed.body[0].mine.rationale).toBe('The 2023 burst register for the northern district.')
  })
})
