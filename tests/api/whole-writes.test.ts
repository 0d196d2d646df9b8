import JSZip from 'jszip'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { matrixFixture, type MatrixFixture } from '../support/route-matrix'
import type { Client } from '../support/api'

const TABLES = ['users', 'studies', 'study_members', 'quantities', 'evidence_files', 'calibration_questions', 'rounds', 'round_items', 'round_panel',
  'invitations', 'declarations', 'judgements', 'judgement_versions', 'calibration_answers', 'reconciliations', 'pilot_datasets', 'impact_analyses', 'impact_jobs',
  'prior_records', 'record_comments', 'outbox_messages', 'audit_events']

let f: MatrixFixture
let analyst: Client
let expert: Client
let studyId: string
beforeAll(async () => {
  f = await matrixFixture()
  analyst = f.clients.analyst
  expert = f.clients.expert
  studyId = f.params['studies/:id']
}, 60_000)
afterAll(async () => {
  await f.h.close()
})

async function fingerprint(): Promise<string> {
  const parts = TABLES.map((t) => `(SELECT md5(coalesce(string_agg(x::text, '|' ORDER BY x::text), '')) FROM ${t} x)`)
  return (await f.h.db.raw(`SELECT ${parts.join(" || ',' || ")} AS fp`)).rows[0].fp
}

const LONE_HIGH = 'Night flow \ud800 in KV-07 after the valve change'
const LONE_LOW = 'Night flow \udc00 in KV-07 after the valve change'
const WITH_NUL = 'Night flow \u0000 in KV-07 after the valve change'

describe('text the database cannot store is refused at validation, naming the field', () => {
  const cases = (): [string, Client, 'post' | 'patch' | 'put', string, object, string][] => {
    const q = f.params['quantities/:id']
    const round = f.params['rounds/:id']
    return [
      ['study title', analyst, 'patch', `/api/studies/${studyId}`, { title: LONE_HIGH, context: 'Fixture context.', version: 1 }, 'title'],
      ['quantity question', analyst, 'post', `/api/studies/${studyId}/quantities`, { name: 'Bursts', symbol: 'bursts', question: LONE_LOW, support: { kind: 'positive' } }, 'question'],
      ['quantity name with a NUL', analyst, 'post', `/api/studies/${studyId}/quantities`, { name: 'Bu\u0000rsts', symbol: 'bursts', question: 'How many bursts on the network in 2026?', support: { kind: 'positive' } }, 'name'],
      ['calibration question', analyst, 'post', `/api/studies/${studyId}/calibration-questions`, { question: WITH_NUL, unit: 'L/s', trueValue: 3 }, 'question'],
      ['round briefing', analyst, 'patch', `/api/rounds/${round}`, { briefing: LONE_HIGH, version: 2 }, 'briefing'],
      ['record comment', analyst, 'post', `/api/studies/${studyId}/record/comments`, { section: 'General', body: LONE_LOW }, 'body'],
      ['answer rationale', expert, 'put', `/api/rounds/${round}/judgements/${q}`, { method: 'quantile', lower: 0, upper: 10, points: [], rationale: LONE_HIGH, version: 1 }, 'rationale'],
      ['a key inside a distribution', analyst, 'post', `/api/quantities/${q}/impact`, { datasetId: Number(f.params['datasets/:id']), comparison: { family: 'normal', mu: 0, sigma: 10, ['x\ud800']: 1 } }, 'comparison.x\ud800'],
      ['a value in a list', analyst, 'post', `/api/rounds/${round}/invitations`, { email: 'whole-writes.panel@kestrel.example', name: 'Ingrid \udfff Berg' }, 'name'],
    ]
  }
  it.each([0, 1, 2, 3, 4, 5, 6, 7, 8])('case %i: 400 with the field, nothing written', async (i) => {
    const [label, client, method, url, body, field] = cases()[i]
    const before = await fingerprint()
    const res = await client[method](url, body)
    expect(res.status, `${label}: ${JSON.stringify(res.body)}`).toBe(400)
    expect(res.body.error.fields[field], label).toMatch(/cannot be stored/)
    expect(await fingerprint(), label).toBe(before)
  })
})

