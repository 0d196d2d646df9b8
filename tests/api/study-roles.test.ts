import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD } from '../../seeds/demo'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

// Study powers come from study memberships; an account's role must agree with every membership it holds, and every
// study keeps its owner as an analyst.

let h: ApiHarness
let admin: Client

async function newUser(displayName: string, role: string) {
  const email = `${displayName.toLowerCase().replace(/\W+/g, '.')}.${Date.now()}@kestrel.example`
  const user = (await admin.post('/api/users', { email, displayName, role, password: DEMO_PASSWORD }).expect(201)).body as { id: number }
  return { id: user.id, email }
}

async function newStudy(owner: Client, title: string): Promise<number> {
  return (await owner.post('/api/studies', { title, context: 'Membership rules.' }).expect(201)).body.id
}

beforeAll(async () => {
  h = startApi()
  admin = await signedIn(h, 'admin@kestrel.example')
})
afterAll(async () => {
  await h.close()
})

describe('changing an account’s role', () => {
  it('refuses to make an analyst an expert while they hold study powers, naming the studies; once removed, the change holds at once', async () => {
    const owner = await newUser('Maren Ostby', 'analyst')
    const colleague = await newUser('Jonas Brekke', 'analyst')
    const ownerClient = await signedIn(h, owner.email)
    const colleagueClient = await signedIn(h, colleague.email)
    const planning = await newStudy(ownerClient, 'Mains renewal planning')
    const leakage = await newStudy(ownerClient, 'Leakage targets')
    await ownerClient.post(`/api/studies/${planning}/members`, { userId: colleague.id, studyRole: 'analyst' }).expect(201)
    await ownerClient.post(`/api/studies/${leakage}/members`, { userId: colleague.id, studyRole: 'reviewer' }).expect(201)

    const refused = await admin.patch(`/api/users/${colleague.id}`, { role: 'expert' })
    expect(refused.status).toBe(409)
    expect(refused.body.error.message).toBe(
      'Jonas Brekke is analyst of “Mains renewal planning” and reviewer of “Leakage targets”; an expert account cannot hold these study roles. Remove them from these studies first.',
    )
    expect(refused.body.error.fields).toEqual({ role: 'Remove them from Mains renewal planning, Leakage targets first' })
    expect((await h.db('users').where({ id: colleague.id }).first('role')).role).toBe('analyst')
    // Refused, nothing changed: the colleague still works in the study.
    const study = (await colleagueClient.get(`/api/studies/${planning}`).expect(200)).body
    await colleagueClient.patch(`/api/studies/${planning}`, { title: 'Mains renewal planning 2027', context: 'Membership rules.', version: study.version }).expect(200)

    await admin.delete(`/api/studies/${planning}/members/${colleague.id}`).expect(204)
    await admin.delete(`/api/studies/${leakage}/members/${colleague.id}`).expect(204)
    await admin.patch(`/api/users/${colleague.id}`, { role: 'expert' }).expect(200)
    // The live session follows at once: no study powers, no new study.
    expect((await colleagueClient.get('/api/auth/me').expect(200)).body.role).toBe('expert')
    expect((await colleagueClient.get(`/api/studies/${planning}`)).status).toBe(403)
    expect((await colleagueClient.post(`/api/studies/${planning}/quantities`, {
      name: 'Burst rate', symbol: 'burst', unit: 'bursts', question: 'Bursts per 100 km of main per year?', support: { kind: 'positive' },
    })).status).toBe(403)
    expect((await colleagueClient.post('/api/studies', { title: 'Own study', context: 'Should not be possible.' })).status).toBe(403)
  })

  it('refuses to make a panel expert an analyst while they are an expert member, and lets a role change that keeps every membership valid', async () => {
    const expert = await newUser('Sofie Lindqvist', 'expert')
    const ownerInfo = await newUser('Arne Dahl', 'analyst')
    const ownerClient = await signedIn(h, ownerInfo.email)
    const study = await newStudy(ownerClient, 'Pressure management')
    await ownerClient.post(`/api/studies/${study}/members`, { userId: expert.id, studyRole: 'expert' }).expect(201)
    const refused = await admin.patch(`/api/users/${expert.id}`, { role: 'analyst' })
    expect(refused.status).toBe(409)
    expect(refused.body.error.message).toBe('Sofie Lindqvist is expert of “Pressure management”; an analyst account cannot hold this study role. Remove them from this study first.')
    // analyst → admin keeps the analyst membership valid.
    await admin.patch(`/api/users/${ownerInfo.id}`, { role: 'admin' }).expect(200)
  })
})

describe('the study’s owner and its last analyst', () => {
  it('lets no co-analyst, admin or owner demote the owner, and refuses to remove the owner', async () => {
    const owner = await newUser('Kari Haugen', 'analyst')
    const co = await newUser('Lars Vik', 'analyst')
    const ownerClient = await signedIn(h, owner.email)
    const coClient = await signedIn(h, co.email)
    const study = await newStudy(ownerClient, 'Night-flow reduction')
    await ownerClient.post(`/api/studies/${study}/members`, { userId: co.id, studyRole: 'analyst' }).expect(201)

    for (const [who, c] of [['co-analyst', coClient], ['admin', admin], ['owner', ownerClient]] as const) {
      const res = await c.post(`/api/studies/${study}/members`, { userId: owner.id, studyRole: 'reviewer' })
      expect(res.status, who).toBe(400)
      expect(res.body.error.fields).toEqual({ studyRole: 'The study’s owner stays its analyst' })
      expect((await c.post(`/api/studies/${study}/members`, { userId: owner.id, studyRole: 'expert' })).status, who).toBe(400)
    }
    expect((await coClient.delete(`/api/studies/${study}/members/${owner.id}`)).status).toBe(400)
    const roles = await h.db('study_members').where({ study_id: study }).orderBy('user_id').select('user_id', 'study_role')
    expect(roles).toEqual([{ user_id: owner.id, study_role: 'analyst' }, { user_id: co.id, study_role: 'analyst' }])
    // A co-analyst may step down while the owner remains an analyst.
    await coClient.post(`/api/studies/${study}/members`, { userId: co.id, studyRole: 'reviewer' }).expect(201)
  })

  it('keeps at least one analyst even where the owner is no longer one', async () => {
    const owner = await newUser('Eva Strand', 'analyst')
    const co = await newUser('Nils Berg', 'analyst')
    const ownerClient = await signedIn(h, owner.email)
    const coClient = await signedIn(h, co.email)
    const study = await newStudy(ownerClient, 'Alert uptake')
    await ownerClient.post(`/api/studies/${study}/members`, { userId: co.id, studyRole: 'analyst' }).expect(201)
    // Data written before the owner rule: the owner's membership was dropped, the co-analyst is the last analyst.
    await h.db('study_members').where({ study_id: study, user_id: owner.id }).delete()
    const demote = await coClient.post(`/api/studies/${study}/members`, { userId: co.id, studyRole: 'reviewer' })
    expect(demote.status).toBe(400)
    expect(demote.body.error.message).toBe('A study needs at least one analyst; add another analyst first')
    expect((await coClient.delete(`/api/studies/${study}/members/${co.id}`)).status).toBe(400)
    expect((await h.db('study_members').where({ study_id: study, user_id: co.id }).first('study_role')).study_role).toBe('analyst')
  })
})
