// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, type Router } from 'vue-router'
import { createAppRouter } from '@/router'
import { safeRedirect } from '@/router/guard'
import { useAuthStore } from '@/stores/auth'
import type { User } from '@shared/types'
import { adminUser, expertUser, mockFetch } from './fetch-mock'

/** A router over the app's real routes, with GET /api/auth/me answering as `user` (or 401). */
function setup(user: User | null) {
  const { fetch, calls } = mockFetch((c) => {
    if (c.url === '/api/auth/me') return user ? { status: 200, body: user } : { status: 401, body: { error: { message: 'Sign in to continue' } } }
  })
  vi.stubGlobal('fetch', fetch)
  const router: Router = createAppRouter(createMemoryHistory())
  return { router, calls }
}

describe('router guard', () => {
  beforeEach(() => setActivePinia(createPinia()))
  afterEach(() => vi.unstubAllGlobals())

  it('sends a visitor who is not signed in to /sign-in with the page to come back to', async () => {
    const { router } = setup(null)
    await router.push('/admin/users?tab=all')
    expect(router.currentRoute.value.name).toBe('sign-in')
    expect(router.currentRoute.value.query.redirect).toBe('/admin/users?tab=all')
  })

  it('asks the server for the session only once', async () => {
    const { router, calls } = setup(null)
    await router.push('/studies')
    await router.push('/studies/4')
    expect(calls.filter((c) => c.url === '/api/auth/me')).toHaveLength(1)
    expect(router.currentRoute.value.query.redirect).toBe('/studies/4')
  })

  it('sends a signed-in user without the role to /not-allowed', async () => {
    const { router } = setup(expertUser)
    await router.push('/admin/users')
    expect(router.currentRoute.value.path).toBe('/not-allowed')
    expect(router.currentRoute.value.query.from).toBe('/admin/users')
  })

  it('lets an admin open the admin page and any signed-in user open studies', async () => {
    const admin = setup(adminUser)
    await admin.router.push('/admin/users')
    expect(admin.router.currentRoute.value.name).toBe('admin-users')

    setActivePinia(createPinia())
    const expert = setup(expertUser)
    await expert.router.push('/studies/12')
    expect(expert.router.currentRoute.value.name).toBe('study-overview')
    expect(expert.router.currentRoute.value.params.id).toBe('12')
  })

  it('takes a signed-in user from /sign-in to the redirect target, ignoring other sites', async () => {
    const { router } = setup(expertUser)
    await router.push('/sign-in?redirect=/studies/3')
    expect(router.currentRoute.value.fullPath).toBe('/studies/3')
    await router.push('/sign-in?redirect=//evil.example/x')
    expect(router.currentRoute.value.name).toBe('studies')
  })

  it('returns to the redirect target after signing in', async () => {
    const { router } = setup(null)
    await router.push('/studies/3')
    expect(router.currentRoute.value.name).toBe('sign-in')
    const auth = useAuthStore()
    auth.user = expertUser // what signIn() stores
    await router.replace(safeRedirect(router.currentRoute.value.query.redirect) ?? '/studies')
    expect(router.currentRoute.value.fullPath).toBe('/studies/3')
  })

  it('shows the 404 page for unknown paths, signed in or not', async () => {
    const { router } = setup(null)
    await router.push('/no/such/page')
    expect(router.currentRoute.value.name).toBe('not-found')
    await router.push('/studies/abc')
    expect(router.currentRoute.value.name).toBe('not-found')
  })
})

describe('safeRedirect', () => {
  it('accepts only paths on this site', () => {
    expect(safeRedirect('/studies/2?x=1')).toBe('/studies/2?x=1')
    expect(safeRedirect('https://evil.example')).toBeNull()
    expect(safeRedirect('//evil.example')).toBeNull()
    expect(safeRedirect('/\\evil.example')).toBeNull()
    expect(safeRedirect('/sign-in')).toBeNull()
    expect(safeRedirect(['/studies'])).toBeNull()
  })
})
