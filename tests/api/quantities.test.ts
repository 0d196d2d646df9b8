import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
let analyst: Client
let expert1: Client
let studyA: number
let studyB: number

const burstRate = {
  name: 'Burst rate of old cast-iron mains',
  symbol: 'lambda_burst',
  unit: 'bursts per 100 km per year',
  question: 'Across the Board’s cast-iron mains laid before 1960, what is the average number of bursts per 100 km of main per year over 2027–2031?',
  support: { kind: 'positive' },
  assumptions: 'No change in pressure regime; winters like the last ten years.',
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  expert1 = await signedIn(h, 'expert1@kestrel.example')
  studyA = (await analyst.post('/api/studies', { title: 'Quantities test study A', context: 'Testing quantities in study A.' }).expect(201)).body.id
  studyB = (await analyst.post('/api/studies', { title: 'Quantities test study B', context: 'Testing quantities in study B.' }).expect(201)).body.id
  const users = (await analyst.get('/api/users/directory').expect(200)).body
  const e1 = users.find((u: { email: string }) => u.email === 'expert1@kestrel.example')
  await analyst.post(`/api/studies/${studyA}/members`, { userId: e1.id, studyRole: 'expert' }).expect(201)
})
afterAll(async () => {
  await h.close()
})

describe('studies', () => {
  it('lets an analyst create a study, owning it as its analyst', async () => {
    const res = await analyst.get(`/api/studies/${studyA}`).expect(200)
    expect(res.body).toMatchObject({ title: 'Quantities test study A', myRole: 'analyst', status: 'framing', memberCount: 2, version: 1 })
    expect(res.body.members.map((m: { studyRole: string }) => m.studyRole).sort()).toEqual(['analyst', 'expert'])
  })

  it('refuses study creation to experts and reviewers', async () => {
    expect((await expert1.post('/api/studies', { title: 'Mine', context: 'An expert should not create studies.' })).status).toBe(403)
  })

  it('edits with the version seen and answers 409 to a stale edit, keeping the first edit', async () => {
    const first = await analyst.patch(`/api/studies/${studyB}`, { title: 'Quantities test study B (renamed)', context: 'Edited once.', version: 1 })
    expect(first.status).toBe(200)
    expect(first.body.version).toBe(2)
    const stale = await analyst.patch(`/api/studies/${studyB}`, { title: 'Lost edit', context: 'Stale.', version: 1 })
    expect(stale.status).toBe(409)
    expect((await analyst.get(`/api/studies/${studyB}`)).body.title).toBe('Quantities test study B (renamed)')
  })

  it('refuses an expert account as the study analyst', async () => {
    const users = (await analyst.get('/api/users/directory')).body
    const e2 = users.find((u: { email: string }) => u.email === 'expert2@kestrel.example')
    const res = await analyst.post(`/api/studies/${studyA}/members`, { userId: e2.id, studyRole: 'analyst' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ studyRole: 'Not for a expert account' })
  })
})

describe('quantities', () => {
  let quantityId: number

  it('creates a quantity and lists it for members', async () => {
    const res = await analyst.post(`/api/studies/${studyA}/quantities`, burstRate)
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ name: burstRate.name, symbol: 'lambda_burst', support: { kind: 'positive' }, version: 1, files: [] })
    quantityId = res.body.id
    const list = await expert1.get(`/api/studies/${studyA}/quantities`).expect(200)
    expect(list.body.map((q: { symbol: string }) => q.symbol)).toEqual(['lambda_burst'])
  })

  it('answers 400 with a message per field for a bad quantity, saving nothing', async () => {
    const res = await analyst.post(`/api/studies/${studyA}/quantities`, { name: '', symbol: '9x', question: 'Too short', support: { kind: 'bounded', lower: 10, upper: 2 } })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({
      name: 'Enter a name',
      symbol: 'Start with a letter; use letters, digits and _ only',
      question: 'Use at least 20 characters',
      'support.upper': 'Upper bound must be above the lower bound',
    })
    expect((await analyst.get(`/api/studies/${studyA}/quantities`)).body).toHaveLength(1)
  })

  it('refuses a duplicate symbol within the study', async () => {
    const res = await analyst.post(`/api/studies/${studyA}/quantities`, { ...burstRate, symbol: 'LAMBDA_BURST' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ symbol: 'Another quantity in this study uses this symbol' })
  })

  it('updates with optimistic locking and audits the before/after wording', async () => {
    const ok = await analyst.patch(`/api/quantities/${quantityId}`, { ...burstRate, support: { kind: 'bounded', lower: 0, upper: 100 }, version: 1 })
    expect(ok.status).toBe(200)
    expect(ok.body.support).toEqual({ kind: 'bounded', lower: 0, upper: 100 })
    const stale = await analyst.patch(`/api/quantities/${quantityId}`, { ...burstRate, version: 1 })
    expect(stale.status).toBe(409)
    const audit = await analyst.get(`/api/studies/${studyA}/audit`).expect(200)
    const update = audit.body.find((e: { action: string }) => e.action === 'quantity.update')
    expect(update.details.before.support).toEqual({ kind: 'positive' })
    expect(update.details.after.support).toEqual({ kind: 'bounded', lower: 0, upper: 100 })
    expect(update.actorName).toBe('Priya Natarajan')
  })

  it('lets experts read but not write quantities', async () => {
    expect((await expert1.post(`/api/studies/${studyA}/quantities`, burstRate)).status).toBe(403)
    expect((await expert1.patch(`/api/quantities/${quantityId}`, { ...burstRate, version: 2 })).status).toBe(403)
  })

  it('keeps an expert of study A out of study B', async () => {
    expect((await expert1.get(`/api/studies/${studyB}`)).status).toBe(403)
    expect((await expert1.get(`/api/studies/${studyB}/quantities`)).status).toBe(403)
    expect((await expert1.get('/api/studies/987654')).status).toBe(404)
  })
})

