// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput } from 'element-plus'
import StudyCreateDialog from '@/components/study/StudyCreateDialog.vue'
import { useStudiesStore } from '@/stores/studies'
import { mockFetch, type Route } from '../fetch-mock'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

async function mountDialog(route: Route) {
  const mock = mockFetch((c) => (c.url === '/api/auth/csrf' ? { status: 200, body: { token: 't' } } : route(c)))
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/studies', component: { template: '<p />' } },
      { path: '/studies/:id', name: 'study-overview', component: { template: '<p />' } },
    ],
  })
  await router.push('/studies')
  const wrapper = mount(StudyCreateDialog, {
    attachTo: document.body,
    props: { open: true },
    global: {
      plugins: [pinia, router],
      components: { ElAlert, ElButton, ElDialog, ElForm, ElFormItem, ElInput },
      stubs: { transition: false, 'transition-group': false },
    },
  })
  await vi.waitFor(() => expect(document.body.querySelector('form#study-create-form')).not.toBeNull())
  return { wrapper, router, calls: mock.calls }
}

const page = () => new DOMWrapper(document.body)
const input = (id: string) => page().get(`[data-testid="${id}"] input, [data-testid="${id}"] textarea`)

describe('StudyCreateDialog', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('validates with the shared studySchema before sending', async () => {
    const { wrapper, calls } = await mountDialog(() => undefined)
    await input('study-form-title').setValue('ab')
    await page().get('form#study-create-form').trigger('submit')
    await vi.waitFor(() =>
      expect(page().findAll('.el-form-item__error').map((e) => e.text())).toEqual(['Use at least 3 characters', 'Describe the decision this study supports']),
    )
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0)
    wrapper.unmount()
  })

  it('creates the study, adds it to the list and opens it', async () => {
    const created = {
      id: 12, title: 'Heron Bay flood defence', context: 'Sea wall or managed realignment', status: 'framing', ownerId: 2, ownerName: 'Ana',
      myRole: 'analyst', quantityCount: 0, memberCount: 1, version: 1, createdAt: '', updatedAt: '',
    }
    const { wrapper, router, calls } = await mountDialog((c) => (c.method === 'POST' && c.url === '/api/studies' ? { status: 201, body: created } : undefined))
    await input('study-form-title').setValue('  Heron Bay flood defence ')
    await input('study-form-context').setValue('Sea wall or managed realignment')
    await page().get('form#study-create-form').trigger('submit')
    await flushPromises()
    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/studies/12'))
    expect(calls.find((c) => c.method === 'POST')?.body).toEqual({ title: 'Heron Bay flood defence', context: 'Sea wall or managed realignment' })
    expect(useStudiesStore().byId(12)?.title).toBe('Heron Bay flood defence')
    expect(wrapper.emitted('update:open')?.[0]).toEqual([false])
    wrapper.unmount()
  })
})
