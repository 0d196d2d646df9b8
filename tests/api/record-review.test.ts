import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { createDb, type Db } from '../../server/db/knex'
import { createMailer, type Mailer } from '../../server/mail/mailer'
import { startSmtpFake, type SmtpFake } from '../../server/mail/smtp-fake'
import { localMailConfig } from '../../server/mail/transport'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { waitFor } from '../support/wait'
import { unzip } from '../support/zip'
import { impactDone } from '../support/impact'
import { oldLabelsIn } from '../support/old-labels'

/**
 * A record a reviewer can audit: one label per expert on every screen and export, a .docx in words and local time
 * with the experts' answers, a returned record whose comments are answered, quantities left out with a reason, and
 * e-mail to the reviewers and analysts at each step.
 */

const TIME_ZONE = 'Europe/Oslo'
const Z75 = 0.674489750196081743 // standard normal 0.75 quantile (common practice; scipy.stats.norm.ppf(0.75))

let h: ApiHarness
let fake: SmtpFake
let mailer: Mailer
let mailDb: Db
const kicked: number[] = []
let analyst: Client
let reviewer: Client
let tomasz: Client
let helen: Client
let studyId: number
let roundId: number
const q: Record<'bursts' | 'uptake' | 'leak', number> = { bursts: 0, uptake: 0, leak: 0 }
let datasetId: number

async function docxOf(client: Client, url: string): Promise<Map<string, Buffer>> {
  const res = await client.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (c: Buffer) => chunks.push(c))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
  expect(res.status).toBe(200)
  return unzip(res.body as Buffer)
}

/** The visible text of word/document.xml: the runs' text joined, tags dropped, entities decoded. */
const visibleText = (xml: string) => [...xml.matchAll(/<w:t(?:\s[^>]*)?>([^<]*)<\/w:t>/g)].map((m) => m[1]).join('')
  .replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&amp;/g, '&')

