import { execFileSync } from 'node:child_process'
import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { canonicalJson } from '../../server/services/audit'
import { contentHash } from '../../server/services/records'
import { ENGINE_VERSION } from '../../shared/stats/index'
import { Client, normalQuantileAnswer as normalAnswer, openQuantileRound, signedIn, startApi, type ApiHarness } from '../support/api'
import { impactDone } from '../support/impact'

/**
 * What the prior record states must be true of the prior it records: the impact analysis of that very prior (never one
 * run on a draft), the cautions its own facts raise, what software produced it, and the round's status following its
 * quantities.
 */
let h: ApiHarness
let analyst: Client
let experts: Client[]
let studyId: number
let quantityId: number
let roundId: number
let datasetId: number
const FINAL = { family: 'student-t', mu: 12, sigma: 2.5, df: 6 }
const COMPARISON = { family: 'normal', mu: 10, sigma: 20 }
const PACKAGE_VERSION = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')).version as string

function docxBuffer(c: Client, url: string) {
  return c.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (x: Buffer) => chunks.push(x))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
}

async function reconcile(body: Record<string, unknown>) {
  const { version } = (await analyst.get(`/api/quantities/${quantityId}/reconciliation`).expect(200)).body.saved ?? { version: 0 }
  const res = await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
    roundId, method: 'linear', weights: 'equal', cutoff: 0, excludedExperts: [], rationale: 'The linear pool keeps the spread between the two experts.', ...body, version,
  })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res
}

const roundStatus = async () => (await analyst.get(`/api/rounds/${roundId}`).expect(200)).body.status as string
const record = async () => (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  experts = [await signedIn(h, 'expert1@kestrel.example'), await signedIn(h, 'expert2@kestrel.example')]
  const reviewer = await signedIn(h, 'reviewer@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Record integrity study', context: 'Testing what the prior record states.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  expect((await reviewer.get(`/api/studies/${studyId}`)).status).toBe(200)
  quantityId = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body.id
  // Three calibration questions with known answers: fewer than performance weights should rest on.
  const questions: number[] = []
  for (const [i, truth] of [61, 7.4, 230].entries()) {
    questions.push((await analyst.post(`/api/studies/${studyId}/calibration-questions`, { question: `Seed question ${i + 1} with a known answer`, unit: 'u', trueValue: truth }).expect(201)).body.id)
  }
  roundId = await openQuantileRound(analyst, studyId, [quantityId], ['expert1@kestrel.example', 'expert2@kestrel.example'])
  const answers = [normalAnswer(10, 2), normalAnswer(14, 3)]
  for (const [k, c] of experts.entries()) {
    await c.put(`/api/rounds/${roundId}/declaration`, { expertise: 'Leakage control at a regional water utility.', interests: 'none', seenPilotData: k === 1 }).expect(200)
    await c.put(`/api/rounds/${roundId}/judgements/${quantityId}`, { ...answers[k], version: 0 }).expect(200)
    for (const [i, qid] of questions.entries()) {
      const truth = [61, 7.4, 230][i]
      await c.put(`/api/rounds/${roundId}/calibration-answers/${qid}`, { q05: truth * (0.5 + 0.2 * k), q50: truth * (0.9 + 0.2 * k), q95: truth * (1.4 + 0.2 * k), version: 0 }).expect(200)
    }
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
  await analyst.post(`/api/rounds/${roundId}/close`).expect(200)
  const upload = await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantityId)).field('name', 'Pilot districts').field('model', 'normal-known-sigma').field('valueColumn', 'reduction').field('sigma', '2')
    .attach('file', Buffer.from('district,reduction\nKV-01,11.2\nKV-02,13.5\nKV-03,12.8\nKV-04,9.9\nKV-05,12.6\n'), { filename: 'pilot.csv', contentType: 'text/csv' })
  expect(upload.status).toBe(201)
  datasetId = upload.body.id
})
afterAll(async () => {
  await h.close()
})

