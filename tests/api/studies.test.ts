import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_STUDY_TITLE } from '../../seeds/demo'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
beforeAll(() => {
  h = startApi()
})
afterAll(async () => {
  await h.close()
})

describe('GET /api/studies', () => {
  it('answers 401 when not signed in', async () => {
    expect((await new Client(h).get('/api/studies')).status).toBe(401)
  })

  it('lists the demo study for its analyst with the analyst role and five members', async () => {
    const c = await signedIn(h, 'analyst@kestrel.example')
    const res = await c.get('/api/studies').expect(200)
    const demo = res.body.filter((s: { title: string }) => s.title === DEMO_STUDY_TITLE)
    expect(demo).toHaveLength(1)
    expect(demo[0]).toMatchObject({ title: DEMO_STUDY_TITLE, myRole: 'analyst', memberCount: 5, status: 'framing', ownerName: 'Priya Natarajan' })
  })

  it('gives each member their own study role', async () => {
    const expert = await signedIn(h, 'expert2@kestrel.example')
    const demoOf = async (c: Client) => (await c.get('/api/studies')).body.find((s: { title: string }) => s.title === DEMO_STUDY_TITLE)
    expect((await demoOf(expert)).myRole).toBe('expert')
    const reviewer = await signedIn(h, 'reviewer@kestrel.example')
    expect((await demoOf(reviewer)).myRole).toBe('reviewer')
  })

  it('hides studies from a user who is not a member', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    await admin.post('/api/users', { email: 'outsider@kestrel.example', displayName: 'Out Sider', role: 'analyst', password: 'a-good-pass-9' }).expect(201)
    const outsider = new Client(h)
    await outsider.signIn('outsider@kestrel.example', 'a-good-pass-9')
    expect((await outsider.get('/api/studies')).body).toEqual([])
    expect((await admin.get('/api/studies')).body.map((s: { title: string }) => s.title)).toContain(DEMO_STUDY_TITLE)
  })
})