beforeAll(async () => {
  fake = await startSmtpFake()
  mailDb = createDb(inject('databaseUrl'))
  mailer = createMailer({ databaseUrl: inject('databaseUrl'), db: mailDb, transport: localMailConfig(fake.port, {}), retryDelaySeconds: 1, pollingIntervalSeconds: 0.5, sweepIntervalMs: 2000 })
  await mailer.start()
  h = startApi({ timeZone: TIME_ZONE, mailFake: fake, kickMail: async (ids) => { kicked.push(...ids); await mailer.kick(ids) } })
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  tomasz = await signedIn(h, 'expert1@kestrel.example')
  helen = await signedIn(h, 'expert2@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'Record review study', context: 'Deciding on burst repairs and the leak-alert scheme.' }).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  const rev = directory.find((u) => u.email === 'reviewer@kestrel.example')!
  await analyst.post(`/api/studies/${studyId}/members`, { userId: rev.id, studyRole: 'reviewer' }).expect(201)
  q.bursts = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Burst rate', symbol: 'bursts', unit: 'bursts per km-year', question: 'How many bursts per km of main per year on cast iron?', support: { kind: 'positive' },
  }).expect(201)).body.id
  q.uptake = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Leak-alert uptake', symbol: 'uptake', unit: '', question: 'What share of households will join the leak-alert scheme?', support: { kind: 'proportion' },
  }).expect(201)).body.id
  q.leak = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Customer-side leakage', symbol: 'leak', unit: 'L/property/day', question: 'Mean customer-side leakage per property?', support: { kind: 'positive' },
  }).expect(201)).body.id
  roundId = (await analyst.post(`/api/studies/${studyId}/rounds`, {
    title: 'First round', opensAt: new Date(Date.now() - 3600e3).toISOString(), closesAt: new Date(Date.now() + 7 * 86400e3).toISOString(),
    items: [{ quantityId: q.bursts, method: 'quantile' }, { quantityId: q.uptake, method: 'chip-grid', edges: [0, 0.2, 0.4, 0.6, 0.8, 1], chips: 10 }],
  }).expect(201)).body.id
  // Helen joins the panel first, Tomasz second: the labels follow the joining order, not the account ids.
  await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert2@kestrel.example', name: 'Helen Okafor' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/invitations`, { email: 'expert1@kestrel.example', name: 'Tomasz Wierzbicki' }).expect(201)
  await analyst.post(`/api/rounds/${roundId}/open`).expect(200)
  const lognormalQuartiles = (median: number, sdlog: number) => [
    { value: median * Math.exp(-sdlog * Z75), prob: 0.25 }, { value: median, prob: 0.5 }, { value: median * Math.exp(sdlog * Z75), prob: 0.75 },
  ]
  for (const [c, median, chips] of [[helen, 0.3, [1, 3, 4, 2, 0]], [tomasz, 0.5, [0, 2, 4, 3, 1]]] as const) {
    await c.put(`/api/rounds/${roundId}/judgements/${q.bursts}`, {
      method: 'quantile', lower: median / 5, upper: median * 5, points: lognormalQuartiles(median, 0.5), chosenFamily: 'lognormal', version: 0,
      rationale: 'Repair logs of the cast-iron mains in the valley, 2019 to 2025.',
    }).expect(200)
    await c.put(`/api/rounds/${roundId}/judgements/${q.uptake}`, {
      method: 'chip-grid', edges: [0, 0.2, 0.4, 0.6, 0.8, 1], chips: [...chips], version: 0, rationale: 'Uptake of the earlier water-meter offer in the valley.',
    }).expect(200)
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
  // Fixtures: final priors (the reconciliation workflow is tested in reconciliation.test.ts).
  for (const [quantityId, distribution] of [[q.bursts, { family: 'gamma', shape: 4, rate: 10 }], [q.uptake, { family: 'beta', alpha: 4, beta: 5 }]] as const) {
    await h.db('reconciliations').insert({
      quantity_id: quantityId, round_id: roundId, method: 'linear', weights_mode: 'equal', weights: JSON.stringify([0.5, 0.5]), family: distribution.family, distribution: JSON.stringify(distribution),
      status: 'reconciled', rationale: 'Fixture for the record review test.',
    })
  }
  const upload = await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(q.bursts)).field('name', 'Burst logs').field('model', 'poisson').field('countColumn', 'bursts').field('exposureColumn', 'km_years')
    .attach('file', Buffer.from('district,bursts,km_years\nKV-01,3,12.5\nKV-02,5,14\nKV-03,2,9.5\n'), { filename: 'bursts.csv', contentType: 'text/csv' })
  expect(upload.status).toBe(201)
  datasetId = (await h.db('pilot_datasets').where({ quantity_id: q.bursts }).first('id')).id
  await impactDone(analyst, q.bursts, { datasetId, comparison: { family: 'gamma', shape: 0.5, rate: 0.05 } })
  // Uptake has no pilot data here: the record needs the analyst's reason why no impact analysis was run.
  await analyst.put(`/api/quantities/${q.uptake}/impact/not-run`, { reason: 'No pilot survey of uptake exists yet; the first survey is planned for next spring.' }).expect(200)
}, 60_000)
afterAll(async () => {
  await mailer.stop()
  await fake.stop()
  await h.close()
  await mailDb.destroy()
})

