// @vitest-environment happy-dom
import { describe, expect, it, vi } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton, ElIcon, ElSwitch, ElTag } from 'element-plus'
import type { RecordStatus } from '@/api/record'
import RecordHeader from '@/components/record/RecordHeader.vue'
import { recordActions, type ViewerRole } from '@/record/actions'
import { OptionStub, SelectStub } from '../study/stubs'
import { recordView } from './fixtures'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))

const ACTION_IDS = ['show-names', 'record-submit', 'record-return-open', 'record-sign-off', 'record-new-version'] as const

function mountHeader(role: ViewerRole, status: RecordStatus, isLatest = true) {
  return mount(RecordHeader, {
    props: { studyId: 4, title: 'Kestrel record', view: recordView(status), role, isLatest },
    global: {
      components: { ElButton, ElIcon, ElSwitch, ElTag },
      stubs: { 'el-select': SelectStub, 'el-option': OptionStub },
    },
  })
}

const shown = (w: ReturnType<typeof mountHeader>) => ACTION_IDS.filter((id) => w.find(`[data-testid="${id}"]`).exists())

describe('record actions by role and status', () => {
  const cases: [ViewerRole, RecordStatus, string[]][] = [
    ['analyst', 'draft', ['show-names', 'record-submit']],
    ['analyst', 'in_review', []],
    ['analyst', 'signed_off', ['record-new-version']],
    ['admin', 'draft', ['show-names', 'record-submit']],
    ['admin', 'in_review', []], // admins never return or sign off: only a reviewer member may
    ['reviewer', 'draft', []],
    ['reviewer', 'in_review', ['record-return-open', 'record-sign-off']],
    ['reviewer', 'signed_off', []],
    ['expert', 'draft', []],
    ['expert', 'in_review', []],
    ['expert', 'signed_off', []],
  ]
  for (const [role, status, expected] of cases) {
    it(`${role}, ${status}: ${expected.join(', ') || 'read-only'}`, () => {
      expect(shown(mountHeader(role, status))).toEqual(expected)
    })
  }

  it('lets analysts and reviewers comment until sign-off, and only the analyst send charts, while a draft', () => {
    expect(recordActions('analyst', 'draft', true)).toMatchObject({ comment: true, sendCharts: true })
    expect(recordActions('analyst', 'in_review', true)).toMatchObject({ comment: true, sendCharts: false })
    expect(recordActions('reviewer', 'draft', true)).toMatchObject({ comment: true, sendCharts: false })
    expect(recordActions('reviewer', 'in_review', true)).toMatchObject({ comment: true, sendCharts: false })
    expect(recordActions('reviewer', 'signed_off', true)).toMatchObject({ comment: false, sendCharts: false })
    expect(recordActions('expert', 'draft', true)).toMatchObject({ comment: false, sendCharts: false })
  })

  it('makes an older version read-only for everyone', () => {
    expect(shown(mountHeader('analyst', 'signed_off', false))).toEqual([])
    expect(Object.values(recordActions('reviewer', 'in_review', false)).some(Boolean)).toBe(false)
  })

  it('states status, hash, audit chain and sign-off in the band, with download links for the version', () => {
    const w = mountHeader('expert', 'signed_off')
    expect(w.get('[data-testid="record-status"]').attributes('data-status')).toBe('signed_off')
    expect(w.get('[data-testid="record-status"]').text()).toBe('Signed off')
    expect(w.get('[data-testid="record-hash"]').text()).toBe('a'.repeat(64))
    expect(w.get('[data-testid="record-hash"]').attributes('data-frozen')).toBe('true')
    expect(w.get('[data-testid="audit-chain"]').attributes('data-intact')).toBe('true')
    expect(w.get('[data-testid="audit-chain"]').text()).toContain('Intact (42 events)')
    expect(w.get('[data-testid="record-signed-off"]').text()).toContain('Signed off by Ingrid Solberg')
    expect(w.get('[data-testid="download-docx"]').attributes('href')).toBe('/api/studies/4/record.docx?version=1')
    expect(w.get('[data-testid="download-json"]').attributes('href')).toBe('/api/studies/4/record.json?version=1')
  })

  it('shows a broken audit chain in red with the event number', () => {
    const view = recordView('in_review', { auditChain: { intact: false, events: 42, brokenAt: 17 } })
    const w = mount(RecordHeader, {
      props: { studyId: 4, title: 'Kestrel record', view, role: 'reviewer', isLatest: true },
      global: { components: { ElButton, ElIcon, ElSwitch, ElTag }, stubs: { 'el-select': SelectStub, 'el-option': OptionStub } },
    })
    const chain = w.get('[data-testid="audit-chain"]')
    expect(chain.attributes('data-intact')).toBe('false')
    expect(chain.classes()).toContain('is-broken')
    expect(chain.text()).toContain('Broken at event #17')
  })

  it('says a draft hash is not frozen yet', () => {
    const w = mountHeader('analyst', 'draft')
    expect(w.get('[data-testid="record-hash"]').attributes('data-frozen')).toBe('false')
    expect(w.text()).toContain('Draft content SHA-256 (changes until submitted)')
  })
})