describe('a change and its audit event commit together', () => {
  it('when the audit event cannot be written, no change of any kind stays behind', async () => {
    // The draft record is made on first reading (no change of anyone's): made here, before the refusals start.
    await analyst.get(`/api/studies/${studyId}/record`).expect(200)
    // A trigger refusing every audit event of this study stands in for any failure of the audit insert.
    await f.h.db.raw(`CREATE FUNCTION audit_refused_for_test() RETURNS trigger AS $$
      BEGIN RAISE EXCEPTION 'audit refused for the test'; END; $$ LANGUAGE plpgsql`)
    await f.h.db.raw(`CREATE TRIGGER audit_refused_for_test BEFORE INSERT ON audit_events FOR EACH ROW
      WHEN (NEW.study_id = ${Number(studyId)}) EXECUTE FUNCTION audit_refused_for_test()`)
    const q = f.params['quantities/:id']
    const round = f.params['rounds/:id']
    const directory = (await analyst.get('/api/users/directory')).body as { id: number; email: string }[]
    const writes: [string, () => Promise<{ status: number }>][] = [
      ['study update', () => analyst.patch(`/api/studies/${studyId}`, { title: 'Renamed study', context: 'Changed context.', version: 1 })],
      ['quantity create', () => analyst.post(`/api/studies/${studyId}/quantities`, { name: 'Bursts', symbol: 'bursts', question: 'How many bursts on the network in 2026?', support: { kind: 'positive' } })],
      ['quantity update', () => analyst.patch(`/api/quantities/${q}`, { name: 'Flow 2', symbol: 'flow', unit: 'L/s', question: 'Mean reduction in night flow after pressure management?', support: { kind: 'real' }, version: 1 })],
      ['calibration question', () => analyst.post(`/api/studies/${studyId}/calibration-questions`, { question: 'Night flow in KV-09 in April 2025?', unit: 'L/s', trueValue: 5 })],
      ['calibration update', () => analyst.patch(`/api/calibration-questions/${f.params['calibration-questions/:id']}`, { question: 'Night flow in KV-07 in March 2025?', unit: 'L/s', trueValue: 9, version: 1 })],
      ['round create', () => analyst.post(`/api/studies/${studyId}/rounds`, { title: 'Second round', opensAt: new Date().toISOString(), closesAt: new Date(Date.now() + 86400e3).toISOString(), items: [{ quantityId: Number(q), method: 'quantile' }] })],
      ['round update', () => analyst.patch(`/api/rounds/${round}`, { briefing: 'A new briefing.', version: 2 })],
      ['member add', () => analyst.post(`/api/studies/${studyId}/members`, { userId: directory.find((u) => u.email === 'expert2@kestrel.example')!.id, studyRole: 'expert' })],
      ['panel add', () => analyst.post(`/api/rounds/${round}/invitations`, { email: 'whole-writes.panel@kestrel.example', name: 'Ingrid Berg' })],
      ['record comment', () => analyst.post(`/api/studies/${studyId}/record/comments`, { section: 'General', body: 'A comment that must not stay.' })],
      ['evidence upload', () => analyst.agent.post(`/api/quantities/${q}/files`).set('x-csrf-token', analyst.token).attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'more.pdf')],
      ['evidence delete', () => analyst.delete(`/api/files/${f.params['files/:id']}`)],
      ['declaration', () => expert.put(`/api/rounds/${round}/declaration`, { expertise: 'Twenty years of leak detection.', interests: 'none', seenPilotData: false })],
    ]
    try {
      for (const [label, write] of writes) {
        const before = await fingerprint()
        const res = await write()
        expect(res.status, label).toBe(500)
        expect(await fingerprint(), label).toBe(before)
      }
    } finally {
      await f.h.db.raw('DROP TRIGGER audit_refused_for_test ON audit_events')
      await f.h.db.raw('DROP FUNCTION audit_refused_for_test()')
    }
  })
})

