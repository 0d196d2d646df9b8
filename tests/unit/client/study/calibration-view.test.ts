// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { ElAlert, ElButton, ElEmpty, ElSkeleton } from 'element-plus'
import type { StudySummary } from '@shared/types'
import StudyCalibrationView from '@/views/study/StudyCalibrationView.vue'
import { mockFetch } from '../fetch-mock'

/** el-table needs a real layout: the stubs list the columns the view asks for. */
const TableStub = { props: ['data'], template: '<div data-testid="calibration-table" :data-rows="data.length"><slot /></div>' }
const ColumnStub = { props: ['label'], template: '<span class="col">{{ label }}</span>' }

function mountView(myRole: StudySummary['myRole'], rows: object[]) {
  const mock = mockFetch((c) => (c.url === '/api/studies/1/calibration-questions' ? { status: 200, body: rows } : undefined))
  vi.stubGlobal('fetch', mock.fetch)
  const study: StudySummary = {
    id: 1, title: 'Kestrel', context: 'ctx', status: 'framing', ownerId: 2, ownerName: 'Ana', myRole,
    quantityCount: 3, memberCount: 5, version: 1, createdAt: '', updatedAt: '',
  }
  return mount(StudyCalibrationView, {
    props: { study },
    global: {
      plugins: [createPinia()],
      components: { ElAlert, ElButton, ElEmpty, ElSkeleton },
      stubs: { 'el-table': TableStub, 'el-table-column': ColumnStub, CalibrationDialog: true, transition: false },
    },
  })
}

const columns = (w: ReturnType<typeof mountView>) => w.findAll('.col').map((c) => c.text())
const base = { studyId: 1, unit: 'bursts', position: 1, version: 1 }

describe('StudyCalibrationView', () => {
  afterEach(() => vi.unstubAllGlobals())

  it('has no true-value column when the API leaves true values out (experts), and no writing', async () => {
    const wrapper = mountView('expert', [{ ...base, id: 1, question: 'How many bursts in 2024?' }])
    await flushPromises()
    expect(columns(wrapper)).toEqual(['#', 'Question', 'Unit'])
    expect(wrapper.find('[data-testid="calibration-hidden-note"]').exists()).toBe(true)
    expect(wrapper.find('[data-testid="calibration-new"]').exists()).toBe(false)
  })

  it('shows true values to analysts and counts the ones still to fill in', async () => {
    const wrapper = mountView('analyst', [
      { ...base, id: 1, question: 'How many bursts in 2024?', trueValue: 61 },
      { ...base, id: 2, question: 'How many km renewed?', trueValue: null },
    ])
    await flushPromises()
    expect(columns(wrapper)).toContain('True value')
    expect(wrapper.get('[data-testid="calibration-missing"]').text()).toContain('1 of 2 true values still to fill in')
    expect(wrapper.find('[data-testid="calibration-new"]').exists()).toBe(true)
  })
})
