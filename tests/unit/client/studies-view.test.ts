// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { ElAlert, ElButton, ElEmpty, ElInput, ElSkeleton } from 'element-plus'
import type { StudySummary } from '@shared/types'
import StudiesView from '@/views/StudiesView.vue'
import StudyTable from '@/components/StudyTable.vue'
import { mockFetch, type Reply } from './fetch-mock'

function study(id: number, title: string): StudySummary {
  return {
    id,
    title,
    context: 'ctx',
    status: 'framing',
    ownerId: 2,
    ownerName: 'Ana Analyst',
    myRole: 'analyst',
    quantityCount: 3,
    memberCount: 5,
    version: 1,
    createdAt: '2026-01-05T10:00:00.000Z',
    updatedAt: '2026-01-05T10:00:00.000Z',
  }
}

function mountView(replies: Reply[]) {
  const { fetch, calls } = mockFetch((c) => (c.url === '/api/studies' ? replies.shift() : undefined))
  vi.stubGlobal('fetch', fetch)
  const wrapper = mount(StudiesView, {
    global: {
      plugins: [createPinia()],
      components: { ElAlert, ElButton, ElEmpty, ElInput, ElSkeleton },
      stubs: { StudyTable: true, transition: false },
    },
  })
  return { wrapper, calls }
}

describe('StudiesView', () => {
  afterEach(() => vi.unstubAllGlobals())

  it('shows a loading state, then the list, and filters it by title', async () => {
    const { wrapper } = mountView([{ status: 200, body: [study(1, 'Kestrel Valley pipe renewal'), study(2, 'Heron Bay flood defence')] }])
    expect(wrapper.find('[data-testid="loading"]').exists()).toBe(true)
    await flushPromises()
    expect(wrapper.find('[data-testid="loading"]').exists()).toBe(false)
    const table = () => wrapper.getComponent(StudyTable)
    expect(wrapper.find('[data-testid="study-list"]').exists()).toBe(true)
    expect(table().props('studies').map((s: StudySummary) => s.id)).toEqual([1, 2])

    await wrapper.get('input[data-testid="study-search"]').setValue('  kestrel ')
    expect(table().props('studies').map((s: StudySummary) => s.id)).toEqual([1])
    expect(wrapper.text()).toContain('1 of 2 studies match')
  })

  it('shows the error with a retry that loads again', async () => {
    const { wrapper, calls } = mountView([
      { status: 500, body: { error: { message: 'The database is not reachable' } } },
      { status: 200, body: [study(7, 'Retry works')] },
    ])
    await flushPromises()
    const alert = wrapper.get('[data-testid="load-error"]')
    expect(alert.attributes('role')).toBe('alert')
    expect(alert.text()).toContain('Could not load studies')
    expect(alert.text()).toContain('The database is not reachable')
    await wrapper.get('[data-testid="retry"]').trigger('click')
    await flushPromises()
    expect(calls.filter((c) => c.url === '/api/studies')).toHaveLength(2)
    expect(wrapper.find('[data-testid="load-error"]').exists()).toBe(false)
    expect(wrapper.getComponent(StudyTable).props('studies')).toHaveLength(1)
  })

  it('shows an empty state when the user has no studies', async () => {
    const { wrapper } = mountView([{ status: 200, body: [] }])
    await flushPromises()
    expect(wrapper.find('[data-testid="study-empty"]').text()).toContain('You are not a member of any study yet.')
    expect(wrapper.find('[data-testid="study-list"]').exists()).toBe(false)
  })
})