describe('requests that race each other get 409, not 500', () => {
  it('duplicate calibration answers saved at once: one lands, the rest are told why', async () => {
    const url = `/api/rounds/${f.params['rounds/:id']}/calibration-answers/${f.params['calibration-questions/:id']}`
    const res = await Promise.all(Array.from({ length: 8 }, () => expert.put(url, { q05: 2, q50: 4, q95: 8, version: 0 })))
    const statuses = res.map((r) => r.status).sort()
    expect(statuses).toEqual([200, 409, 409, 409, 409, 409, 409, 409])
    for (const r of res.filter((x) => x.status === 409)) expect(r.body.error.message).toEqual(expect.any(String))
  })

  it('the same expert added to a panel at once: one lands', async () => {
    const url = `/api/rounds/${f.params['rounds/:id']}/invitations`
    const res = await Promise.all(Array.from({ length: 6 }, () => analyst.post(url, { email: 'racing.expert@kestrel.example', name: 'Racing Expert' })))
    const statuses = res.map((r) => r.status)
    expect(statuses.filter((s) => s === 201)).toHaveLength(1)
    expect(statuses.every((s) => s === 201 || s === 400 || s === 409), statuses.join()).toBe(true)
    expect(await f.h.db('round_panel').where({ email: 'racing.expert@kestrel.example' }).count({ n: '*' })).toEqual([{ n: '1' }])
  })

  it('symbols that differ only in case, created at once: one quantity is created', async () => {
    const body = (symbol: string) => ({ name: `Pipe age ${symbol}`, symbol, question: 'Mean age of cast-iron mains in the network, in years?', support: { kind: 'positive' } })
    const res = await Promise.all(['pipeAge', 'PIPEAGE', 'pipeage', 'PipeAge'].map((s) => analyst.post(`/api/studies/${studyId}/quantities`, body(s))))
    const statuses = res.map((r) => r.status)
    expect(statuses.filter((s) => s === 201)).toHaveLength(1)
    expect(statuses.every((s) => s === 201 || s === 400 || s === 409), statuses.join()).toBe(true)
    for (const r of res.filter((x) => x.status !== 201)) expect(r.body.error.fields.symbol).toBe('Another quantity in this study uses this symbol')
  })

  it('a round submitted from several windows at once: one submit, the others 409, one audit event', async () => {
    const round = f.params['rounds/:id']
    const q = f.params['quantities/:id']
    const current = (await expert.get(`/api/rounds/${round}/judgements`)).body[0]
    await expert.put(`/api/rounds/${round}/judgements/${q}`, {
      method: 'quantile', lower: 0, upper: 10, points: [{ value: 3, prob: 0.25 }, { value: 5, prob: 0.5 }, { value: 7, prob: 0.75 }],
      rationale: 'Pressure logs from the last three winters.', version: current.version,
    }).expect(200)
    const res = await Promise.all(Array.from({ length: 5 }, () => expert.post(`/api/rounds/${round}/submit`)))
    expect(res.map((r) => r.status).sort()).toEqual([200, 409, 409, 409, 409])
    expect(await f.h.db('audit_events').where({ action: 'round.submit', subject: `round:${round}` }).count({ n: '*' })).toEqual([{ n: '1' }])
  })
})