describe('one anonymous label per expert', () => {
  it('is the same on the reconciliation, impact, progress and record screens: Expert 1 joined the panel first', async () => {
    const rec = (await analyst.get(`/api/quantities/${q.bursts}/reconciliation`).expect(200)).body
    expect(rec.experts.map((e: { name: string; label: string }) => [e.label, e.name]).sort()).toEqual([['Expert 1', 'Helen Okafor'], ['Expert 2', 'Tomasz Wierzbicki']])

    const impact = (await analyst.get(`/api/quantities/${q.bursts}/impact`).expect(200)).body
    const expertCandidates = impact.candidates.filter((c: { kind: string }) => c.kind === 'expert')
    // Helen's prior has median 0.3, Tomasz's 0.5: each is found under its own label.
    const median = (label: string) => expertCandidates.find((c: { label: string }) => c.label === label).prior.meanlog
    expect(Math.exp(median('Expert 1'))).toBeCloseTo(0.3, 6)
    expect(Math.exp(median('Expert 2'))).toBeCloseTo(0.5, 6)

    const progress = (await analyst.get(`/api/rounds/${roundId}/progress`).expect(200)).body
    expect(progress.experts.map((e: { label: string; email: string }) => [e.label, e.email])).toEqual([
      ['Expert 1', 'expert2@kestrel.example'], ['Expert 2', 'expert1@kestrel.example'],
    ])

    const record = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(record.content.panel.map((e: { code: string }) => e.code)).toEqual(['Expert 1', 'Expert 2'])
    const bursts = record.content.quantities.find((x: { symbol: string }) => x.symbol === 'bursts')
    const byLabel = Object.fromEntries(bursts.judgements.map((j: { expert: { code: string }; answer: { points: { value: number }[] } }) => [j.expert.code, j.answer.points[1].value]))
    expect(byLabel).toEqual({ 'Expert 1': 0.3, 'Expert 2': 0.5 })
  })

  it('keeps each weight with its expert’s label in the record, whatever order the weights are stored in', async () => {
    // The weights are stored in the order of the experts' accounts (Tomasz's first), the labels follow the joining order.
    const record = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    const bursts = record.content.quantities.find((x: { symbol: string }) => x.symbol === 'bursts')
    expect(bursts.combination.expertWeights).toEqual([{ expert: { code: 'Expert 2' }, weight: 0.5 }, { expert: { code: 'Expert 1' }, weight: 0.5 }])
  })

  it('names experts by label on the audit trail (names beside it only for analysts) and in the outbox', async () => {
    const submitters = (events: { action: string; actorName: string }[]) => events.filter((e) => e.action === 'round.submit').map((e) => e.actorName).sort()
    const forReviewer = (await reviewer.get(`/api/studies/${studyId}/audit`).expect(200)).body
    expect(submitters(forReviewer)).toEqual(['Expert 1', 'Expert 2'])
    expect(JSON.stringify(forReviewer.map((e: { actorName: string }) => e.actorName))).not.toMatch(/Helen Okafor|Tomasz Wierzbicki/)
    const forAnalyst = (await analyst.get(`/api/studies/${studyId}/audit`).expect(200)).body
    expect(submitters(forAnalyst)).toEqual(['Expert 1 (Helen Okafor)', 'Expert 2 (Tomasz Wierzbicki)'])
    expect(forAnalyst.find((e: { action: string }) => e.action === 'study.create').actorName).toBe('Priya Natarajan')
    const outbox = (await analyst.get(`/api/studies/${studyId}/outbox`).expect(200)).body as { to: string; expertLabel: string | null }[]
    const labelOf = Object.fromEntries(outbox.filter((m) => m.to.startsWith('expert')).map((m) => [m.to, m.expertLabel]))
    expect(labelOf).toEqual({ 'expert2@kestrel.example': 'Expert 1', 'expert1@kestrel.example': 'Expert 2' })
  })

  it('keeps the experts’ names out of the record’s change history while names are hidden', async () => {
    const record = (await reviewer.get(`/api/studies/${studyId}/record`).expect(200)).body
    const submits = record.changeHistory.filter((e: { action: string }) => e.action === 'round.submit')
    expect(submits.map((e: { actor: string }) => e.actor).sort()).toEqual(['Expert 1', 'Expert 2'])
    expect(JSON.stringify(record.changeHistory)).not.toMatch(/Helen Okafor|Tomasz Wierzbicki/)
  })
})

