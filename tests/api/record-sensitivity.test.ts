import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DIAGNOSTICS_CAUTION } from '../../shared/elicitation/impact'
import { formatNumber } from '../../shared/format'
import { DIAGNOSIS_WORDS } from '../../shared/stats/index'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { runImpact } from '../support/impact'

// The fractional Bayes factor (with its b) and the power-scaling sensitivities of each candidate, and their caution, in the
// prior record: its content, the JSON export against docs/prior-record.schema.json, and the .docx.

let h: ApiHarness
let analyst: Client
let studyId: number
type Candidate = { kind: string; label: string; fractionalBayesFactor: { logBF: number; b: number } | null; sensitivity: { prior: number; likelihood: number; diagnosis: string } | null }
let analysed: { candidates: Candidate[]; sweep: { fractionalRatio: number; trainingFraction: number } }

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: 'sens: record diagnostics', context: 'The diagnostics in the prior record.' }).expect(201)).body.id
  const q = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management in the Kestrel Valley?', support: { kind: 'real' },
  }).expect(201)).body
  const ds = await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(q.id)).field('name', 'Pressure-management pilot, eight districts').field('model', 'normal-known-sigma')
    .field('valueColumn', 'reduction_l_per_s').field('sigma', '1.5')
    .attach('file', readFileSync(new URL('../../seeds/pilot/night-flow-pilot.csv', import.meta.url)), { filename: 'night-flow-pilot.csv', contentType: 'text/csv' })
  expect(ds.status).toBe(201)
  // Fixture: a narrow reconciled prior near the data, which the data barely move (a weak likelihood).
  await h.db('reconciliations').insert({
    quantity_id: q.id, method: 'linear', weights_mode: 'equal', family: 'normal', distribution: JSON.stringify({ family: 'normal', mu: 3.7, sigma: 0.3 }),
    status: 'reconciled', rationale: 'Fixture for the record diagnostics test.',
  })
  const run = await runImpact(analyst, q.id, {
    datasetId: ds.body.id, comparison: { family: 'normal', mu: 0, sigma: 10 }, mixtureWeight: 0.2, mixtureWide: { family: 'normal', mu: 0, sigma: 10 }, trainingFraction: 0.25,
  })
  expect(run.status).toBe(200)
  analysed = run.body
})
afterAll(async () => {
  await h.close()
})

const reconciledOf = (candidates: Candidate[]) => candidates.find((c) => c.kind === 'reconciled')!

describe('diagnostics in the prior record', () => {
  it('states each candidate’s fractional Bayes factor with b, its sensitivities and diagnosis, and the caution', async () => {
    const { content } = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    const impact = content.quantities[0].impact
    expect(impact.candidates.map((c: Candidate) => c.kind)).toEqual(['reconciled', 'comparison', 'mixture'])
    for (const c of impact.candidates as Candidate[]) {
      const source = analysed.candidates.find((a) => a.kind === c.kind)!
      expect(c.fractionalBayesFactor).toEqual(source.fractionalBayesFactor)
      expect(c.sensitivity).toEqual(source.sensitivity)
    }
    const rec = reconciledOf(impact.candidates)
    expect(rec.fractionalBayesFactor!.b).toBe(0.25)
    expect(rec.sensitivity!.diagnosis).toBe('weak-likelihood')
    expect(impact.candidates.find((c: Candidate) => c.kind === 'comparison').fractionalBayesFactor).toBeNull()
    expect(impact.sweep).toMatchObject({ fractionalRatio: analysed.sweep.fractionalRatio, trainingFraction: 0.25 })
    expect(impact.diagnosticsCaution).toBe(DIAGNOSTICS_CAUTION)
  })

  it('exports JSON that the record schema accepts, and the schema refuses a b outside (0, 1) or an unknown diagnosis', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(res.body), JSON.stringify(validate.errors)).toBe(true)
    expect(reconciledOf(res.body.quantities[0].impact.candidates).fractionalBayesFactor).toEqual(reconciledOf(analysed.candidates).fractionalBayesFactor)
    const badB = structuredClone(res.body)
    reconciledOf(badB.quantities[0].impact.candidates).fractionalBayesFactor!.b = 1.5
    expect(validate(badB)).toBe(false)
    const badDiagnosis = structuredClone(res.body)
    reconciledOf(badDiagnosis.quantities[0].impact.candidates).sensitivity!.diagnosis = 'fine'
    expect(validate(badDiagnosis)).toBe(false)
  })

  it('prints the diagnostics table, the fractional sweep and the caution in the .docx', async () => {
    const res = await analyst.get(`/api/studies/${studyId}/record.docx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = []
      r.on('data', (c: Buffer) => chunks.push(c))
      r.on('end', () => cb(null, Buffer.concat(chunks)))
    })
    expect(res.status).toBe(200)
    const { value: text } = await mammoth.extractRawText({ buffer: res.body as Buffer })
    const rec = reconciledOf(analysed.candidates)
    for (const expected of [
      'Fractional Bayes factor against the comparison prior', 'Training fraction b', 'Sensitivity to the prior', 'Sensitivity to the data',
      formatNumber(Math.exp(rec.fractionalBayesFactor!.logBF), 3), formatNumber(rec.sensitivity!.prior, 3), formatNumber(rec.sensitivity!.likelihood, 3),
      DIAGNOSIS_WORDS['weak-likelihood'], `The fractional Bayes factor (b = 0.25) changes by a factor ${formatNumber(analysed.sweep.fractionalRatio, 4)} over the same range.`,
      DIAGNOSTICS_CAUTION,
    ]) expect(text).toContain(expected)
  })
})
