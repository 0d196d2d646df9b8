// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { ElAlert, ElButton, ElForm, ElFormItem, ElInput } from 'element-plus'
import SignInForm from '@/components/SignInForm.vue'
import { useAuthStore } from '@/stores/auth'
import { expertUser, mockFetch, type Route } from './fetch-mock'

function mountForm(route: Route) {
  const mock = mockFetch(route)
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const wrapper = mount(SignInForm, {
    attachTo: document.body,
    global: {
      plugins: [pinia],
      components: { ElAlert, ElButton, ElForm, ElFormItem, ElInput },
      stubs: { transition: false, 'transition-group': false },
    },
  })
  return { wrapper, calls: mock.calls }
}

/** Inline error texts under the fields, in order. */
function fieldErrors(wrapper: { element: Element }): string[] {
  return [...wrapper.element.querySelectorAll('.el-form-item__error')].map((e) => e.textContent?.trim() ?? '')
}

/** vee-validate validates asynchronously (batched on short timers); let it and the re-render settle. */
async function settle() {
  for (let i = 0; i < 5; i++) {
    await flushPromises()
    await new Promise((resolve) => setTimeout(resolve, 5))
  }
}

async function fill(wrapper: ReturnType<typeof mountForm>['wrapper'], email: string, password: string) {
  await wrapper.get('input[data-testid="sign-in-email"]').setValue(email)
  await wrapper.get('input[data-testid="sign-in-password"]').setValue(password)
}

describe('SignInForm', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('puts the test ids on the real inputs and labels them', async () => {
    const { wrapper } = mountForm(() => undefined)
    await settle()
    const email = wrapper.get('input[data-testid="sign-in-email"]')
    const label = wrapper.get(`label[for="${email.attributes('id')}"]`)
    expect(label.text()).toBe('E-mail')
    expect(wrapper.get('input[data-testid="sign-in-password"]').attributes('type')).toBe('password')
    const submit = wrapper.get('button[data-testid="sign-in-submit"]')
    expect(submit.text()).toBe('Sign in')
    expect(submit.attributes('type')).toBe('submit')
    wrapper.unmount()
  })

  it('shows inline errors for an empty submit and sends nothing', async () => {
    const { wrapper, calls } = mountForm(() => undefined)
    await settle()
    await wrapper.get('form').trigger('submit')
    await settle()
    // Element Plus shows a form item's message after a short debounce.
    await vi.waitFor(() => expect(fieldErrors(wrapper)).toEqual(['Enter your e-mail address', 'Enter your password']))
    expect(wrapper.get('input[data-testid="sign-in-email"]').attributes('aria-invalid')).toBe('true')
    expect(calls).toHaveLength(0)
    wrapper.unmount()
  })

  it('shows an invalid e-mail inline', async () => {
    const { wrapper } = mountForm(() => undefined)
    await fill(wrapper, 'not-an-address', 'secret')
    await wrapper.get('form').trigger('submit')
    await settle()
    await vi.waitFor(() => expect(fieldErrors(wrapper)).toEqual(['Enter a valid e-mail address']))
    wrapper.unmount()
  })

  it("shows the server's 401 message in an alert", async () => {
    const { wrapper, calls } = mountForm((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 'anon' } }
      if (c.url === '/api/auth/sign-in') return { status: 401, body: { error: { message: 'E-mail or password is incorrect' } } }
    })
    await fill(wrapper, 'expert1@kestrel.example', 'wrong-password')
    await wrapper.get('form').trigger('submit')
    await settle()
    const alert = wrapper.get('[data-testid="sign-in-error"]')
    expect(alert.attributes('role')).toBe('alert')
    expect(alert.text()).toContain('E-mail or password is incorrect')
    const signIn = calls.find((c) => c.url === '/api/auth/sign-in')
    expect(signIn?.headers['x-csrf-token']).toBe('anon')
    expect(signIn?.body).toEqual({ email: 'expert1@kestrel.example', password: 'wrong-password' })
    wrapper.unmount()
  })

  it('signs in, emits the user and fetches the new CSRF token', async () => {
    let n = 0
    const { wrapper, calls } = mountForm((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: `tok-${++n}` } }
      if (c.url === '/api/auth/sign-in') return { status: 200, body: expertUser }
    })
    await fill(wrapper, '  expert1@kestrel.example ', 'priorsmith-demo')
    await wrapper.get('form').trigger('submit')
    await settle()
    expect(wrapper.emitted('signed-in')?.[0]).toEqual([expertUser])
    expect(calls.find((c) => c.url === '/api/auth/sign-in')?.body).toEqual({ email: 'expert1@kestrel.example', password: 'priorsmith-demo' })
    const auth = useAuthStore()
    expect(auth.user?.displayName).toBe('Erin Expert')
    expect(auth.csrfToken).toBe('tok-2')
    expect(wrapper.find('[data-testid="sign-in-error"]').exists()).toBe(false)
    wrapper.unmount()
  })
})
