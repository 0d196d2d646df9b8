// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import {
  ElAlert, ElButton, ElCheckbox, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioGroup, ElSelect, ElSwitch,
} from 'element-plus'
import RoundForm from '@/components/rounds/RoundForm.vue'
import type { Round, StudyQuantity } from '@/api/rounds'
import { mockFetch, type Route } from '../fetch-mock'

const quantity = (id: number, symbol: string, support: StudyQuantity['support']): StudyQuantity => ({
  id, studyId: 1, name: `Quantity ${symbol}`, symbol, unit: 'u', question: 'What is it?', support,
  assumptions: '', evidenceNotes: '', position: id, version: 1,
})
const quantities = [quantity(11, 'burst', { kind: 'positive' }), quantity(12, 'uptake', { kind: 'proportion' })]

const draft: Round = {
  id: 7, studyId: 1, number: 1, title: 'Round 1', briefing: '', opensAt: '2030-01-01T09:00:00.000Z', closesAt: '2030-01-15T17:00:00.000Z',
  status: 'draft', reminderHoursBefore: 24, reminderSentAt: null, timeZone: 'Europe/Berlin', calibrationPosition: 'after', feedbackEnabled: false, askCalibration: false,
  practice: { question: 'Practice: how many kilometres of mains?', unit: 'km', answer: 1840 }, openedAt: null, closedAt: null, version: 3,
  items: [
    { quantityId: 11, method: 'quantile', askTails: false, quantity: { ...quantities[0], files: [] } },
    { quantityId: 12, method: 'fixed-interval', edges: [0, 0.5, 1], askTails: false, quantity: { ...quantities[1], files: [] } },
  ],
  links: [],
  panel: [],
}

function mountForm(route: Route, round: Round | null = null) {
  const mock = mockFetch((c) => (c.url === '/api/auth/csrf' ? { status: 200, body: { token: 'tok' } } : route(c)))
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const wrapper = mount(RoundForm, {
    attachTo: document.body,
    props: { studyId: 1, quantities, round },
    global: {
      plugins: [pinia],
      components: { ElAlert, ElButton, ElCheckbox, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioGroup, ElSelect, ElSwitch },
      stubs: { transition: false, 'el-date-picker': true },
    },
  })
  return { wrapper, calls: mock.calls }
}

async function settle() {
  for (let i = 0; i < 5; i++) {
    await flushPromises()
    await new Promise((resolve) => setTimeout(resolve, 5))
  }
}

const itemOf = (w: ReturnType<typeof mountForm>['wrapper'], symbol: string) => w.get(`[data-testid="round-form-item"][data-quantity-symbol="${symbol}"]`)

describe('RoundForm', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('offers every quantity as a checkbox with its symbol, and checks the form before sending', async () => {
    const { wrapper, calls } = mountForm(() => undefined)
    const boxes = wrapper.findAll('[data-testid="round-form-quantity"]')
    expect(boxes.map((b) => b.attributes('data-quantity-symbol'))).toEqual(['burst', 'uptake'])
    expect((wrapper.get('[data-testid="round-form-practice-question"] textarea').element as HTMLTextAreaElement).value).toContain('Kestrel Valley')
    await wrapper.get('form').trigger('submit')
    await settle()
    await vi.waitFor(() => expect(wrapper.text()).toContain('Enter a title'))
    expect(wrapper.text()).toContain('Choose at least one quantity')
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0)

    await boxes[1].get('input').setValue(true)
    await settle()
    expect(wrapper.findAll('[data-testid="round-form-item"]')).toHaveLength(1)
    expect(wrapper.text()).not.toContain('Choose at least one quantity')
    wrapper.unmount()
  })

  it('shows a typing problem in the edges under the item, and blocks the save', async () => {
    const { wrapper, calls } = mountForm(() => ({ status: 200, body: draft }), draft)
    const edges = itemOf(wrapper, 'uptake').get('[data-testid="round-form-edges"] input')
    expect((edges.element as HTMLInputElement).value).toBe('0, 0.5, 1')
    await edges.setValue('0, 0.5, 2')
    await edges.trigger('blur')
    await settle()
    await vi.waitFor(() => expect(itemOf(wrapper, 'uptake').text()).toContain("Interval edges must lie within the quantity's support [0, 1]"))
    await wrapper.get('form').trigger('submit')
    await settle()
    expect(calls.filter((c) => c.method === 'PATCH')).toHaveLength(0)
    wrapper.unmount()
  })

  it("puts the server's items[1].edges error on the second item, and sends the version", async () => {
    const { wrapper, calls } = mountForm((c) => {
      if (c.method === 'PATCH' && c.url === '/api/rounds/7') {
        return { status: 400, body: { error: { message: 'Some fields need attention', fields: { 'items[1].edges': 'Edges rejected by the server' } } } }
      }
    }, draft)
    await wrapper.get('form').trigger('submit')
    await settle()
    const patch = calls.find((c) => c.method === 'PATCH')
    expect(patch?.body).toMatchObject({ version: 3, title: 'Round 1', timeZone: 'Europe/Berlin', items: [{ quantityId: 11, method: 'quantile' }, { quantityId: 12, method: 'fixed-interval', edges: [0, 0.5, 1] }] })
    expect((patch?.body as { items: object[] }).items[0]).not.toHaveProperty('edges')
    await vi.waitFor(() => expect(itemOf(wrapper, 'uptake').text()).toContain('Edges rejected by the server'))
    expect(itemOf(wrapper, 'burst').text()).not.toContain('Edges rejected')
    wrapper.unmount()
  })

  it('offers a reload when someone else changed the round (409)', async () => {
    const { wrapper } = mountForm((c) => {
      if (c.method === 'PATCH') return { status: 409, body: { error: { message: 'Someone else changed this round since you opened it; reload to see their version' } } }
    }, draft)
    await wrapper.get('form').trigger('submit')
    await settle()
    const alert = wrapper.get('[data-testid="round-form-error"]')
    expect(alert.text()).toContain('Someone else changed this round')
    await alert.get('button').trigger('click')
    expect(wrapper.emitted('reload')).toHaveLength(1)
    wrapper.unmount()
  })
})
