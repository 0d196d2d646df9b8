// @vitest-environment happy-dom
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { ElAlert, ElButton, ElEmpty, ElSkeleton, ElTag } from 'element-plus'
import type { StudySummary } from '@shared/types'
import StudyOutboxView from '@/views/study/StudyOutboxView.vue'
import { mockFetch, type Reply } from '../fetch-mock'

const study: StudySummary = {
  id: 4, title: 'Heron Bay', context: 'ctx', status: 'eliciting', ownerId: 2, ownerName: 'Ana', myRole: 'analyst',
  quantityCount: 1, memberCount: 2, version: 1, createdAt: '', updatedAt: '',
}
const message = {
  id: 1, kind: 'invitation', to: 'new.expert@heron.example', toName: 'Nadia Expert', subject: 'Invitation', status: 'failed',
  attempts: 3, lastError: 'Connection refused', createdAt: '2026-03-02T10:00:00.000Z', sentAt: null,
}

/** The table is stubbed: el-table needs a real layout; the test checks what it is given. */
const TableStub = { name: 'ElTable', props: ['data'], template: '<div data-testid="outbox-table" :data-rows="data.length"><slot /></div>' }

function mountView(reply: (n: number) => Reply) {
  let n = 0
  const mock = mockFetch((c) => (c.url === '/api/studies/4/outbox' ? reply(++n) : undefined))
  vi.stubGlobal('fetch', mock.fetch)
  const wrapper = mount(StudyOutboxView, {
    props: { study },
    global: {
      plugins: [createPinia()],
      components: { ElAlert, ElButton, ElEmpty, ElSkeleton, ElTag },
      stubs: { 'el-table': TableStub, 'el-table-column': true, transition: false },
    },
  })
  return { wrapper, calls: () => mock.calls.filter((c) => c.url === '/api/studies/4/outbox').length }
}

describe('StudyOutboxView', () => {
  beforeEach(() => {
    vi.useFakeTimers()
  })
  afterEach(() => {
    vi.useRealTimers()
    vi.unstubAllGlobals()
  })

  it('refreshes every 10 s while open and stops when the page closes', async () => {
    const { wrapper, calls } = mountView(() => ({ status: 200, body: [message] }))
    await flushPromises()
    expect(calls()).toBe(1)
    expect(wrapper.get('[data-testid="outbox-table"]').attributes('data-rows')).toBe('1')
    expect(wrapper.get('[data-testid="outbox-summary"]').text()).toContain('1 failed')

    await vi.advanceTimersByTimeAsync(10_000)
    expect(calls()).toBe(2)
    await vi.advanceTimersByTimeAsync(10_000)
    expect(calls()).toBe(3)

    wrapper.unmount()
    await vi.advanceTimersByTimeAsync(30_000)
    expect(calls()).toBe(3)
  })

  it('keeps the last list when a refresh fails, and says so', async () => {
    const { wrapper } = mountView((n) => (n === 1 ? { status: 200, body: [message] } : { status: 500, body: { error: { message: 'Database unreachable' } } }))
    await flushPromises()
    await vi.advanceTimersByTimeAsync(10_000)
    await flushPromises()
    expect(wrapper.get('[data-testid="outbox-table"]').attributes('data-rows')).toBe('1')
    expect(wrapper.text()).toContain('Could not refresh: Database unreachable')
    wrapper.unmount()
  })

  it('shows a calm not-allowed note on 403 and stops polling', async () => {
    const { wrapper, calls } = mountView(() => ({ status: 403, body: { error: { message: 'Your role in this study does not allow this' } } }))
    await flushPromises()
    expect(wrapper.find('[data-testid="study-not-allowed"]').exists()).toBe(true)
    expect(wrapper.find('[data-testid="outbox-table"]').exists()).toBe(false)
    await vi.advanceTimersByTimeAsync(30_000)
    expect(calls()).toBe(1)
    wrapper.unmount()
  })
})
