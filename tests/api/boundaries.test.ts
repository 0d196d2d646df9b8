import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { runImpact } from '../support/impact'

// Smaller boundaries: closed rounds, names that reach e-mail headers, anonymous token requests, ids of another
// study, removed members and files whose content disagrees with their name.

let h: ApiHarness
let analyst: Client
let studyId: number
let quantityId: number
const day = 24 * 3600 * 1000
const BIDI = ['\u202a', '\u202b', '\u202c', '\u202d', '\u202e', '\u2066', '\u2067', '\u2068', '\u2069', '\u200e', '\u200f', '\u061c']

async function openRound(title: string, panel: { email: string; name: string }[]) {
  const round = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title, opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(), items: [{ quantityId, method: 'quantile' }],
  }).expect(201)).body
  for (const p of panel) await analyst.post(`/api/rounds/${round.id}/invitations`, p).expect(201)
  await analyst.post(`/api/rounds/${round.id}/open`).expect(200)
  return round.id as number
}

async function inviteToken(email: string): Promise<string> {
  const row = await h.db('outbox_messages').where({ to_address: email }).orderBy('id', 'desc').first('text_body')
  return row.text_body.match(/http:\/\/localhost:3000\/invite\/([A-Za-z0-9_-]+)/)[1]
}

const upload = (c: Client, content: Buffer, filename: string) =>
  c.agent.post(`/api/quantities/${quantityId}/files`).set('x-csrf-token', c.token).attach('file', content, { filename, contentType: 'application/octet-stream' })

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Boundaries study', context: 'Edges of what the API accepts.' }).expect(201)).body.id
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body.id
})
afterAll(async () => {
  await h.close()
})

describe('invitation links of a closed round', () => {
  it('refuses the link with a clear message once the round has closed, and creates no account', async () => {
    const email = `late.expert.${Date.now()}@example.org`
    const roundId = await openRound('Closing round', [{ email, name: 'Mara Lindqvist' }])
    const token = await inviteToken(email)
    await analyst.post(`/api/rounds/${roundId}/close`).expect(200)
    const visitor = new Client(h)
    await visitor.csrf()
    const info = await visitor.get(`/api/invitations/${token}`).expect(200)
    expect(info.body).toMatchObject({ state: 'closed', message: 'This round has closed, so the invitation can no longer be used. Ask the analyst if you still want to take part.' })
    const accept = await visitor.post(`/api/invitations/${token}/accept`, { name: 'Mara Lindqvist', password: 'rivers-and-pipes-7' })
    expect(accept.status).toBe(410)
    expect(accept.body.error.message).toBe(info.body.message)
    expect(await h.db('users').where({ email }).first('id')).toBeUndefined()
    expect((await visitor.get('/api/auth/me')).status).toBe(401)
  })
})

describe('display names', () => {
  it('refuses bidirectional control characters wherever a name is given', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
      title: 'Names round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * day).toISOString(), items: [{ quantityId, method: 'quantile' }],
    }).expect(201)).body.id
    for (const mark of BIDI) {
      const name = `Mara ${mark}nordqvist`
      const code = mark.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')
      const invite = await analyst.post(`/api/rounds/${roundId}/invitations`, { email: `bidi.${code}@example.org`, name })
      expect(invite.status, code).toBe(400)
      expect(invite.body.error.fields).toEqual({ name: 'Remove the invisible text-direction characters from the name' })
      const created = await admin.post('/api/users', { email: `bidi.${code}@kestrel.example`, displayName: name, role: 'expert', password: 'rivers-and-pipes-7' })
      expect(created.body.error.fields, code).toEqual({ displayName: 'Remove the invisible text-direction characters from the name' })
    }
    expect(await h.db('round_panel').where({ round_id: roundId }).count('* as n').first()).toEqual({ n: '0' })
  })

  it('keeps them out of the e-mail To header for names stored before the rule', async () => {
    const email = `old.name.${Date.now()}@example.org`
    const roundId = await openRound('Header round', [{ email, name: 'Mara Lindqvist' }])
    const member = await h.db('round_panel').where({ round_id: roundId, email }).first('id')
    await h.db('round_panel').where({ id: member.id }).update({ name: 'Mara \u202eqvist\u202c Lind\u200f' })
    await analyst.post(`/api/rounds/${roundId}/panel/${member.id}/resend`).expect(200)
    const row = await h.db('outbox_messages').where({ to_address: email }).orderBy('id', 'desc').first('to_name')
    expect(row.to_name).toBe('Mara qvist Lind')
  })
})

