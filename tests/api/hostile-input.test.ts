import fc from 'fast-check'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { fill, MATRIX, matrixFixture, send, type MatrixFixture, type Role } from '../support/route-matrix'

/** Routes that act without reading a body (opening, closing, submitting…): a 2xx there is the action, not bad input slipping through. */
const ACTIONS = new Set([
  'POST /api/rounds/:id/open', 'POST /api/rounds/:id/close', 'POST /api/rounds/:id/submit', 'POST /api/rounds/:id/panel/:panelId/resend',
  'POST /api/rounds/:id/panel/:panelId/revoke', 'POST /api/studies/:id/record/submit', 'POST /api/studies/:id/record/sign-off',
  'POST /api/studies/:id/record/new-version', 'POST /api/auth/sign-out', 'POST /api/auth/sign-in',
])

const FIELDS = [
  'title', 'context', 'name', 'symbol', 'unit', 'question', 'support', 'kind', 'lower', 'upper', 'assumptions', 'evidenceNotes', 'items', 'quantityId',
  'method', 'edges', 'chips', 'opensAt', 'closesAt', 'points', 'value', 'prob', 'probs', 'rationale', 'version', 'email', 'password', 'displayName',
  'role', 'disabled', 'userId', 'studyRole', 'expertise', 'interests', 'interestsText', 'seenPilotData', 'q05', 'q50', 'q95', 'weights', 'cutoff',
  'family', 'distribution', 'datasetId', 'reference', 'decision', 'showNames', 'comment', 'section', 'body', 'png', 'trueValue', 'reason', 'expertId', 'roundId',
  '__proto__', 'constructor', 'prototype',
]

const hostileScalar = fc.oneof(
  fc.constantFrom('NaN', 'Infinity', '-Infinity', '1e309', "'; DROP TABLE users; --", "1' OR '1'='1", '<script>alert(1)</script>', '<img src=x onerror=alert(1)>',
    '\u0000', '\u202e\u2066', '😀'.repeat(40), '../../etc/passwd', '{{7*7}}', '${7*7}', '', ' '),
  fc.double(),
  fc.integer(),
  fc.constantFrom(1e308, -1e308, Number.MAX_SAFE_INTEGER + 2, -0, 0, 1, -1),
  fc.boolean(),
  fc.constant(null),
  fc.string({ maxLength: 30 }),
  fc.string({ minLength: 6000, maxLength: 12000 }),
)
const hostileValue = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: 'small' }, hostileScalar, fc.array(tie('value'), { maxLength: 4 }), fc.dictionary(fc.constantFrom(...FIELDS), tie('value'), { maxKeys: 4 })),
})).value
const hostileBody = fc.oneof(
  fc.dictionary(fc.oneof(fc.constantFrom(...FIELDS), fc.string({ maxLength: 12 })), hostileValue, { maxKeys: 8 }),
  fc.array(hostileValue, { maxLength: 3 }),
)

const TABLES = ['users', 'studies', 'study_members', 'quantities', 'evidence_files', 'calibration_questions', 'rounds', 'round_items', 'round_panel',
  'invitations', 'declarations', 'judgements', 'judgement_versions', 'calibration_answers', 'reconciliations', 'pilot_datasets', 'impact_analyses',
  'prior_records', 'record_comments', 'outbox_messages', 'audit_events']

let f: MatrixFixture
beforeAll(async () => {
  f = await matrixFixture()
}, 60_000)
afterAll(async () => {
  await f.h.close()
})

async function fingerprint(): Promise<string> {
  const parts = TABLES.map((t) => `(SELECT md5(coalesce(string_agg(x::text, '|' ORDER BY x::text), '')) FROM ${t} x)`)
  const row = await f.h.db.raw(`SELECT ${parts.join(" || ',' || ")} AS fp`)
  return row.rows[0].fp
}

const PREFERENCE: Role[] = ['analyst', 'expert', 'reviewer', 'admin']
const writes = Object.entries(MATRIX).filter(([k]) => /^(POST|PUT|PATCH) /.test(k) && !ACTIONS.has(k))

describe('hostile input at every write route (fast-check)', () => {
  it.each(writes)('%s: 400 with field errors or a clean refusal, never a 500, nothing changed on refusal', async (key, rule) => {
    const [method, path] = key.split(' ')
    const role: Role = rule === 'public' ? 'anon' : rule === 'signed-in' ? 'analyst' : PREFERENCE.find((r) => rule.includes(r))!
    const url = fill(path, f.params)
    await fc.assert(
      fc.asyncProperty(hostileBody, async (body) => {
        const before = await fingerprint()
        const res = await send(f.clients[role], method, url, body as object)
        expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBeLessThan(500)
        if (res.status >= 400) {
          expect(res.body.error?.message, 'every error has a message').toEqual(expect.any(String))
          if (res.status === 400) expect(res.body.error.fields ?? { _: res.body.error.message }).toEqual(expect.any(Object))
          expect(await fingerprint()).toBe(before)
        }
        expect(Object.prototype.hasOwnProperty.call(Object.prototype, 'polluted')).toBe(false)
        expect(({} as Record<string, unknown>).isAdmin).toBeUndefined()
      }),
      { numRuns: 12, seed: 20261202 },
    )
  }, 120_000)
})
