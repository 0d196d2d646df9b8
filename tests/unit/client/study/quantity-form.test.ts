// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount, DOMWrapper } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { ElAlert, ElButton, ElDrawer, ElForm, ElFormItem, ElInput } from 'element-plus'
import QuantityForm from '@/components/study/QuantityForm.vue'
import type { Quantity } from '@/api/quantities'
import { useQuantitiesStore } from '@/stores/quantities'
import { mockFetch, type Route } from '../fetch-mock'
import { OptionStub, SelectStub } from './stubs'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

const existing: Quantity = {
  id: 7,
  studyId: 1,
  name: 'Burst rate',
  symbol: 'burst_rate',
  unit: 'bursts/100 km/yr',
  question: 'How many bursts per 100 km per year will the old mains have?',
  support: { kind: 'positive' },
  assumptions: '',
  evidenceNotes: '',
  position: 1,
  version: 3,
  files: [],
  createdAt: '2026-01-05T10:00:00.000Z',
  updatedAt: '2026-01-05T10:00:00.000Z',
}

async function mountForm(route: Route, quantity: Quantity | null = null) {
  const mock = mockFetch((c) => (c.url === '/api/auth/csrf' ? { status: 200, body: { token: 't' } } : route(c)))
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const store = useQuantitiesStore()
  store.studyId = 1
  if (quantity) store.items = [quantity]
  const wrapper = mount(QuantityForm, {
    attachTo: document.body,
    props: { open: true, studyId: 1, quantity },
    global: {
      plugins: [pinia],
      components: { ElAlert, ElButton, ElDrawer, ElForm, ElFormItem, ElInput },
      stubs: { 'el-select': SelectStub, 'el-option': OptionStub, transition: false, 'transition-group': false },
    },
  })
  await vi.waitFor(() => expect(document.body.querySelector('form#quantity-form')).not.toBeNull())
  return { wrapper, calls: mock.calls }
}

const page = () => new DOMWrapper(document.body)
const field = (id: string) => page().find(`[data-testid="${id}"]`)
const input = (id: string) => page().get(`[data-testid="${id}"] input, [data-testid="${id}"] textarea`)
const errorOf = (id: string) => page().find(`[data-testid="${id}"] .el-form-item__error`).text()

async function fillValid() {
  await input('quantity-form-name').setValue('Repair cost per burst')
  await input('quantity-form-symbol').setValue('repair_cost')
  await input('quantity-form-unit').setValue('kGBP')
  await input('quantity-form-question').setValue('What is the mean direct repair cost of one burst in 2027 prices?')
}

describe('QuantityForm', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('asks for lower and upper bounds only when the support is bounded', async () => {
    const { wrapper } = await mountForm(() => undefined)
    expect(field('quantity-form-lower').exists()).toBe(false)
    expect(field('quantity-form-upper').exists()).toBe(false)

    await page().get('select[data-testid="quantity-form-support"]').setValue('bounded')
    expect(field('quantity-form-lower').exists()).toBe(true)
    expect(field('quantity-form-upper').exists()).toBe(true)

    await page().get('select[data-testid="quantity-form-support"]').setValue('proportion')
    expect(field('quantity-form-lower').exists()).toBe(false)
    wrapper.unmount()
  })

  it('checks the bounds with the shared schema before sending', async () => {
    const { wrapper, calls } = await mountForm(() => undefined)
    await fillValid()
    await page().get('select[data-testid="quantity-form-support"]').setValue('bounded')
    await input('quantity-form-lower').setValue('10')
    await input('quantity-form-upper').setValue('5')
    await page().get('form#quantity-form').trigger('submit')
    await vi.waitFor(() => expect(errorOf('quantity-form-upper')).toBe('Upper bound must be above the lower bound'))
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0)
    wrapper.unmount()
  })

  it('sends the bounded support as numbers and puts server field errors on their fields', async () => {
    const { wrapper, calls } = await mountForm((c) => {
      if (c.method === 'POST' && c.url === '/api/studies/1/quantities') {
        return {
          status: 400,
          body: { error: { message: 'Some fields need attention', fields: { symbol: 'Another quantity in this study uses this symbol', 'support.upper': 'Too large for this quantity' } } },
        }
      }
    })
    await fillValid()
    await page().get('select[data-testid="quantity-form-support"]').setValue('bounded')
    await input('quantity-form-lower').setValue('0')
    await input('quantity-form-upper').setValue('250')
    await page().get('form#quantity-form').trigger('submit')
    await vi.waitFor(() => expect(errorOf('quantity-form-symbol')).toBe('Another quantity in this study uses this symbol'))
    expect(errorOf('quantity-form-upper')).toBe('Too large for this quantity')
    expect(page().find('[data-testid="quantity-form-error"]').exists()).toBe(false)
    const post = calls.find((c) => c.method === 'POST' && c.url === '/api/studies/1/quantities')
    expect(post?.body).toEqual({
      name: 'Repair cost per burst',
      symbol: 'repair_cost',
      unit: 'kGBP',
      question: 'What is the mean direct repair cost of one burst in 2027 prices?',
      support: { kind: 'bounded', lower: 0, upper: 250 },
      assumptions: '',
      evidenceNotes: '',
    })
    expect(post?.headers['x-csrf-token']).toBe('t')
    expect(wrapper.emitted('update:open')).toBeUndefined()
    wrapper.unmount()
  })

  it('on 409 keeps the typed text, reloads their version and saves against it', async () => {
    let patches = 0
    const theirs = { ...existing, name: 'Burst rate (their name)', version: 4 }
    const { wrapper, calls } = await mountForm((c) => {
      if (c.method === 'PATCH' && c.url === '/api/quantities/7') {
        patches += 1
        return patches === 1
          ? { status: 409, body: { error: { message: 'Someone else changed this quantity since you opened it' } } }
          : { status: 200, body: { ...theirs, name: 'Burst rate (mine)', version: 5 } }
      }
      if (c.method === 'GET' && c.url === '/api/quantities/7') return { status: 200, body: theirs }
    }, existing)
    expect((input('quantity-form-name').element as HTMLInputElement).value).toBe('Burst rate')
    await input('quantity-form-name').setValue('Burst rate (mine)')
    await page().get('form#quantity-form').trigger('submit')
    await vi.waitFor(() => expect(page().find('[data-testid="conflict-alert"]').exists()).toBe(true))
    expect(page().get('[data-testid="conflict-alert"]').text()).toContain('Someone else changed it')

    await page().get('[data-testid="conflict-reload"]').trigger('click')
    await vi.waitFor(() => expect(page().find('[data-testid="conflict-theirs"]').exists()).toBe(true))
    expect(page().get('[data-testid="conflict-theirs"]').text()).toContain('Burst rate (their name)')
    expect((input('quantity-form-name').element as HTMLInputElement).value).toBe('Burst rate (mine)')

    await page().get('form#quantity-form').trigger('submit')
    await flushPromises()
    await vi.waitFor(() => expect(wrapper.emitted('update:open')?.[0]).toEqual([false]))
    const second = calls.filter((c) => c.method === 'PATCH')[1]
    expect(second?.body).toMatchObject({ name: 'Burst rate (mine)', version: 4, support: { kind: 'positive' } })
    expect(useQuantitiesStore().byId(7)?.name).toBe('Burst rate (mine)')
    wrapper.unmount()
  })
})
