import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'

let h: ApiHarness
beforeAll(() => {
  h = startApi()
})
afterAll(async () => {
  await h.close()
})

describe('/api/users role checks', () => {
  it('answers 401 when not signed in', async () => {
    const res = await new Client(h).get('/api/users')
    expect(res.status).toBe(401)
  })

  it.each(['analyst', 'expert1', 'reviewer'])('answers 403 to the %s', async (who) => {
    const c = await signedIn(h, `${who}@kestrel.example`)
    const res = await c.get('/api/users')
    expect(res.status).toBe(403)
    expect(res.body.error.message).toBe('Your role does not allow this')
    expect((await c.post('/api/users', { email: 'x@kestrel.example', displayName: 'X Y', role: 'admin', password: 'long-enough-1' })).status).toBe(403)
  })

  it('lists the six demo accounts for the admin', async () => {
    const c = await signedIn(h, 'admin@kestrel.example')
    const res = await c.get('/api/users').expect(200)
    const emails = res.body.map((u: { email: string }) => u.email)
    expect(emails).toEqual(expect.arrayContaining([
      'admin@kestrel.example', 'analyst@kestrel.example', 'expert1@kestrel.example',
      'expert2@kestrel.example', 'expert3@kestrel.example', 'reviewer@kestrel.example',
    ]))
    expect(res.body.every((u: Record<string, unknown>) => !('password_hash' in u) && !('passwordHash' in u))).toBe(true)
  })
})

describe('admin user management', () => {
  it('creates a user who can then sign in, changes the role, and disables the account', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const created = await admin.post('/api/users', { email: 'New.Expert@Kestrel.example', displayName: 'Nadia Expert', role: 'expert', password: 'a-good-pass-9' })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ email: 'new.expert@kestrel.example', displayName: 'Nadia Expert', role: 'expert', disabled: false })

    const asNew = await signedIn(h, 'new.expert@kestrel.example').catch(() => null)
    expect(asNew).toBeNull() // the helper signs in with the demo password, which this account does not have
    const direct = await new Client(h).signIn('new.expert@kestrel.example', 'a-good-pass-9')
    expect(direct.status).toBe(200)

    const changed = await admin.patch(`/api/users/${created.body.id}`, { role: 'reviewer' })
    expect(changed.status).toBe(200)
    expect(changed.body.role).toBe('reviewer')

    const disabled = await admin.patch(`/api/users/${created.body.id}`, { disabled: true })
    expect(disabled.body.disabled).toBe(true)
    const afterDisable = await new Client(h).signIn('new.expert@kestrel.example', 'a-good-pass-9')
    expect(afterDisable.status).toBe(401)
  })

  it('signs a disabled user out of an open session', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const created = await admin.post('/api/users', { email: 'soon.gone@kestrel.example', displayName: 'Soon Gone', role: 'analyst', password: 'a-good-pass-9' }).expect(201)
    const victim = new Client(h)
    expect((await victim.signIn('soon.gone@kestrel.example', 'a-good-pass-9')).status).toBe(200)
    await victim.get('/api/auth/me').expect(200)
    await admin.patch(`/api/users/${created.body.id}`, { disabled: true }).expect(200)
    expect((await victim.get('/api/auth/me')).status).toBe(401)
  })

  it('answers 400 with a message per field for an invalid new user, and saves nothing', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const before = await h.db('users').count<{ count: string }[]>('* as count')
    const res = await admin.post('/api/users', { email: 'bad', displayName: 'X', role: 'wizard', password: 'short' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({
      email: 'Enter a valid e-mail address',
      displayName: 'Use at least 2 characters',
      role: 'Choose one of: admin, analyst, expert, reviewer',
      password: 'Use at least 10 characters',
    })
    const after = await h.db('users').count<{ count: string }[]>('* as count')
    expect(after[0].count).toBe(before[0].count)
  })

  it('refuses a duplicate e-mail with a field error', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const res = await admin.post('/api/users', { email: 'ANALYST@kestrel.example', displayName: 'Copy Cat', role: 'analyst', password: 'a-good-pass-9' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ email: 'This e-mail address is already registered' })
  })

  it('refuses unknown fields and a non-boolean disabled flag', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const users = await admin.get('/api/users')
    const expert = users.body.find((u: { email: string }) => u.email === 'expert3@kestrel.example')
    const res = await admin.patch(`/api/users/${expert.id}`, { disabled: 'yes', isAdmin: true })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.disabled).toBe('Must be true or false')
  })

  it('does not let an admin disable their own account', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    const me = await admin.get('/api/auth/me')
    const res = await admin.patch(`/api/users/${me.body.id}`, { disabled: true })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toEqual({ disabled: 'Not for your own account' })
  })

  it('answers 404 for an unknown user id', async () => {
    const admin = await signedIn(h, 'admin@kestrel.example')
    expect((await admin.patch('/api/users/999999', { role: 'expert' })).status).toBe(404)
    expect((await admin.patch('/api/users/abc', { role: 'expert' })).status).toBe(404)
  })
})
