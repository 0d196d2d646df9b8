import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { numberExpertLabels, up as numberStoredLabels } from '../../migrations/20261203_018b_expert_labels_numbered'
import { verifyAuditChain } from '../../server/services/audit'
import { contentHash } from '../../server/services/records'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { studyWithStoredAnalysis } from '../support/stored-analysis'

/**
 * Analyses and signed-off records stored while the study-wide expert label was a letter ("Expert A", "Expert B", …)
 * hold those letters. The migration numbers them ("Expert 1", "Expert 2", …) wherever the program wrote them, leaves
 * names and typed text alone, re-hashes each rewritten snapshot and audits it.
 */
let h: ApiHarness
let analyst: Client
let reviewer: Client
let studyId: number
let quantityId: number
const LETTER_LABEL = /Expert [A-Z]{1,3}\b/
// Typed by people: the rationale mentions a letter label, and one expert's name looks like one (constructed cases).
const TYPED_RATIONALE = 'Kept Expert B in the pool: her range matches the 2019 district survey.'
const LOOKALIKE_NAME = 'Expert AB'

/** Spreadsheet-column letters of a 1-based number: 1 → A, 26 → Z, 27 → AA (common practice). */
function letters(n: number): string {
  let out = ''
  for (let k = n; k > 0; k = Math.floor((k - 1) / 26)) out = String.fromCharCode(65 + ((k - 1) % 26)) + out
  return out
}
/** Today's stored JSON written back with the letter labels used before, as such a row was saved then. */
const inLetters = (json: unknown) => JSON.parse(JSON.stringify(json).replace(/Expert (\d+)\b/g, (_, n: string) => `Expert ${letters(Number(n))}`))

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  reviewer = await signedIn(h, 'reviewer@kestrel.example')
  const stored = await studyWithStoredAnalysis(h, analyst, { title: 'labels: letter labels numbered study', context: 'Old stored work in today’s labels.' }, TYPED_RATIONALE)
  studyId = stored.studyId
  quantityId = stored.quantityId
  await analyst.post(`/api/studies/${studyId}/record/submit`).expect(200)
  await reviewer.post(`/api/studies/${studyId}/record/sign-off`).expect(200)

  // As saved before labels were numbered: the analysis and the signed-off snapshot hold letters, with one generated
  // sentence naming an expert, and a name that only looks like a label.
  const run = await h.db('impact_analyses').where({ quantity_id: quantityId }).first('id', 'input', 'result')
  const oldResult = inLetters(run.result)
  oldResult.findings.push('Expert B: the prior carries more information than the pilot data (prior effective sample size 9 against n = 5).')
  await h.db('impact_analyses').where({ id: run.id }).update({ input: JSON.stringify(inLetters(run.input)), result: JSON.stringify(oldResult) })
  const record = await h.db('prior_records').where({ study_id: studyId }).first('id', 'content')
  const oldContent = inLetters(record.content)
  oldContent.namesShown = true
  oldContent.panel[0].name = LOOKALIKE_NAME
  oldContent.quantities[0].impact.findings.push('Expert B: the prior carries more information than the pilot data (prior effective sample size 9 against n = 5).')
  await h.db.raw('ALTER TABLE prior_records DISABLE TRIGGER prior_records_frozen')
  await h.db('prior_records').where({ id: record.id }).update({ content: JSON.stringify(oldContent), content_hash: contentHash(oldContent) })
  await h.db.raw('ALTER TABLE prior_records ENABLE TRIGGER prior_records_frozen')
})
afterAll(async () => {
  await h.close()
})

