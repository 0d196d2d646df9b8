import { expect } from 'vitest'
import { type ApiHarness, type Client, normalQuantileAnswer, openQuantileRound, signedIn } from './api'
import { impactDone } from './impact'

/**
 * A study with a reviewer, one quantity answered by two demo experts, reconciled as a normal with `rationale`, and an
 * impact analysis on five pilot districts: the stored work that migrations of saved analyses and records rewrite.
 */
export async function studyWithStoredAnalysis(h: ApiHarness, analyst: Client, study: { title: string; context: string }, rationale: string): Promise<{ studyId: number; quantityId: number }> {
  const emails = ['expert1@kestrel.example', 'expert2@kestrel.example']
  const experts = [await signedIn(h, emails[0]), await signedIn(h, emails[1])]
  const studyId: number = (await analyst.post('/api/studies', study).expect(201)).body.id
  const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
  await analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'reviewer@kestrel.example')!.id, studyRole: 'reviewer' }).expect(201)
  const quantityId: number = (await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night-flow reduction', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in minimum night flow after pressure management?', support: { kind: 'real' },
  }).expect(201)).body.id
  const roundId = await openQuantileRound(analyst, studyId, [quantityId], emails)
  for (const [k, c] of experts.entries()) {
    await c.put(`/api/rounds/${roundId}/declaration`, { expertise: 'Leakage control at a regional water utility.', interests: 'none', seenPilotData: false }).expect(200)
    await c.put(`/api/rounds/${roundId}/judgements/${quantityId}`, { ...[normalQuantileAnswer(10, 2), normalQuantileAnswer(14, 3)][k], version: 0 }).expect(200)
    await c.post(`/api/rounds/${roundId}/submit`).expect(200)
  }
  await analyst.post(`/api/rounds/${roundId}/close`).expect(200)
  await analyst.put(`/api/quantities/${quantityId}/reconciliation`, {
    roundId, method: 'linear', weights: 'equal', cutoff: 0, excludedExperts: [], family: 'normal', reconciled: true, version: 0, rationale,
  }).expect(200)
  const upload = await analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    .field('quantityId', String(quantityId)).field('name', 'Pilot districts').field('model', 'normal-known-sigma').field('valueColumn', 'reduction').field('sigma', '2')
    .attach('file', Buffer.from('district,reduction\nKV-01,11.2\nKV-02,13.5\nKV-03,12.8\nKV-04,9.9\nKV-05,12.6\n'), { filename: 'pilot.csv', contentType: 'text/csv' })
  expect(upload.status).toBe(201)
  await impactDone(analyst, quantityId, {
    datasetId: upload.body.id, comparison: { family: 'normal', mu: 10, sigma: 20 }, mixtureWeight: 0.2, mixtureWide: { family: 'normal', mu: 10, sigma: 20 },
  })
  return { studyId, quantityId }
}
