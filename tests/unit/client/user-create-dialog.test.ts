// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput } from 'element-plus'
import UserCreateDialog from '@/components/UserCreateDialog.vue'
import { useUsersStore } from '@/stores/users'
import { mockFetch, type Route } from './fetch-mock'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

/** Native <select> in place of the Element Plus picker (its popper needs a real layout). */
const RoleSelectStub = defineComponent({
  props: { modelValue: { type: String, default: undefined } },
  emits: ['update:modelValue'],
  setup(props, { emit }) {
    return () =>
      h(
        'select',
        { value: props.modelValue ?? '', onChange: (e: Event) => emit('update:modelValue', (e.target as HTMLSelectElement).value) },
        ['', 'admin', 'analyst', 'expert', 'reviewer'].map((r) => h('option', { value: r }, r)),
      )
  },
})

function fieldErrors(root: Element): string[] {
  return [...root.querySelectorAll('.el-form-item__error')].map((e) => e.textContent?.trim() ?? '')
}

async function mountDialog(route: Route) {
  const mock = mockFetch(route)
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  const wrapper = mount(UserCreateDialog, {
    attachTo: document.body,
    props: { open: true },
    global: {
      plugins: [pinia],
      components: { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput },
      stubs: { RoleSelect: RoleSelectStub, transition: false, 'transition-group': false },
    },
  })
  await vi.waitFor(() => expect(document.body.querySelector('form#user-create-form')).not.toBeNull())
  return { wrapper, calls: mock.calls }
}

/** The dialog is teleported to <body>. */
const page = () => new DOMWrapper(document.body)

async function fillAndSubmit() {
  await page().get('input[data-testid="user-email"]').setValue('New.Person@Kestrel.example')
  await page().get('input[data-testid="user-display-name"]').setValue('New Person')
  await page().get('select[data-testid="user-role-select"]').setValue('expert')
  await page().get('input[data-testid="user-password"]').setValue('long-enough-1')
  await page().get('form#user-create-form').trigger('submit')
}

describe('UserCreateDialog', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('puts the server field errors under the matching fields', async () => {
    const { wrapper, calls } = await mountDialog((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 't' } }
      if (c.url === '/api/users') return { status: 409, body: { error: { message: 'Could not create the account', fields: { email: 'An account with this e-mail already exists' } } } }
    })
    await fillAndSubmit()
    await vi.waitFor(() => expect(fieldErrors(document.body)).toEqual(['An account with this e-mail already exists']))
    const post = calls.find((c) => c.url === '/api/users')
    expect(post?.body).toEqual({ email: 'new.person@kestrel.example', displayName: 'New Person', role: 'expert', password: 'long-enough-1' })
    expect(wrapper.emitted('update:open')).toBeUndefined()
    wrapper.unmount()
  })

  it('validates with the shared schema before sending anything', async () => {
    const { wrapper, calls } = await mountDialog(() => undefined)
    await page().get('input[data-testid="user-password"]').setValue('short')
    await page().get('form#user-create-form').trigger('submit')
    await vi.waitFor(() =>
      expect(fieldErrors(document.body)).toEqual(['Enter an e-mail address', 'Enter a display name', 'Choose a role', 'Use at least 10 characters']),
    )
    expect(calls).toHaveLength(0)
    wrapper.unmount()
  })

  it('creates the account, adds it to the store and closes', async () => {
    const created = { id: 12, email: 'new.person@kestrel.example', displayName: 'New Person', role: 'expert', disabled: false, createdAt: '', updatedAt: '' }
    const { wrapper } = await mountDialog((c) => {
      if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 't' } }
      if (c.url === '/api/users') return { status: 201, body: created }
    })
    await fillAndSubmit()
    await flushPromises()
    await vi.waitFor(() => expect(wrapper.emitted('update:open')?.[0]).toEqual([false]))
    expect(wrapper.emitted('created')?.[0]).toEqual([created])
    expect(useUsersStore().items.map((u) => u.id)).toEqual([12])
    wrapper.unmount()
  })
})