describe('the impact analysis in the record belongs to the final prior', () => {
  it('an analysis run on a draft reconciliation is not the record’s once the final prior differs; submission is refused', async () => {
    await reconcile({ family: 'normal', reconciled: false })
    const draftRun = await impactDone(analyst, quantityId, { datasetId, comparison: COMPARISON })
    const draftPrior = draftRun.body.candidates.find((c: { kind: string }) => c.kind === 'reconciled').prior
    expect(draftPrior.family).toBe('normal')
    // While the reconciliation is a draft there is no final prior, so no analysis appears in the record.
    expect((await record()).content.quantities[0].impact).toBeNull()

    await reconcile({
      weights: 'performance', family: 'student-t', distribution: FINAL, adjustReason: 'Heavier tails than the pool: the 2019 burst season is not in the records.', reconciled: true,
    })
    const q = (await record()).content.quantities[0]
    expect(q.finalPrior.distribution).toEqual(FINAL)
    expect(q.impact).toBeNull()
    expect(q.impactNotRunReason).toBeNull()
    const submit = await analyst.post(`/api/studies/${studyId}/record/submit`)
    expect(submit.status).toBe(400)
    expect(submit.body.error.fields).toEqual({ impact: 'Run an impact analysis of the final prior, or record why none was run: Night-flow reduction' })
    expect((await record()).record.status).toBe('draft')
  })

  it('a recorded reason stands in for the analysis, for that final prior only', async () => {
    const short = await analyst.put(`/api/quantities/${quantityId}/impact/not-run`, { reason: 'none' })
    expect(short.status).toBe(400)
    expect(short.body.error.fields).toEqual({ reason: 'Explain in at least 20 characters; it goes into the prior record' })
    const reason = 'The pilot districts were chosen for pressure management; their data cannot test this prior fairly.'
    await analyst.put(`/api/quantities/${quantityId}/impact/not-run`, { reason }).expect(200)
    const content = (await record()).content
    expect(content.quantities[0].impactNotRunReason).toBe(reason)
    expect(content.cautions).toContainEqual({ rule: 'no-impact-analysis', quantity: 'Night-flow reduction', text: `Night-flow reduction: no impact analysis of the final prior was run; the analyst’s reason: ${reason}` })
    const events = await h.db('audit_events').where({ study_id: studyId, action: 'impact.not-run' })
    expect(events).toHaveLength(1)
  })

  it('the analysis of the final prior replaces the reason; the record shows exactly that analysis', async () => {
    const run = await impactDone(analyst, quantityId, { datasetId, comparison: COMPARISON })
    expect(run.body.cached).toBe(false)
    const rows = await h.db('impact_analyses').where({ quantity_id: quantityId }).orderBy('id')
    expect(rows).toHaveLength(2)
    const q = (await record()).content.quantities[0]
    expect(q.impact.inputHash).toBe(rows[1].input_hash)
    expect(q.impact.candidates.find((c: { kind: string }) => c.kind === 'reconciled').prior).toEqual(FINAL)
    expect(q.impactNotRunReason).toBeNull()
    // A newer analysis run while the final prior is reopened as a draft with another family does not displace it.
    await reconcile({ family: 'normal', reconciled: false })
    await impactDone(analyst, quantityId, { datasetId, comparison: { family: 'normal', mu: 10, sigma: 40 } })
    await reconcile({ weights: 'performance', family: 'student-t', distribution: FINAL, adjustReason: 'Heavier tails than the pool: the 2019 burst season is not in the records.', reconciled: true })
    expect((await record()).content.quantities[0].impact.inputHash).toBe(rows[1].input_hash)
  })
})