describe('leaving a quantity out of the record', () => {
  it('refuses to submit while a quantity is neither reconciled nor left out', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/record/submit`)
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ quantities: 'Not reconciled and not left out: Customer-side leakage' })
  })

  it('needs a reason, and only analysts leave a quantity out', async () => {
    const empty = await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: q.leak, reason: '  ' })
    expect(empty.status).toBe(400)
    expect(empty.body.error.fields).toEqual({ reason: 'Say why this quantity is left out of the record' })
    expect((await reviewer.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: q.leak, reason: 'Not needed for the decision.' })).status).toBe(403)
    const foreign = await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: 999_999, reason: 'Not needed for the decision.' })
    expect(foreign.status).toBe(400)
    expect(foreign.body.error.fields).toEqual({ quantityId: 'Choose a quantity of this study' })
  })

  it('states the reason in the record and audits it; putting it back is audited too', async () => {
    const reason = 'Customer-side leakage does not enter the repair decision; it will be elicited in a later study.'
    const res = await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: q.leak, reason }).expect(201)
    const leak = res.body.content.quantities.find((x: { symbol: string }) => x.symbol === 'leak')
    expect(leak.leftOut).toEqual({ reason })
    expect(res.body.content.quantities.find((x: { symbol: string }) => x.symbol === 'bursts').leftOut).toBeNull()
    const audit = await h.db('audit_events').where({ study_id: studyId, action: 'record.leave-out' }).first()
    expect(audit.subject).toBe(`quantity:${q.leak}`)
    expect(audit.details).toMatchObject({ reason })
    const back = await analyst.delete(`/api/studies/${studyId}/record/exclusions/${q.leak}`).expect(200)
    expect(back.body.content.quantities.find((x: { symbol: string }) => x.symbol === 'leak').leftOut).toBeNull()
    expect(await h.db('audit_events').where({ study_id: studyId, action: 'record.put-back' })).toHaveLength(1)
    await analyst.post(`/api/studies/${studyId}/record/exclusions`, { quantityId: q.leak, reason }).expect(201)
  })
})

describe('review by e-mail, with comments answered', () => {
  const mailFor = (kind: string) => h.db('outbox_messages').where({ study_id: studyId, kind }).orderBy('id')
  let returnCommentId: number

  it('submitting sends one e-mail to each reviewer of the study, delivered to the mailbox', async () => {
    const res = await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
    expect(res.body.record.status).toBe('in_review')
    const rows = await mailFor('record-submitted')
    expect(rows.map((r) => r.to_address)).toEqual(['reviewer@kestrel.example'])
    expect(kicked).toContain(Number(rows[0].id))
    const delivered = await waitFor('the submit e-mail', async () => fake.messages.find((m) => m.to === 'reviewer@kestrel.example' && m.subject.includes('Record review study')))
    expect(delivered.subject).toBe('Prior record to review: "Record review study" (version 1)')
    expect(delivered.text).toContain(`/studies/${studyId}/record`)
    expect(delivered.text).toMatch(new RegExp(`\\(${TIME_ZONE}(, UTC[+−-]\\d+)?\\)`))
  })

  it('the JSON states the left-out quantity with its reason and validates against the schema', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    expect(res.body.quantities.find((x: { symbol: string }) => x.symbol === 'leak').leftOut.reason).toMatch(/^Customer-side leakage does not enter/)
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(res.body), JSON.stringify(validate.errors)).toBe(true)
    expect(oldLabelsIn(JSON.stringify(res.body))).toEqual([])
    const broken = structuredClone(res.body)
    broken.quantities.find((x: { symbol: string }) => x.symbol === 'leak').leftOut = { reason: '' }
    expect(validate(broken)).toBe(false)
  })

  it('returning sends one e-mail to each analyst, and the record says it was returned with comments', async () => {
    const res = await reviewer.post(`/api/studies/${studyId}/record/return`, { section: 'Burst rate (bursts)', comment: 'Say why the comparison prior is Gamma(0.5, 0.05).' }).expect(200)
    expect(res.body.record).toMatchObject({ status: 'draft', returned: true })
    returnCommentId = res.body.comments.find((c: { kind: string }) => c.kind === 'return').id
    expect(res.body.record.openComments).toEqual([returnCommentId])
    const rows = await mailFor('record-returned')
    expect(rows.map((r) => r.to_address)).toEqual(['analyst@kestrel.example'])
    const delivered = await waitFor('the return e-mail', async () => fake.messages.find((m) => m.to === 'analyst@kestrel.example' && m.subject.startsWith('Prior record returned')))
    expect(delivered.text).toContain('Say why the comparison prior is Gamma(0.5, 0.05).')
  })

  it('refuses to resubmit until each comment is answered, with a field error per comment', async () => {
    const none = await analyst.post(`/api/studies/${studyId}/record/submit`)
    expect(none.status).toBe(400)
    expect(none.body.error.fields).toEqual({ [`responses.${returnCommentId}`]: 'Answer this comment: say what you changed, or why nothing changed' })
    const noReason = await analyst.post(`/api/studies/${studyId}/record/submit`, { responses: [{ commentId: returnCommentId, outcome: 'not-changed', reply: '' }] })
    expect(noReason.status).toBe(400)
    expect(noReason.body.error.fields).toEqual({ 'responses[0].reply': 'Say why nothing changed' })
    const badOutcome = await analyst.post(`/api/studies/${studyId}/record/submit`, { responses: [{ commentId: returnCommentId, outcome: 'ignored', reply: 'Nothing to say about it.' }] })
    expect(badOutcome.body.error.fields).toEqual({ 'responses[0].outcome': 'Choose “answered” or “not changed”' })
    const stranger = await analyst.post(`/api/studies/${studyId}/record/submit`, {
      responses: [{ commentId: returnCommentId, outcome: 'answered', reply: 'Explained in the rationale.' }, { commentId: 999_999, outcome: 'answered', reply: 'Explained in the rationale.' }],
    })
    expect(stranger.body.error.fields).toEqual({ 'responses.999999': 'Not a comment of this record waiting for an answer' })
    expect((await analyst.get(`/api/studies/${studyId}/record`)).body.record.status).toBe('draft')
    expect(await mailFor('record-submitted')).toHaveLength(1)
  })

  it('resubmits with the answer stored beside the comment; the reviewers are told again', async () => {
    const reply = 'The comparison prior is a wide gamma with mean 10 bursts per km-year; the rationale now says so.'
    const res = await analyst.post(`/api/studies/${studyId}/record/submit`, { responses: [{ commentId: returnCommentId, outcome: 'not-changed', reply }] }).expect(200)
    expect(res.body.record).toMatchObject({ status: 'in_review', returned: false, openComments: [] })
    expect(res.body.comments.find((c: { kind: string }) => c.kind === 'response')).toMatchObject({ replyTo: returnCommentId, outcome: 'not-changed', body: reply, author: 'Priya Natarajan' })
    expect(await mailFor('record-submitted')).toHaveLength(2)
  })

  it('signing off sends one e-mail to each analyst', async () => {
    await reviewer.post(`/api/studies/${studyId}/record/sign-off`).expect(200)
    const rows = await mailFor('record-signed-off')
    expect(rows.map((r) => r.to_address)).toEqual(['analyst@kestrel.example'])
    // Another suite's sign-off mail to the same analyst may reach this fake through the outbox sweeper: find this study's.
    const delivered = await waitFor('the sign-off e-mail', async () => fake.messages.find((m) => m.to === 'analyst@kestrel.example' && m.subject.startsWith('Prior record signed off: "Record review study"')))
    expect(delivered.subject).toBe('Prior record signed off: "Record review study" (version 1)')
    expect(await h.db('outbox_messages').where({ study_id: studyId }).whereIn('kind', ['record-submitted', 'record-returned', 'record-signed-off']).count('* as n').first())
      .toEqual({ n: '4' })
  })
})

describe('the .docx a reviewer keeps', () => {
  let files: Map<string, Buffer>
  let xml: string
  let text: string

  beforeAll(async () => {
    files = await docxOf(analyst, `/api/studies/${studyId}/record.docx`)
    xml = files.get('word/document.xml')!.toString('utf8')
    text = visibleText(xml)
  })

  it('speaks in words: no internal key of methods, models, flags, audit actions or subjects', () => {
    for (const key of [
      'chip-grid', 'fixed-interval', 'poisson', 'normal-known-sigma', 'prior-driven-bayes-factor', 'prior-dominates', 'prior-data-conflict',
      'quantity.create', 'round.submit', 'record.submit', 'record.leave-out', 'quantity:', 'round:', 'record:v', 'weightsMode', 'in_review', 'signed_off',
    ]) expect(text, key).not.toContain(key)
    expect(text).toContain('Chip grid')
    expect(text).toContain('Poisson with exposure')
    expect(text).toContain('Quantity created (Burst rate)')
  })

  it('writes dates as local times with the time zone, never as ISO UTC', async () => {
    expect(text).not.toMatch(/\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/)
    const signedOffAt = (await analyst.get(`/api/studies/${studyId}/record`)).body.record.signedOffAt as string
    const local = new Intl.DateTimeFormat('en-GB', {
      timeZone: TIME_ZONE, weekday: 'long', day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'shortOffset',
    }).formatToParts(new Date(signedOffAt))
    const part = (t: string) => local.find((p) => p.type === t)!.value
    // The zone is named with its offset from UTC on that date ("GMT+1" → "UTC+1"), as in every document and e-mail.
    const offset = part('timeZoneName').replace(/^GMT$/, 'GMT+0').replace('GMT', 'UTC')
    expect(text).toContain(`Signed off by Ingrid Solberg on ${part('weekday')} ${part('day')} ${part('month')} ${part('year')}, ${part('hour')}:${part('minute')} (${TIME_ZONE}, ${offset})`)
  })

  it('gives each expert’s answer as given in the judgement tables, and the round in the panel table', () => {
    expect(text).toContain('Answer as given')
    // Helen's chip grid: 1, 3, 4, 2, 0 chips over the five intervals.
    expect(text).toContain('[0, 0.2): 1 chip; [0.2, 0.4): 3 chips; [0.4, 0.6): 4 chips; [0.6, 0.8): 2 chips; [0.8, 1): 0 chips')
    expect(text).toContain('plausible range 0.06 to 1.5; ')
    expect(text).toMatch(/ExpertRoundExpertiseInterests declared/)
  })

  it('states the left-out quantity with its reason', () => {
    expect(text).toContain('Left out of this record. Reason: Customer-side leakage does not enter the repair decision')
  })

  it('has a contents list written out (no field to update) and its author set', () => {
    expect(xml).not.toMatch(/TOC \\/)
    expect(files.get('word/settings.xml')!.toString('utf8')).not.toContain('updateFields')
    const contents = text.slice(text.indexOf('Contents'), text.indexOf('1. Study and decision', text.indexOf('Contents') + 10) + 30)
    expect(contents).toContain('1. Study and decision2. Expert panel3. Calibration questions4. Burst rate (bursts)4.1 Elicitation')
    const core = files.get('docProps/core.xml')!.toString('utf8')
    expect(core).toContain('<dc:creator>Priya Natarajan</dc:creator>')
  })

  it('names experts by their study label, with the comment and its answer in the review table', () => {
    expect(oldLabelsIn(text)).toEqual([])
    expect(text).toContain('Expert 1')
    expect(text).toContain('Weights: Expert 2 0.5; Expert 1 0.5.')
    expect(text).not.toMatch(/Helen Okafor|Tomasz Wierzbicki|\bE1\b/)
    expect(text).toContain('Not changed: The comparison prior is a wide gamma')
  })
})
