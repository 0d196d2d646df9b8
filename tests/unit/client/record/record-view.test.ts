// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { DOMWrapper, flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { ElAlert, ElButton, ElDialog, ElEmpty, ElForm, ElFormItem, ElIcon, ElInput, ElRadio, ElRadioGroup, ElSkeleton, ElSwitch, ElTag } from 'element-plus'
import type { StudySummary } from '@shared/types'
import type { RecordView as RecordViewBody } from '@/api/record'
import RecordView from '@/views/study/RecordView.vue'
import { mockFetch, type Route } from '../fetch-mock'
import { OptionStub, SelectStub } from '../study/stubs'
import { comment, quantity, recordView } from './fixtures'

vi.mock('@/composables/notify', () => ({ notify: { success: vi.fn(), error: vi.fn() } }))
// chart.js needs a real canvas: the stand-in reports a drawn picture as soon as it mounts.
vi.mock('@/components/record/FinalPriorChart.vue', async () => {
  const { defineComponent, h, onMounted } = await import('vue')
  return {
    __esModule: true,
    default: defineComponent({
      emits: ['drawn'],
      setup(_, { emit }) {
        onMounted(() => emit('drawn', 'data:image/png;base64,iVBORw0KGgo='))
        return () => h('figure', { 'data-testid': 'final-prior-chart' })
      },
    }),
  }
})

function study(myRole: StudySummary['myRole']): StudySummary {
  return { id: 4, title: 'Kestrel record', context: '', status: 'reconciling', ownerId: 2, ownerName: 'Priya', myRole, quantityCount: 2, memberCount: 4, version: 1, createdAt: '', updatedAt: '' }
}

function mountView(myRole: StudySummary['myRole'], view: RecordViewBody, route: Route = () => undefined) {
  const mock = mockFetch((c) => {
    if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 't' } }
    if (c.method === 'GET' && c.url === '/api/studies/4/record') return { status: 200, body: view }
    if (c.method === 'POST' && c.url === '/api/studies/4/record/charts') return { status: 204 }
    return route(c)
  })
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const wrapper = mount(RecordView, {
    attachTo: document.body,
    props: { study: study(myRole) },
    global: {
      plugins: [pinia],
      components: { ElAlert, ElButton, ElDialog, ElEmpty, ElForm, ElFormItem, ElIcon, ElInput, ElRadio, ElRadioGroup, ElSkeleton, ElSwitch, ElTag },
      stubs: { 'el-select': SelectStub, 'el-option': OptionStub, transition: false, 'transition-group': false },
    },
  })
  return { wrapper, calls: mock.calls }
}

const body = () => new DOMWrapper(document.body)