describe('uploads', () => {
  const multipartBody = (boundary: string, filename: string, content: string, end = true) =>
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${filename}"\r\nContent-Type: application/pdf\r\n\r\n${content}\r\n${end ? `--${boundary}--\r\n` : ''}`, 'utf8')
  const routes = () => [`/api/quantities/${f.params['quantities/:id']}/files`, `/api/studies/${studyId}/datasets/preview`, `/api/studies/${studyId}/datasets`]

  it('a cut-off body, a missing boundary or a malformed part answers 400 on each upload route', async () => {
    for (const url of routes()) {
      const before = await fingerprint()
      const truncated = await analyst.agent.post(url).set('x-csrf-token', analyst.token).set('Content-Type', 'multipart/form-data; boundary=XyZ')
        .send(multipartBody('XyZ', 'cut.pdf', '%PDF-1.4 and then noth', false))
      expect(truncated.status, `${url} truncated`).toBe(400)
      const noBoundary = await analyst.agent.post(url).set('x-csrf-token', analyst.token).set('Content-Type', 'multipart/form-data')
        .send(multipartBody('XyZ', 'a.pdf', '%PDF-1.4'))
      expect(noBoundary.status, `${url} without boundary`).toBe(400)
      expect(noBoundary.body.error.message).toMatch(/incomplete or malformed/)
      expect(await fingerprint()).toBe(before)
    }
  })

  it('a NUL in a file name never reaches the database: a raw one is a malformed part, an encoded one is replaced', async () => {
    const [evidence, preview, datasets] = routes()
    const send = (url: string, disposition: string, content: string, fields: Record<string, string> = {}) => {
      const parts = Object.entries(fields).map(([k, v]) => `--XyZ\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`).join('')
      const body = `${parts}--XyZ\r\nContent-Disposition: form-data; name="file"; ${disposition}\r\nContent-Type: text/csv\r\n\r\n${content}\r\n--XyZ--\r\n`
      return analyst.agent.post(url).set('x-csrf-token', analyst.token).set('Content-Type', 'multipart/form-data; boundary=XyZ').send(Buffer.from(body, 'utf8'))
    }
    const datasetFields = { quantityId: f.params['quantities/:id'], name: 'Pilot 2', model: 'normal-known-sigma', valueColumn: 'v', sigma: '2' }
    for (const url of [evidence, preview, datasets]) {
      const before = await fingerprint()
      const raw = await send(url, 'filename="pi\u0000lot.csv"', 'v\n1\n2\n', url === datasets ? datasetFields : {})
      expect(raw.status, url).toBe(400)
      expect(await fingerprint()).toBe(before)
    }
    const encoded = `filename*=UTF-8''pi%00lot.csv`
    expect((await send(evidence, encoded, 'v\n1\n2\n')).body.filename).toBe('pi_lot.csv')
    expect((await send(preview, encoded, 'v\n1\n2\n')).status).toBe(200)
    const dataset = await send(datasets, encoded, 'v\n2.2\n3.5\n', datasetFields)
    expect(dataset.status).toBe(201)
    expect(dataset.body.filename).toBe('pi_lot.csv')
  })

  it('a file name with non-ASCII letters is stored as sent and reaches the record and the .docx', async () => {
    const q = f.params['quantities/:id']
    const res = await analyst.agent.post(`/api/quantities/${q}/files`).set('x-csrf-token', analyst.token).attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'Prüfbericht Ølstrøm 水道.pdf')
    expect(res.status).toBe(201)
    expect(res.body.filename).toBe('Prüfbericht Ølstrøm 水道.pdf')
    const quantity = (await analyst.get(`/api/quantities/${q}`)).body
    expect(quantity.files.map((x: { filename: string }) => x.filename)).toContain('Prüfbericht Ølstrøm 水道.pdf')
    const record = (await analyst.get(`/api/studies/${studyId}/record.json`)).body
    expect(JSON.stringify(record)).toContain('Prüfbericht Ølstrøm 水道.pdf')
    const docx = await analyst.get(`/api/studies/${studyId}/record.docx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = []
      r.on('data', (c: Buffer) => chunks.push(c))
      r.on('end', () => cb(null, Buffer.concat(chunks)))
    })
    const xml = await (await JSZip.loadAsync(docx.body as Buffer)).file('word/document.xml')!.async('string')
    expect(xml).toContain('Prüfbericht Ølstrøm 水道.pdf')
  })
})