describe('evidence files', () => {
  let quantityId: number
  let fileId: number
  beforeAll(async () => {
    quantityId = (await analyst.post(`/api/studies/${studyA}/quantities`, { ...burstRate, symbol: 'ev_q' }).expect(201)).body.id
  })

  it('stores a PDF and serves it only to study members, as a download', async () => {
    const pdf = Buffer.from('%PDF-1.4\n1 0 obj << >> endobj\ntrailer << >>\n%%EOF\n')
    const res = await analyst.agent.post(`/api/quantities/${quantityId}/files`).set('x-csrf-token', analyst.token).attach('file', pdf, { filename: 'burst-history.pdf', contentType: 'application/pdf' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ filename: 'burst-history.pdf', mimeType: 'application/pdf', sizeBytes: pdf.length })
    fileId = res.body.id
    const got = await expert1.get(`/api/files/${fileId}`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = []
      r.on('data', (c: Buffer) => chunks.push(c))
      r.on('end', () => cb(null, Buffer.concat(chunks)))
    })
    expect(got.status).toBe(200)
    expect(got.headers['content-disposition']).toMatch(/^attachment;/)
    expect(Buffer.compare(got.body, pdf)).toBe(0)
    const outsider = await signedIn(h, 'expert3@kestrel.example')
    expect((await outsider.get(`/api/files/${fileId}`)).status).toBe(403)
  })

  it('refuses a file whose content is not PDF, CSV or an image, whatever its name claims', async () => {
    const exe = Buffer.from('MZ\x90\x00 this is not a pdf')
    const res = await analyst.agent.post(`/api/quantities/${quantityId}/files`).set('x-csrf-token', analyst.token).attach('file', exe, { filename: 'report.pdf', contentType: 'application/pdf' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ file: 'Upload a PDF, CSV, PNG or JPEG file' })
  })

  it('refuses a file over 5 MB', async () => {
    const big = Buffer.alloc(5 * 1024 * 1024 + 10, 0x41)
    big.write('%PDF-')
    const res = await analyst.agent.post(`/api/quantities/${quantityId}/files`).set('x-csrf-token', analyst.token).attach('file', big, { filename: 'big.pdf' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ file: 'Files may be at most 5 MB' })
    expect((await analyst.get(`/api/quantities/${quantityId}`)).body.files).toHaveLength(1)
  })
})

describe('calibration questions', () => {
  it('hides true values from experts and shows them to the analyst', async () => {
    const created = await analyst.post(`/api/studies/${studyA}/calibration-questions`, { question: 'How many bursts were recorded on the Board’s network in 2024?', unit: 'bursts', trueValue: 412 })
    expect(created.status).toBe(201)
    expect(created.body.trueValue).toBe(412)
    const later = await analyst.post(`/api/studies/${studyA}/calibration-questions`, { question: 'Mean night flow in district 7 in March 2025 (L/s)?', unit: 'L/s' })
    expect(later.body.trueValue).toBeNull()
    const asExpert = await expert1.get(`/api/studies/${studyA}/calibration-questions`).expect(200)
    expect(asExpert.body).toHaveLength(2)
    for (const q of asExpert.body) expect(q).not.toHaveProperty('trueValue')
    const asAnalyst = await analyst.get(`/api/studies/${studyA}/calibration-questions`).expect(200)
    expect(asAnalyst.body.map((q: { trueValue: number | null }) => q.trueValue)).toEqual([412, null])
  })

  it('fills in a true value later, with the version seen', async () => {
    const list = (await analyst.get(`/api/studies/${studyA}/calibration-questions`)).body
    const q = list[1]
    const res = await analyst.patch(`/api/calibration-questions/${q.id}`, { question: q.question, unit: q.unit, trueValue: 38.5, version: q.version })
    expect(res.status).toBe(200)
    expect(res.body.trueValue).toBe(38.5)
    expect((await expert1.post(`/api/studies/${studyA}/calibration-questions`, { question: 'An expert cannot add this one', unit: '' })).status).toBe(403)
  })
})