describe('the record states its own cautions and what produced it', () => {
  it('puts the record-specific cautions and the versions in the content, its hash, the JSON and the .docx', async () => {
    const submitted = await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
    const content = submitted.body.content
    expect(submitted.body.record.contentHash).toBe(contentHash(content))
    expect(content.cautions.map((c: { rule: string }) => c.rule)).toEqual([
      'statistician-review', 'prior-influence', 'seen-pilot-data', 'prior-driven-bayes-factor', 'hand-adjusted', 'performance-weights', 'performance-weights',
    ])
    // The width sweep of the final prior on these five values finds its Bayes factor driven by the width: the final prior is flagged.
    expect(content.quantities[0].impact.sweep.priorDriven).toBe(true)
    expect(content.cautions[3]).toEqual({ rule: 'prior-driven-bayes-factor', quantity: 'Night-flow reduction', text: 'Night-flow reduction: the final prior is flagged: Bayes factor driven by the prior’s width (Priorsmith’s rule of thumb).' })
    const seen = content.cautions.find((c: { rule: string }) => c.rule === 'seen-pilot-data')
    expect(seen.text).toBe('Expert 2 had seen the pilot data before answering: the same evidence may count twice, in the prior and in the data.')
    // The performance-weight cautions come from the shared weight rule: 3 calibration questions and 2 experts are too few.
    const weights = content.cautions.filter((c: { rule: string }) => c.rule === 'performance-weights').map((c: { text: string }) => c.text)
    expect(weights[0]).toContain('Night-flow reduction: Performance weights here rest on 3 calibration questions')
    expect(weights[1]).toContain('Night-flow reduction: Performance weights here compare 2 experts')
    expect(content.cautions.find((c: { rule: string }) => c.rule === 'hand-adjusted').text).toBe('Night-flow reduction: the final prior was adjusted by hand (Heavier tails than the pool: the 2019 burst season is not in the records.).')

    let commit: string | undefined
    try {
      commit = execFileSync('git', ['rev-parse', 'HEAD']).toString().trim()
    } catch {
      commit = undefined
    }
    expect(content.producedBy).toEqual({ application: 'Priorsmith', version: PACKAGE_VERSION, engineVersion: ENGINE_VERSION, ...(commit ? { commit } : {}) })

    // The cautions are hashed: the stored hash changes if one is dropped.
    const stored = await h.db('prior_records').where({ study_id: studyId }).first('content', 'content_hash')
    expect(stored.content_hash).toBe(contentHash(stored.content))
    expect(contentHash({ ...stored.content, cautions: stored.content.cautions.slice(0, 2) })).not.toBe(stored.content_hash)
    expect(canonicalJson(stored.content)).toContain('performance-weights')

    const json = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(json.body), JSON.stringify(validate.errors)).toBe(true)
    expect(json.body.cautions).toEqual(content.cautions)
    expect(json.body.producedBy).toEqual(content.producedBy)
    const broken = structuredClone(json.body)
    delete broken.producedBy.engineVersion
    expect(validate(broken)).toBe(false)

    const docx = await docxBuffer(analyst, `/api/studies/${studyId}/record.docx`)
    expect(docx.status).toBe(200)
    const { value: text } = await mammoth.extractRawText({ buffer: docx.body as Buffer })
    for (const c of content.cautions) expect(text).toContain(c.text)
    expect(text).toContain(`Priorsmith ${PACKAGE_VERSION}`)
    expect(text).toContain(`Statistical engine ${ENGINE_VERSION}`)
    if (commit) expect(text).toContain(`Repository commit ${commit}`)
  })
})

describe('round status follows its quantities', () => {
  it('becomes reconciled when every quantity of the closed round is, and closed again when one is reopened, each with an audit event', async () => {
    const events = async () => (await h.db('audit_events').where({ study_id: studyId, action: 'round.status' }).orderBy('id')).map((e) => e.details)
    // The final reconciliations above left the closed round reconciled (twice, with a reopening between).
    expect(await roundStatus()).toBe('reconciled')
    expect(await events()).toEqual([
      { roundId, from: 'closed', to: 'reconciled' },
      { roundId, from: 'reconciled', to: 'closed' },
      { roundId, from: 'closed', to: 'reconciled' },
    ])
    await reconcile({ weights: 'performance', family: 'student-t', distribution: FINAL, adjustReason: 'Heavier tails than the pool: the 2019 burst season is not in the records.', reconciled: false })
    expect(await roundStatus()).toBe('closed')
    expect((await events()).at(-1)).toEqual({ roundId, from: 'reconciled', to: 'closed' })
    // Saving again without a change of status adds no event.
    await reconcile({ family: 'normal', reconciled: false })
    expect(await events()).toHaveLength(4)
  })
})
