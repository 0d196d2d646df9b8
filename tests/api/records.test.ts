import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { canonicalJson } from '../../server/services/audit'
import { contentHash } from '../../server/services/records'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
let analyst: Client
let reviewer: Client
let studyId: number

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Record test study', context: 'Testing the prior record workflow.' }).expect(201)).body.id
  const users = (await analyst.get('/api/users/directory')).body
  const rev = users.find((u: { email: string }) => u.email === 'reviewer@kestrel.example')
  await analyst.post(`/api/studies/${studyId}/members`, { userId: rev.id, studyRole: 'reviewer' }).expect(201)
  const q = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body
  // Fixture: a reconciled prior (the reconciliation workflow itself is tested in reconciliation.test.ts).
  await h.db('reconciliations').insert({
    quantity_id: q.id, method: 'linear', weights_mode: 'equal', family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 3.2, sigma: 1.1 }),
    status: 'reconciled', rationale: 'Fixture for the record workflow test.',
  })
  // No pilot data exist for it: the analyst records why the record states no impact analysis.
  await analyst.put(`/api/quantities/${q.id}/impact/not-run`, { reason: 'No pilot data exist for this quantity yet.' }).expect(200)
})
afterAll(async () => {
  await h.close()
})

describe('prior record workflow', () => {
  it('starts as a draft whose content is assembled live, with model code for the final prior', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record`).expect(200)
    expect(res.body.record).toMatchObject({ version: 1, status: 'draft', contentHash: null })
    const q = res.body.content.quantities[0]
    expect(q.finalPrior.distribution).toEqual({ family: 'normal', mu: 3.2, sigma: 1.1 })
    expect(q.finalPrior.modelCode.map((m: { language: string; check: { ok: boolean } }) => [m.language, m.check.ok])).toEqual([['stan', true], ['pymc', true], ['jags', true], ['brms', true]])
    expect(q.finalPrior.modelCode[2].code).toBe(`flow ~ dnorm(3.2, ${Number((1 / (1.1 * 1.1)).toPrecision(15))})  # precision = 1/sd^2`)
    expect(res.body.auditChain.intact).toBe(true)
  })

  it('lets only the analyst submit, and only a reviewer member return or sign off', async () => {
    expect((await reviewer.post(`/api/studies/${studyId}/record/sign-off`)).status).toBe(409)
    expect((await reviewer.post(`/api/studies/${studyId}/record/submit`)).status).toBe(403)
    const submitted = await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
    expect(submitted.body.record.status).toBe('in_review')
    expect(submitted.body.record.contentHash).toBe(contentHash(submitted.body.content))
    expect((await analyst.post(`/api/studies/${studyId}/record/sign-off`)).status).toBe(403)
    const admin = await signedIn(h, 'admin@kestrel.example')
    expect((await admin.post(`/api/studies/${studyId}/record/sign-off`)).status).toBe(403)
    const expert = await signedIn(h, 'expert1@kestrel.example')
    expect((await expert.post(`/api/studies/${studyId}/record/sign-off`)).status).toBe(403)
  })

  it('returns the record with a comment; the analyst resubmits; the reviewer signs off', async () => {
    const short = await reviewer.post(`/api/studies/${studyId}/record/return`, { comment: 'No' })
    expect(short.body.error.fields).toEqual({ comment: 'Use at least 10 characters' })
    const returned = await reviewer.post(`/api/studies/${studyId}/record/return`, { section: 'Night-flow reduction', comment: 'Explain why the pool was not weighted by performance.' })
    expect(returned.body.record.status).toBe('draft')
    expect(returned.body.comments).toEqual([expect.objectContaining({ kind: 'return', section: 'Night-flow reduction', author: 'Ingrid Solberg' })])
    expect(returned.body.record.returned).toBe(true)
    const commentId = returned.body.comments[0].id
    await analyst.post(`/api/studies/${studyId}/record/submit`, {
      responses: [{ commentId, outcome: 'answered', reply: 'The rationale now says why equal weights: no calibration questions were asked.' }],
    }).expect(200)
    const signed = await reviewer.post(`/api/studies/${studyId}/record/sign-off`).expect(200)
    expect(signed.body.record).toMatchObject({ status: 'signed_off', signedOffBy: 'Ingrid Solberg' })
    expect(signed.body.record.auditHead).toMatch(/^[0-9a-f]{64}$/)
    expect(signed.body.auditChain.intact).toBe(true)
    const last = signed.body.changeHistory.at(-1)
    expect(last.action).toBe('record.sign-off')
    expect(last.hash).toBe(signed.body.record.auditHead)
  })

  it('refuses any change to a signed-off version at the database', async () => {
    await expect(h.db('prior_records').where({ study_id: studyId, version: 1 }).update({ show_names: true })).rejects.toThrow(/signed off and cannot change/)
    await expect(h.db('prior_records').where({ study_id: studyId, version: 1 }).delete()).rejects.toThrow(/signed off and cannot change/)
    const rec = await h.db('prior_records').where({ study_id: studyId, version: 1 }).first('id')
    await expect(h.db('record_comments').insert({ record_id: rec.id, section: 'x', body: 'late', author_id: 1 })).rejects.toThrow(/signed off/)
    expect((await analyst.patch(`/api/studies/${studyId}/record`, { showNames: true })).status).toBe(409)
  })

  it('exports JSON whose hash is the SHA-256 of its canonical content', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    const { record, ...content } = res.body
    expect(record.status).toBe('signed_off')
    expect(record.contentHash).toBe(contentHash(content))
    expect(content.schemaVersion).toBe('1.2')
    expect(content.$schema).toBe('https://priorsmith.example/schemas/prior-record-1.json')
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(res.body), JSON.stringify(validate.errors)).toBe(true)
    const broken = structuredClone(res.body)
    broken.quantities[0].finalPrior.distribution.sigma = -1
    expect(validate(broken)).toBe(false)
  })

  it('exports a .docx that a reader opens, with its sections, tables and numbers', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.docx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = []
      r.on('data', (c: Buffer) => chunks.push(c))
      r.on('end', () => cb(null, Buffer.concat(chunks)))
    })
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('application/vnd.openxmlformats-officedocument.wordprocessingml.document')
    const { value: text } = await mammoth.extractRawText({ buffer: res.body as Buffer })
    for (const expected of [
      'Prior record', 'Record test study', 'Version 1 · Signed off', '1. Study and decision', '2. Expert panel', '4. Night-flow reduction (flow)',
      'Normal(mean 3.2, sd 1.1)', 'flow ~ normal(3.2, 1.1);', 'flow = pm.Normal("flow", mu=3.2, sigma=1.1)', 'must be reviewed under the regulatory or professional guidance',
      'Signed off by Ingrid Solberg', 'Explain why the pool was not weighted by performance.',
    ]) expect(text).toContain(expected)
    const { value: html } = await mammoth.convertToHtml({ buffer: res.body as Buffer })
    expect((html.match(/<table>/g) ?? []).length).toBeGreaterThanOrEqual(4)
  })

  it('starts a new draft version from the signed-off one', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/record/new-version`).expect(201)
    expect(res.body.record).toMatchObject({ version: 2, status: 'draft' })
    expect(res.body.versions.map((v: { version: number; status: string }) => [v.version, v.status])).toEqual([[2, 'draft'], [1, 'signed_off']])
    const v1 = await analyst.get(`/api/studies/${studyId}/record?version=1`).expect(200)
    expect(v1.body.record.status).toBe('signed_off')
  })
})

describe('demo study record', () => {
  it('matches the stored snapshot of its canonical JSON', async () => {
    const demo = (await analyst.get('/api/studies')).body.find((s: { title: string }) => s.title === DEMO_STUDY_TITLE)
    const res = await analyst.get(`/api/studies/${demo.id}/record`).expect(200)
    // The repository commit changes with every commit (and is absent outside a git checkout): not part of the snapshot.
    const { commit, ...producedBy } = res.body.content.producedBy
    expect(commit === undefined || /^[0-9a-f]{40}$/.test(commit)).toBe(true)
    const content = { ...res.body.content, producedBy }
    await expect(JSON.stringify(JSON.parse(canonicalJson(content)), null, 2) + '\n').toMatchFileSnapshot('./__snapshots__/demo-record.json')
  })
})
