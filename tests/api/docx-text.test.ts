import JSZip from 'jszip'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedIn, startApi, type ApiHarness, type Client } from '../support/api'
import { assertWellFormedXml } from '../support/xml'

let h: ApiHarness
let analyst: Client
let studyId: number
// What pasted text brings: U+000B from Word's Shift+Enter, other C0 controls, a form feed, the noncharacters U+FFFE/U+FFFF.
const TITLE = 'Valve works\u000bphase two\ufffe'
const CONTEXT = 'Renewal of the KV-07 mains.\u000bSecond line\u0001\u0008\u000c after a form feed\u001f\uffff end.'

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  studyId = (await analyst.post('/api/studies', { title: TITLE, context: CONTEXT }).expect(201)).body.id
  await analyst.post(`/api/studies/${studyId}/quantities`, {
    name: 'Night\u000bflow', symbol: 'nflow', unit: 'L/s\u0007', question: 'Change of night flow in KV-07\u000bafter the valve works?\u0002', support: { kind: 'real' },
  }).expect(201)
  await analyst.post(`/api/studies/${studyId}/record/comments`, { section: 'General\u000b', body: 'First line\u000bsecond line\u0003' }).expect(201)
})
afterAll(async () => {
  await h.close()
})

async function docxParts(): Promise<Map<string, string>> {
  const res = await analyst.get(`/api/studies/${studyId}/record.docx`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = []
    r.on('data', (c: Buffer) => chunks.push(c))
    r.on('end', () => cb(null, Buffer.concat(chunks)))
  })
  expect(res.status).toBe(200)
  const zip = await JSZip.loadAsync(res.body as Buffer)
  const parts = new Map<string, string>()
  for (const name of Object.keys(zip.files).filter((n) => /\.(xml|rels)$/.test(n))) parts.set(name, await zip.file(name)!.async('string'))
  return parts
}

describe('control characters in the .docx', () => {
  it('every XML part of the document parses strictly, the footer and the document properties included', async () => {
    const parts = await docxParts()
    expect([...parts.keys()]).toEqual(expect.arrayContaining(['word/document.xml', 'docProps/core.xml']))
    expect([...parts.keys()].some((n) => /^word\/footer\d*\.xml$/.test(n))).toBe(true)
    for (const [name, xml] of parts) assertWellFormedXml(xml, name)
  })

  it('U+000B and other line ends become line breaks; the rest is dropped and the words stay', async () => {
    const xml = (await docxParts()).get('word/document.xml')!
    expect(xml).toMatch(/Valve works<\/w:t><\/w:r><w:r>(<w:rPr>.*?<\/w:rPr>)?<w:br\/><w:t[^>]*>phase two</)
    expect(xml).toContain('Second line')
    expect(xml).toContain(' after a form feed end.')
    expect(xml).toMatch(/First line<\/w:t><\/w:r><w:r>(<w:rPr>.*?<\/w:rPr>)?<w:br\/><w:t[^>]*>second line</)
  })
})