describe('RecordView', () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('shows every section of the record, the final prior chart and comments under their sections', async () => {
    const view = recordView('in_review', { comments: [comment(1, 'Night-flow reduction', 'Why equal weights?', 'return'), comment(2, 'General', 'Looks complete.')] })
    const { wrapper } = mountView('expert', view)
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-status"]').exists()).toBe(true))
    await flushPromises()
    expect(wrapper.findAll('[data-testid="record-section"]').map((s) => s.attributes('data-section'))).toEqual([
      'Study and decision', 'Expert panel', 'Calibration questions', 'Night-flow reduction (flow)', 'Leak-alert uptake (uptake)',
      'Cautions', 'Review and sign-off', 'Change history',
    ])
    const flow = wrapper.get('[data-testid="record-section"][data-section="Night-flow reduction (flow)"]')
    expect(flow.find('[data-testid="final-prior-chart"]').exists()).toBe(true)
    expect(flow.get('[data-testid="comment-item"]').text()).toContain('Why equal weights?')
    expect(flow.text()).toContain('flow ~ Normal(mean 3.2, sd 1.1)')
    const review = wrapper.get('[data-testid="record-section"][data-section="Review and sign-off"]')
    expect(review.get('[data-testid="comment-item"]').text()).toContain('Looks complete.')
    expect(wrapper.get('[data-testid="record-section"][data-section="Leak-alert uptake (uptake)"]').text()).toContain('No final prior yet')
    expect(wrapper.get('[data-testid="change-history"]').text()).toContain('Record submitted for review')
    expect(wrapper.get('[data-testid="record-cautions"]').text()).toContain('qualified statistician')
    // experts read only
    expect(wrapper.find('[data-testid="comment-open"]').exists()).toBe(false)
  })

  it('shows the cautions the record states, and for a final prior without an analysis says so and takes the analyst’s reason', async () => {
    const view = recordView('draft')
    view.content.schemaVersion = '1.1'
    view.content.cautions = [
      { rule: 'statistician-review', quantity: null, text: 'Reviewed by a qualified statistician before use.' },
      { rule: 'hand-adjusted', quantity: 'Night-flow reduction', text: 'Night-flow reduction: the final prior was adjusted by hand (tails).' },
    ]
    const { wrapper, calls } = mountView('analyst', view, (c) =>
      c.method === 'PUT' && c.url === '/api/quantities/11/impact/not-run'
        ? ((c.body as { reason: string }).reason.length < 20
          ? { status: 400, body: { error: { message: 'Some fields need attention', fields: { reason: 'Explain in at least 20 characters; it goes into the prior record' } } } }
          : { status: 200, body: { quantityId: 11, priorHash: 'f'.repeat(64), reason: (c.body as { reason: string }).reason } })
        : undefined,
    )
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-cautions"]').exists()).toBe(true))
    expect(wrapper.findAll('[data-testid="record-caution"]').map((c) => c.text())).toEqual(['Night-flow reduction: the final prior was adjusted by hand (tails).'])
    const missing = wrapper.get('[data-testid="record-section"][data-section="Night-flow reduction (flow)"] [data-testid="impact-missing"]')
    expect(missing.text()).toContain('No impact analysis of the final prior exists.')
    await missing.get('[data-testid="impact-not-run-open"]').trigger('click')
    const text = missing.get('[data-testid="impact-not-run-field"] textarea')
    await text.setValue('No pilot data exist for this quantity yet.')
    await missing.get('form').trigger('submit')
    await vi.waitFor(() => expect(calls.some((c) => c.method === 'PUT' && c.url === '/api/quantities/11/impact/not-run')).toBe(true))
    expect(calls.find((c) => c.method === 'PUT')!.body).toEqual({ reason: 'No pilot data exist for this quantity yet.' })
    // Saved: the record is read again from the server.
    await vi.waitFor(() => expect(calls.filter((c) => c.method === 'GET' && c.url === '/api/studies/4/record')).toHaveLength(2))
  })

  it('derives the record-specific cautions of a record stored with plain-text cautions from the shared rules', async () => {
    const { wrapper } = mountView('expert', recordView('signed_off'))
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-cautions"]').exists()).toBe(true))
    await flushPromises()
    expect(wrapper.findAll('[data-testid="record-caution"]').map((c) => c.text())).toEqual([
      'Night-flow reduction: no impact analysis of the final prior exists.',
      'Leak-alert uptake: no final prior yet (not reconciled).',
    ])
    expect(wrapper.find('[data-testid="impact-not-run-open"]').exists()).toBe(false)
  })

  it('shows each fit’s warnings and the caution on performance weights from the record content', async () => {
    const view = recordView('draft')
    const flow = quantity()
    const warning = 'This shape says values above 14 are impossible, but you said 25 is plausible.'
    const caution = 'Performance weights here compare 2 experts; this tool asks for at least 4 before the weights say much.'
    flow.judgements[0].fit!.warnings = [warning]
    flow.combination = { ...flow.combination!, weightsMode: 'performance', weightCautions: [caution] }
    view.content.quantities = [flow]
    const { wrapper } = mountView('analyst', view)
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-status"]').exists()).toBe(true))
    await flushPromises()
    expect(wrapper.findAll('[data-testid="record-fit-warning"]').map((w) => w.text())).toEqual([warning])
    expect(wrapper.findAll('[data-testid="record-weight-caution"]').map((w) => w.text())).toEqual([caution])
  })

  it('sends each drawn final-prior chart once for an analyst before sign-off, never for an expert', async () => {
    const analyst = mountView('analyst', recordView('draft'))
    await vi.waitFor(() => expect(analyst.calls.filter((c) => c.url.endsWith('/record/charts'))).toHaveLength(1))
    const sent = analyst.calls.filter((c) => c.url.endsWith('/record/charts'))
    expect(sent[0].body).toEqual({ symbol: 'flow', png: 'data:image/png;base64,iVBORw0KGgo=' })
    analyst.wrapper.unmount()
    document.body.innerHTML = ''

    const expert = mountView('expert', recordView('draft'))
    await vi.waitFor(() => expect(expert.wrapper.find('[data-testid="final-prior-chart"]').exists()).toBe(true))
    await flushPromises()
    expect(expert.calls.some((c) => c.url.endsWith('/record/charts'))).toBe(false)
  })

  it("shows the server's 'Not reconciled' message plainly when submitting fails", async () => {
    const { wrapper, calls } = mountView('analyst', recordView('draft'), (c) =>
      c.url === '/api/studies/4/record/submit'
        ? { status: 400, body: { error: { message: 'Reconcile every quantity first: Leak-alert uptake', fields: { quantities: 'Not reconciled: Leak-alert uptake' } } } }
        : undefined,
    )
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-submit"]').exists()).toBe(true))
    await wrapper.get('[data-testid="record-submit"]').trigger('click')
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-error"]').exists()).toBe(true))
    expect(wrapper.get('[data-testid="record-error"]').text()).toContain('Not reconciled: Leak-alert uptake')
    expect(calls.filter((c) => c.method === 'POST' && c.url.endsWith('/submit'))[0].headers['x-csrf-token']).toBe('t')
    expect(wrapper.get('[data-testid="record-status"]').attributes('data-status')).toBe('draft')
  })

  it('adds a comment to the section whose button was pressed and shows the answer', async () => {
    const after = recordView('in_review', { comments: [comment(1, 'Expert panel', 'State how interests were managed.')] })
    const { wrapper, calls } = mountView('reviewer', recordView('in_review'), (c) =>
      c.url === '/api/studies/4/record/comments' ? { status: 201, body: after } : undefined,
    )
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-section"]').exists()).toBe(true))
    const panel = wrapper.get('[data-testid="record-section"][data-section="Expert panel"]')
    await panel.get('[data-testid="comment-open"]').trigger('click')
    await vi.waitFor(() => expect(body().find('[data-testid="comment-body"] textarea').exists()).toBe(true))
    await body().get('[data-testid="comment-submit"]').trigger('click')
    await vi.waitFor(() => expect(body().find('[data-testid="comment-body"] .el-form-item__error').text()).toBe('Write the comment'))
    await body().get('[data-testid="comment-body"] textarea').setValue('State how interests were managed.')
    await body().get('[data-testid="comment-submit"]').trigger('click')
    await vi.waitFor(() => expect(calls.some((c) => c.url.endsWith('/record/comments'))).toBe(true))
    expect(calls.find((c) => c.url.endsWith('/record/comments'))!.body).toEqual({ section: 'Expert panel', body: 'State how interests were managed.' })
    await vi.waitFor(() => expect(wrapper.find('[data-section="Expert panel"] [data-testid="comment-item"]').exists()).toBe(true))
  })

  it('shows a returned record as "Returned with comments" with the comments in a banner, and asks for an answer to each on resubmitting', async () => {
    const returned = recordView('draft', { comments: [comment(3, 'Night-flow reduction', 'Why equal weights?', 'return')] })
    returned.record = { ...returned.record, submittedAt: '2026-03-10T10:00:00.000Z', returned: true, openComments: [3] }
    const { wrapper, calls } = mountView('analyst', returned, (c) =>
      c.url === '/api/studies/4/record/submit' ? { status: 200, body: recordView('in_review') } : undefined,
    )
    await vi.waitFor(() => expect(wrapper.find('[data-testid="record-returned-banner"]').exists()).toBe(true))
    expect(wrapper.get('[data-testid="record-status"]').text()).toBe('Returned with comments')
    expect(wrapper.get('[data-testid="record-signed-off"]').text()).not.toContain('awaiting a reviewer')
    expect(wrapper.get('[data-testid="record-returned-banner"]').text()).toContain('Why equal weights?')
    await wrapper.get('[data-testid="record-submit"]').trigger('click')
    await vi.waitFor(() => expect(body().find('[data-testid="record-resubmit-dialog"] [data-testid="record-answer"]').exists()).toBe(true))
    await body().get('[data-testid="record-resubmit-confirm"]').trigger('click')
    await vi.waitFor(() => expect(body().find('[data-testid="record-answer-error"]').exists()).toBe(true))
    expect(calls.some((c) => c.url.endsWith('/record/submit'))).toBe(false)
    await body().get('[data-testid="record-answer"] [data-outcome="not-changed"] input').setValue(true)
    await body().get('[data-testid="record-answer"] textarea').setValue('Equal weights: no calibration questions were asked in this study.')
    await body().get('[data-testid="record-resubmit-confirm"]').trigger('click')
    await vi.waitFor(() => expect(calls.some((c) => c.url.endsWith('/record/submit'))).toBe(true))
    expect(calls.find((c) => c.url.endsWith('/record/submit'))!.body).toEqual({
      responses: [{ commentId: 3, outcome: 'not-changed', reply: 'Equal weights: no calibration questions were asked in this study.' }],
    })
  })
})
