import { readFileSync } from 'node:fs'
import Ajv2020 from 'ajv/dist/2020'
import mammoth from 'mammoth'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { up as rewordStoredImpact } from '../../migrations/20261203_018_comparison_prior'
import { verifyAuditChain } from '../../server/services/audit'
import { contentHash } from '../../server/services/records'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { studyWithStoredAnalysis } from '../support/stored-analysis'

/**
 * Analyses and signed-off records stored before the comparison prior and the wide component were named so hold the
 * old words (request key `reference`, candidate kind 'reference', "Reference prior", "Robust mixture (20 % vague)").
 * The migration rewrites them: the old analysis reopens, and the old record shows and exports, in today's words, with
 * its new content hash and an audit event naming the old and the new one.
 */
let h: ApiHarness
let analyst: Client
let reviewer: Client
let studyId: number
let quantityId: number
const OLD_WORDS = /Reference prior|% vague|\breference\b/

function docxBuffer(c: Client, url: string) {
  return c.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (x: Buffer) => chunks.push(x))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
}

/** Today's stored analysis written back in the words used before the rename, as such a row was saved then. */
function oldShape(row: { input: Record<string, any>; result: Record<string, any> }) {
  const { comparison, mixtureWide, ...input } = row.input
  const label = (l: string) => l.replace('Comparison prior', 'Reference prior').replace(/\((\d+) % on the wide component\)/, '($1 % vague)')
  return {
    input: JSON.stringify({ ...input, reference: comparison, mixtureVague: mixtureWide }),
    result: JSON.stringify({
      ...row.result,
      candidates: row.result.candidates.map((c: Record<string, any>) => ({ ...c, label: label(c.label), kind: c.kind === 'comparison' ? 'reference' : c.kind, key: c.key === 'comparison' ? 'reference' : c.key })),
      findings: [...row.result.findings, 'Reference prior: the pilot data sit in the tail of what this prior predicts (Box\'s prior predictive p = 0.012); prior and data conflict.'],
    }),
  }
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  const stored = await studyWithStoredAnalysis(h, analyst, { title: 'look: comparison prior rewording study', context: 'Old stored analyses in today’s words.' },
    'The linear pool keeps the spread between the two experts.')
  studyId = stored.studyId
  quantityId = stored.quantityId
  // As saved before the rename: the analysis, then a record submitted and signed off with that analysis in it.
  const row = await h.db('impact_analyses').where({ quantity_id: quantityId }).first('id', 'input', 'result')
  await h.db('impact_analyses').where({ id: row.id }).update(oldShape(row))
  await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
  await reviewer.post(`/api/studies/${studyId}/record/sign-off`).expect(200)
})
afterAll(async () => {
  await h.close()
})

describe('stored analyses and records in the old words', () => {
  it('before the migration they hold the old keys and labels, and the export does not meet the record schema', async () => {
    const latest = (await analyst.get(`/api/quantities/${quantityId}/impact`).expect(200)).body
    expect(Object.keys(latest.input)).toContain('reference')
    expect(latest.candidates.map((c: { label: string }) => c.label)).toContain('Robust mixture (20 % vague)')
    const json = (await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)).body
    expect(json.record.status).toBe('signed_off')
    expect(json.quantities[0].impact.candidates.map((c: { kind: string }) => c.kind)).toContain('reference')
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    expect(new Ajv2020({ allErrors: true, strict: false }).compile(schema)(json)).toBe(false)
  })

  it('after the migration the analysis reopens and the signed-off record shows and exports in today’s words, re-hashed and audited', async () => {
    const before = await h.db('prior_records').where({ study_id: studyId }).first('content_hash', 'status')
    await h.db.transaction((trx) => rewordStoredImpact(trx))

    const latest = (await analyst.get(`/api/quantities/${quantityId}/impact`).expect(200)).body
    expect(latest.input.comparison).toEqual({ family: 'normal', mu: 10, sigma: 20 })
    expect(latest.input.mixtureWide).toEqual({ family: 'normal', mu: 10, sigma: 20 })
    expect(latest.input).not.toHaveProperty('reference')
    expect(latest.input).not.toHaveProperty('mixtureVague')
    expect(latest.candidates.map((c: { kind: string; key: string; label: string }) => [c.kind, c.key, c.label]).slice(-3)).toEqual([
      ['reconciled', 'reconciled', 'Reconciled prior'],
      ['comparison', 'comparison', 'Comparison prior'],
      ['mixture', 'mixture', 'Robust mixture (20 % on the wide component)'],
    ])
    expect(latest.findings.at(-1)).toMatch(/^Comparison prior: the pilot data sit in the tail/)
    // Bayes factors are still taken against the comparison prior: it has none itself, every other candidate has one.
    expect(latest.candidates.filter((c: { bayesFactor: unknown }) => c.bayesFactor === null).map((c: { kind: string }) => c.kind)).toEqual(['comparison'])

    const view = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(view.record.status).toBe('signed_off')
    expect(view.record.contentHash).not.toBe(before.content_hash)
    expect(view.record.contentHash).toBe(contentHash(view.content))
    expect(JSON.stringify(view.content.quantities[0].impact)).not.toMatch(OLD_WORDS)
    const event = await h.db('audit_events').where({ study_id: studyId, action: 'record.reworded' }).first('details', 'actor_id')
    expect(event.details).toMatchObject({ previousContentHash: before.content_hash, contentHash: view.record.contentHash, status: 'signed_off' })
    expect(event.actor_id).toBeNull()
    expect((await verifyAuditChain(h.db, studyId)).intact).toBe(true)
    expect(view.changeHistory.at(-1).what).toMatch(/^Stored record reworded/)

    const json = (await analyst.get(`/api/studies/${studyId}/record.json`).expect(200)).body
    const schema = JSON.parse(readFileSync(new URL('../../docs/prior-record.schema.json', import.meta.url), 'utf8'))
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema)
    expect(validate(json), JSON.stringify(validate.errors)).toBe(true)
    expect(json.quantities[0].impact.candidates.map((c: { kind: string }) => c.kind)).toEqual(['expert', 'expert', 'pooled', 'reconciled', 'comparison', 'mixture'])

    const docx = await docxBuffer(analyst, `/api/studies/${studyId}/record.docx`)
    const { value: text } = await mammoth.extractRawText({ buffer: docx.body as Buffer })
    expect(text).toContain('Comparison prior')
    expect(text).toContain('Robust mixture (20 % on the wide component)')
    expect(text).toContain('Bayes factor against the comparison prior')
    expect(text).not.toMatch(/Reference prior|% vague/)

    // The signed-off record is frozen again after the rewording.
    await expect(h.db('prior_records').where({ study_id: studyId }).update({ show_names: true })).rejects.toThrow(/signed off and cannot change/)
    // Running the migration again changes nothing.
    await h.db.transaction((trx) => rewordStoredImpact(trx))
    expect(await h.db('audit_events').where({ study_id: studyId, action: 'record.reworded' }).count('* as n').first()).toEqual({ n: '1' })
  })
})