describe('anonymous CSRF tokens', () => {
  it('stores no session row for anonymous token requests, and the token still lets a sign-in through', async () => {
    const before = Number((await h.db('session').count('* as n').first())!.n)
    for (let i = 0; i < 5; i++) {
      const res = await request(h.built.app).get('/api/auth/csrf').expect(200)
      expect(res.body.token).toMatch(/\S{20,}/)
    }
    expect(Number((await h.db('session').count('* as n').first())!.n)).toBe(before)
    const c = await signedIn(h, 'expert2@kestrel.example')
    expect((await c.get('/api/auth/me').expect(200)).body.email).toBe('expert2@kestrel.example')
  })

  it('refuses an anonymous write whose token is missing, forged or another client’s', async () => {
    const mine = new Client(h)
    // Asked again, the same client keeps its token (another tab's token stays good).
    expect(await mine.csrf()).toBe(await mine.csrf())
    const theirs = new Client(h)
    await theirs.csrf()
    const body = { email: 'expert2@kestrel.example', password: 'priorsmith-demo' }
    expect((await mine.agent.post('/api/auth/sign-in').send(body)).status).toBe(403)
    expect((await mine.agent.post('/api/auth/sign-in').set('x-csrf-token', theirs.token).send(body)).status).toBe(403)
    expect((await mine.agent.post('/api/auth/sign-in').set('x-csrf-token', `${mine.token}x`).send(body)).status).toBe(403)
    expect((await request(h.built.app).post('/api/auth/sign-in').set('x-csrf-token', mine.token).send(body)).status).toBe(403)
    expect((await mine.agent.post('/api/auth/sign-in').set('x-csrf-token', mine.token).send(body)).status).toBe(200)
  })
})

describe('ids of another study', () => {
  it('answers 404 for another study’s dataset, and keeps the field message for another quantity of the same study', async () => {
    const otherStudy = (await analyst.post('/api/studies', { title: 'Other study', context: 'Holds a dataset.' }).expect(201)).body.id
    const otherQuantity = (await analyst.post(`/api/studies/${otherStudy}/quantities`, {
      name: 'Flow elsewhere', symbol: 'flow2', unit: 'L/s', question: 'Mean reduction in night flow elsewhere?', support: { kind: 'real' },
    }).expect(201)).body.id
    const dataset = (await analyst.agent.post(`/api/studies/${otherStudy}/datasets`).set('x-csrf-token', analyst.token)
      .field('quantityId', String(otherQuantity)).field('name', 'Pilot').field('model', 'normal-known-sigma').field('valueColumn', 'v').field('sigma', '2')
      .attach('file', Buffer.from('v\n2.2\n3.5\n2.8\n'), 'p.csv').expect(201)).body
    const res = await runImpact(analyst, quantityId, { datasetId: dataset.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
    expect(res.status).toBe(404)
    expect(res.body.error.message).toBe('Dataset not found')
    const sibling = (await analyst.post(`/api/studies/${otherStudy}/quantities`, {
      name: 'Flow beside', symbol: 'flow3', unit: 'L/s', question: 'Mean reduction in night flow beside it?', support: { kind: 'real' },
    }).expect(201)).body.id
    const same = await runImpact(analyst, sibling, { datasetId: dataset.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
    expect(same.status).toBe(400)
    expect(same.body.error.fields).toEqual({ datasetId: 'Choose a dataset of this quantity' })
  })
})

describe('a member removed from a study', () => {
  it('no longer sees its rounds or title on their start page', async () => {
    const expert = await signedIn(h, 'expert3@kestrel.example')
    const roundId = await openRound('Removal round', [{ email: 'expert3@kestrel.example', name: 'Rafael Duarte' }])
    const listed = (await expert.get('/api/my/rounds').expect(200)).body as { id: number; studyTitle: string }[]
    expect(listed.map((r) => r.id)).toContain(roundId)
    const expertId = (await h.db('users').where({ email: 'expert3@kestrel.example' }).first('id')).id
    await analyst.delete(`/api/studies/${studyId}/members/${expertId}`).expect(204)
    const after = (await expert.get('/api/my/rounds').expect(200)).body as { id: number; studyTitle: string }[]
    expect(after.map((r) => r.id)).not.toContain(roundId)
    expect(JSON.stringify(after)).not.toContain('Boundaries study')
  })
})

describe('files whose content disagrees with their name', () => {
  const pdf = Buffer.from('%PDF-1.4\n<html><script>alert(1)</script></html>\n%%EOF\n')

  it('refuses a PDF named .html (and any name whose extension is not the content’s)', async () => {
    for (const name of ['notes.html', 'notes.htm', 'notes.svg', 'notes', 'notes.png']) {
      const res = await upload(analyst, pdf, name)
      expect(res.status, name).toBe(400)
      expect(res.body.error.fields, name).toEqual({ file: 'This file is a PDF; give it a name ending in .pdf' })
    }
    const png = Buffer.from('89504e470d0a1a0a0000000d49484452', 'hex')
    expect((await upload(analyst, png, 'chart.pdf')).body.error.fields).toEqual({ file: 'This file is a PNG image; give it a name ending in .png' })
    expect((await upload(analyst, pdf, 'Burst history.PDF')).status).toBe(201)
  })

  it('serves a stored file as an attachment of its real type under a name with the matching extension', async () => {
    const [row] = await h.db('evidence_files').insert({
      quantity_id: quantityId, filename: 'old-upload.html', mime_type: 'application/pdf', size_bytes: pdf.length, content: pdf, sha256: 'x'.repeat(64),
      uploaded_by: (await h.db('users').where({ email: 'analyst@kestrel.example' }).first('id')).id,
    }).returning('id')
    const res = await analyst.get(`/api/files/${row.id}`).expect(200)
    expect(res.headers['content-type']).toBe('application/pdf')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    const disposition = res.headers['content-disposition']
    expect(disposition).toMatch(/^attachment;/)
    expect(disposition).toContain('old-upload.html.pdf')
    expect(disposition).not.toMatch(/\.html("|;|$)/)
  })
})