describe('stored analyses and records with letter labels', () => {
  it('letters map to numbers in spreadsheet-column order, in whole labels and generated sentences only', () => {
    expect(numberExpertLabels({ candidates: [{ label: 'Expert A' }, { label: 'Expert Z' }, { label: 'Expert AA' }, { label: 'Expert AZ' }, { label: 'Expert BA' }] }))
      .toEqual({ candidates: [{ label: 'Expert 1' }, { label: 'Expert 26' }, { label: 'Expert 27' }, { label: 'Expert 52' }, { label: 'Expert 53' }] })
    expect(numberExpertLabels({ findings: ['Expert C and Expert AB differ; Expert Bob agrees.'], rationale: 'Expert C is right', name: 'Expert D' }))
      .toEqual({ findings: ['Expert 3 and Expert 28 differ; Expert Bob agrees.'], rationale: 'Expert C is right', name: 'Expert D' })
  })

  it('before the migration the analysis and the signed-off record show letters', async () => {
    const latest = (await analyst.get(`/api/quantities/${quantityId}/impact`).expect(200)).body
    expect(latest.candidates.map((c: { label: string }) => c.label).slice(0, 2)).toEqual(['Expert A', 'Expert B'])
    const view = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(view.content.panel.map((p: { code: string }) => p.code)).toEqual(['Expert A', 'Expert B'])
  })

  it('after the migration they show numbers, typed text and names untouched, re-hashed, audited and frozen again', async () => {
    const before = await h.db('prior_records').where({ study_id: studyId }).first('content_hash', 'status')
    await h.db.transaction((trx) => numberStoredLabels(trx))

    const latest = (await analyst.get(`/api/quantities/${quantityId}/impact`).expect(200)).body
    expect(latest.candidates.map((c: { label: string }) => c.label).slice(0, 2)).toEqual(['Expert 1', 'Expert 2'])
    expect(latest.findings.at(-1)).toMatch(/^Expert 2: the prior carries more information/)
    expect(JSON.stringify(latest)).not.toMatch(LETTER_LABEL)

    const view = (await analyst.get(`/api/studies/${studyId}/record`).expect(200)).body
    expect(view.record.status).toBe('signed_off')
    const content = view.content
    expect(content.panel.map((p: { code: string; name?: string }) => [p.code, p.name ?? null])).toEqual([['Expert 1', LOOKALIKE_NAME], ['Expert 2', null]])
    const q = content.quantities[0]
    expect(q.judgements.map((j: { expert: { code: string } }) => j.expert.code)).toEqual(['Expert 1', 'Expert 2'])
    expect(q.combination.rationale).toBe(TYPED_RATIONALE)
    expect(q.impact.candidates.map((c: { label: string }) => c.label).slice(0, 2)).toEqual(['Expert 1', 'Expert 2'])
    expect(q.impact.findings.at(-1)).toMatch(/^Expert 2: the prior carries more information/)
    // Only the typed rationale and the look-alike name still hold letters.
    const rest = { ...content, panel: content.panel.map(({ name, ...p }: { name?: string }) => p), quantities: [{ ...q, combination: { ...q.combination, rationale: '' } }] }
    expect(JSON.stringify(rest)).not.toMatch(LETTER_LABEL)

    expect(view.record.contentHash).not.toBe(before.content_hash)
    expect(view.record.contentHash).toBe(contentHash(content))
    const event = await h.db('audit_events').where({ study_id: studyId, action: 'record.reworded' }).first('details', 'actor_id')
    expect(event.details).toMatchObject({ reason: 'expert labels numbered', previousContentHash: before.content_hash, contentHash: view.record.contentHash, status: 'signed_off' })
    expect(event.actor_id).toBeNull()
    expect((await verifyAuditChain(h.db, studyId)).intact).toBe(true)

    // The signed-off record is frozen again after the rewording.
    await expect(h.db('prior_records').where({ study_id: studyId }).update({ show_names: true })).rejects.toThrow(/signed off and cannot change/)
    // Running the migration again changes nothing.
    const after = await h.db('impact_analyses').where({ quantity_id: quantityId }).first('result')
    await h.db.transaction((trx) => numberStoredLabels(trx))
    expect(await h.db('audit_events').where({ study_id: studyId, action: 'record.reworded' }).count('* as n').first()).toEqual({ n: '1' })
    expect((await h.db('impact_analyses').where({ quantity_id: quantityId }).first('result')).result).toEqual(after.result)
  })
})
