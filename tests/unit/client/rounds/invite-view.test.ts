// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ElAlert, ElButton, ElForm, ElFormItem, ElInput, ElSkeleton } from 'element-plus'
import InviteView from '@/views/InviteView.vue'
import { useAuthStore } from '@/stores/auth'
import { expertUser, mockFetch, type Route } from '../fetch-mock'

const TOKEN = 'AbCdEfGhIjKlMnOpQrStUvWx'
const invitation = (state: string, message: string | null = null) => ({
  state, message, email: 'mara@example.org', name: 'Mara Lindqvist', studyTitle: 'Kestrel Valley', roundTitle: 'Round 1',
  roundId: 42, opensAt: '2030-01-01T09:00:00.000Z', closesAt: '2030-01-15T17:00:00.000Z', expiresAt: '2030-01-14T09:00:00.000Z',
})

async function mountInvite(route: Route) {
  const mock = mockFetch(route)
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/invite/:token', name: 'invite', component: InviteView, props: true },
      { path: '/answer/:roundId', name: 'answer', component: { template: '<p>answer</p>' } },
      { path: '/sign-in', name: 'sign-in', component: { template: '<p>sign in</p>' } },
    ],
  })
  await router.push(`/invite/${TOKEN}`)
  const wrapper = mount(InviteView, {
    attachTo: document.body,
    props: { token: TOKEN },
    global: { plugins: [pinia, router], components: { ElAlert, ElButton, ElForm, ElFormItem, ElInput, ElSkeleton }, stubs: { transition: false } },
  })
  await flushPromises()
  return { wrapper, calls: mock.calls, router }
}

async function settle() {
  for (let i = 0; i < 5; i++) {
    await flushPromises()
    await new Promise((resolve) => setTimeout(resolve, 5))
  }
}

describe('InviteView', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it("shows the server's message plainly for a used link, with a way to sign in", async () => {
    const { wrapper } = await mountInvite((c) =>
      c.url === `/api/invitations/${TOKEN}` ? { status: 200, body: invitation('used', 'This invitation link has already been used. Sign in with the password you chose.') } : undefined,
    )
    const state = wrapper.get('[data-testid="invite-state"]')
    expect(state.attributes('data-state')).toBe('used')
    expect(state.text()).toContain('This invitation link has already been used.')
    expect(state.get('a').attributes('href')).toBe('/sign-in')
    expect(wrapper.find('[data-testid="invite-submit"]').exists()).toBe(false)
    wrapper.unmount()
  })

  it('prefills the invited name, checks that the passwords match, then signs in and goes to the round', async () => {
    let csrf = 0
    const { wrapper, calls, router } = await mountInvite((c) => {
      if (c.url === `/api/invitations/${TOKEN}`) return { status: 200, body: invitation('valid') }
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: `tok-${++csrf}` } }
      if (c.url === `/api/invitations/${TOKEN}/accept`) return { status: 201, body: { user: expertUser, roundId: 42 } }
      if (c.url === '/api/auth/me') return { status: 200, body: expertUser }
    })
    const input = (id: string) => wrapper.get(`[data-testid="${id}"] input`)
    expect((input('invite-name').element as HTMLInputElement).value).toBe('Mara Lindqvist')

    await input('invite-password').setValue('kestrel-valley-42')
    await input('invite-password-confirm').setValue('kestrel-valley-43')
    await wrapper.get('form').trigger('submit')
    await settle()
    await vi.waitFor(() => expect(wrapper.text()).toContain('The two passwords are not the same'))
    expect(calls.some((c) => c.url.endsWith('/accept'))).toBe(false)

    await input('invite-password-confirm').setValue('kestrel-valley-42')
    await wrapper.get('form').trigger('submit')
    await settle()
    const accept = calls.find((c) => c.url.endsWith('/accept'))
    expect(accept?.body).toEqual({ name: 'Mara Lindqvist', password: 'kestrel-valley-42' })
    expect(accept?.headers['x-csrf-token']).toBe('tok-1')
    const auth = useAuthStore()
    expect(auth.user?.email).toBe(expertUser.email)
    expect(auth.csrfToken).toBe('tok-2')
    expect(router.currentRoute.value.fullPath).toBe('/answer/42')
    wrapper.unmount()
  })

  it('says plainly when the link is unknown', async () => {
    const { wrapper } = await mountInvite((c) =>
      c.url === `/api/invitations/${TOKEN}` ? { status: 404, body: { error: { message: 'This invitation link is not valid' } } } : undefined,
    )
    expect(wrapper.get('[data-testid="invite-state"]').text()).toContain('This invitation link is not valid')
    wrapper.unmount()
  })
})
