import fc from 'fast-check'
import { crc32, deflateRawSync, deflateSync, gzipSync } from 'node:zlib'
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
  'family', 'distribution', 'datasetId', 'comparison', 'decision', 'showNames', 'comment', 'section', 'body', 'png', 'trueValue', 'reason', 'expertId', 'roundId',
  'wording', 'quantityIds', 'residual', 'residualLabel', 'csv', 'filename', 'delimiter', 'layout', 'categoryColumns', 'categoryColumn', 'categories',
  'firstQuantityId', 'secondQuantityId', 'linkIds', 'probability', '__proto__', 'constructor', 'prototype',
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
  'invitations', 'declarations', 'judgements', 'judgement_versions', 'calibration_answers', 'reconciliations', 'pilot_datasets', 'impact_analyses', 'impact_jobs',
  'impact_not_run', 'prior_records', 'record_comments', 'outbox_messages', 'audit_events', 'compositions', 'composition_shares', 'composition_datasets', 'composition_analyses',
  'round_links', 'link_answers', 'link_answer_versions', 'link_reconciliations', 'link_reconciliation_versions']

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

const ROLE_ORDER: Role[] = ['analyst', 'expert', 'reviewer', 'admin']
const writes = Object.entries(MATRIX).filter(([k]) => /^(POST|PUT|PATCH) /.test(k) && !ACTIONS.has(k))

describe('hostile input at every write route (fast-check)', () => {
  it.each(writes)('%s: 400 with field errors or a clean refusal, never a 500, nothing changed on refusal', async (key, rule) => {
    const [method, path] = key.split(' ')
    const role: Role = rule === 'public' ? 'anon' : rule === 'signed-in' ? 'analyst' : ROLE_ORDER.find((r) => rule.includes(r))!
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

/**
 * A ZIP archive holding one file of `size` zero bytes, deflated: a few hundred KB that would unpack to `size`.
 * Written by hand from the format's fixed headers (PKWARE, APPNOTE.TXT 6.3.10, 2022, §4.3.7, §4.3.12, §4.3.16).
 */
function zipBomb(size: number, entry = 'word/document.xml'): Buffer {
  const data = deflateRawSync(Buffer.alloc(size), { level: 9 })
  const name = Buffer.from(entry)
  const crc = crc32(Buffer.alloc(size))
  const local = Buffer.alloc(30)
  local.writeUInt32LE(0x04034b50, 0); local.writeUInt16LE(20, 4); local.writeUInt16LE(8, 8)
  local.writeUInt32LE(crc, 14); local.writeUInt32LE(data.length, 18); local.writeUInt32LE(size, 22); local.writeUInt16LE(name.length, 26)
  const central = Buffer.alloc(46)
  central.writeUInt32LE(0x02014b50, 0); central.writeUInt16LE(20, 4); central.writeUInt16LE(20, 6); central.writeUInt16LE(8, 10)
  central.writeUInt32LE(crc, 16); central.writeUInt32LE(data.length, 20); central.writeUInt32LE(size, 24); central.writeUInt16LE(name.length, 28)
  const end = Buffer.alloc(22)
  const centralAt = local.length + name.length + data.length
  end.writeUInt32LE(0x06054b50, 0); end.writeUInt16LE(1, 8); end.writeUInt16LE(1, 10)
  end.writeUInt32LE(central.length + name.length, 12); end.writeUInt32LE(centralAt, 16)
  return Buffer.concat([local, name, data, central, name, end])
}

/** superagent would serialize a Buffer sent as JSON; the compressed bytes must go out as they are (its types say string). */
const asIs = ((body: Buffer) => body) as unknown as (body: unknown) => string

describe('compressed bombs and disguised files', () => {
  const UNPACKED = 256 * 1024 * 1024

  it('a ZIP bomb is refused as evidence whatever its name, and nothing is stored', async () => {
    const bomb = zipBomb(UNPACKED)
    // The point of a bomb: small enough to pass the 5 MB upload limit, 256 MB once unpacked.
    expect(bomb.length).toBeLessThan(1024 * 1024)
    const analyst = f.clients.analyst
    const url = `/api/quantities/${f.params['quantities/:id']}/files`
    for (const filename of ['evidence.docx', 'evidence.pdf', 'evidence.zip', 'evidence.csv']) {
      const before = await fingerprint()
      const res = await analyst.agent.post(url).set('x-csrf-token', analyst.token).attach('file', bomb, { filename, contentType: 'application/pdf' })
      expect(res.status, filename).toBe(400)
      expect(res.body.error.fields).toEqual({ file: 'Upload a PDF, CSV, PNG or JPEG file' })
      expect(await fingerprint()).toBe(before)
    }
  })

  it('a ZIP bomb is refused as pilot data with a message, and nothing is stored', async () => {
    const analyst = f.clients.analyst
    const before = await fingerprint()
    const res = await analyst.agent.post(`/api/studies/${f.params['studies/:id']}/datasets`).set('x-csrf-token', analyst.token)
      .field('quantityId', f.params['quantities/:id']).field('name', 'Pilot').field('model', 'normal-known-sigma').field('valueColumn', 'v').field('sigma', '2')
      .attach('file', zipBomb(UNPACKED, 'pilot.csv'), { filename: 'pilot.csv', contentType: 'text/csv' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.file).toEqual(expect.any(String))
    expect(await fingerprint()).toBe(before)
  })

  it.each(['gzip', 'deflate'] as const)('a %s-encoded JSON body that inflates past the 4 MB limit is cut off with 413, and the app serves on', async (encoding) => {
    const analyst = f.clients.analyst
    const json = Buffer.concat([Buffer.from('{"title":"'), Buffer.alloc(64 * 1024 * 1024, 0x61), Buffer.from('","context":"bomb"}')])
    const body = encoding === 'gzip' ? gzipSync(json, { level: 9 }) : deflateSync(json, { level: 9 })
    expect(body.length).toBeLessThan(200 * 1024)
    const before = await fingerprint()
    const res = await analyst.agent.post('/api/studies').set('x-csrf-token', analyst.token)
      .set('content-type', 'application/json').set('content-encoding', encoding).serialize(asIs).send(body)
    expect(res.status, JSON.stringify(res.body)).toBe(413)
    expect(res.body).toEqual({ error: { message: 'The request body is too large' } })
    expect(await fingerprint()).toBe(before)
    expect((await analyst.get('/api/auth/me')).status).toBe(200)
  })

  it('a body marked as compressed that is not, or in an encoding the app does not read, gets a plain message', async () => {
    const analyst = f.clients.analyst
    const before = await fingerprint()
    const post = (encoding: string, body: Buffer) => analyst.agent.post('/api/studies').set('x-csrf-token', analyst.token)
      .set('content-type', 'application/json').set('content-encoding', encoding).serialize(asIs).send(body)
    const notGzip = await post('gzip', Buffer.from('{"title":"x","context":"y"}'))
    expect(notGzip.status).toBe(400)
    expect(notGzip.body).toEqual({ error: { message: 'The request body is marked as compressed but could not be decompressed' } })
    const truncated = await post('gzip', gzipSync(Buffer.from('{"title":"Cut short","context":"y"}')).subarray(0, 20))
    expect(truncated.status).toBe(400)
    expect(truncated.body.error.message).toBe('The request body is marked as compressed but could not be decompressed')
    const unknown = await post('compress', Buffer.from('{"title":"x","context":"y"}'))
    expect(unknown.status).toBe(415)
    expect(unknown.body.error.message).toMatch(/^The request body’s Content-Encoding is not supported/)
    expect(await fingerprint()).toBe(before)
  })
})
