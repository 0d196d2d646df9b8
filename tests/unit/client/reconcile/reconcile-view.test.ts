// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import {
  ElAlert, ElButton, ElCheckbox, ElEmpty, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioButton, ElRadioGroup,
  ElSelect, ElSkeleton, ElSlider, ElTag,
} from 'element-plus'
import type { StudySummary } from '@shared/types'
import ReconcileView from '@/views/study/ReconcileView.vue'
import type { ReconciliationView } from '@/api/reconciliation'
import { mockFetch, type RecordedCall, type Reply } from '../fetch-mock'
import { expert, viewFixture } from './fixture'

const study: StudySummary = {
  id: 1, title: 'Kestrel', context: 'ctx', status: 'reconciling', ownerId: 2, ownerName: 'Priya', myRole: 'analyst',
  quantityCount: 3, memberCount: 5, version: 1, createdAt: '', updatedAt: '',
}
const URL = '/api/quantities/5/reconciliation'

function savedView(body: Record<string, unknown>, version: number, by = 'Priya Natarajan'): ReconciliationView {
  const v = viewFixture()
  return {
    ...v,
    saved: {
      id: 1, roundId: 7, method: body.method as never, weightsMode: Array.isArray(body.weights) ? 'custom' : (body.weights as never), weights: [0.5, 0.5],
      weightsReason: String(body.weightsReason ?? ''), cutoff: Number(body.cutoff ?? 0), excludedExperts: [], consensus: null, family: (body.family as never) ?? null,
      distribution: body.family ? { family: 'normal', mu: 12, sigma: 3.2 } : null, fits: [], summary: v.pool, adjusted: false, adjustReason: '',
      rationale: String(body.rationale ?? ''), status: body.reconciled ? 'reconciled' : 'draft', reconciledAt: body.reconciled ? '2026-12-02T10:00:00.000Z' : null,
      version, updatedAt: '2026-12-02T10:00:00.000Z',
    },
    history: [{ version, savedAt: '2026-12-02T10:00:00.000Z', savedBy: by, status: body.reconciled ? 'reconciled' : 'draft', method: body.method as never, family: (body.family as never) ?? null }],
  }
}

/** Lets requests finish and the preview (recomputed 120 ms after the last change) catch up. */
async function settle() {
  for (let i = 0; i < 2; i++) {
    await flushPromises()
    await new Promise((resolve) => setTimeout(resolve, 140))
  }
  await flushPromises()
}

async function mountView(get: Reply[], put: (call: RecordedCall) => Reply = () => ({ status: 500 }), myRole: StudySummary['myRole'] = 'analyst') {
  const mock = mockFetch((c) => {
    if (c.url === '/api/auth/csrf') return { status: 200, body: { token: 'tok' } }
    if (c.url.startsWith(URL) && c.method === 'GET') return get.length > 1 ? get.shift() : get[0]
    if (c.url === URL && c.method === 'PUT') return put(c)
    return undefined
  })
  vi.stubGlobal('fetch', mock.fetch)
  const pinia = createPinia()
  setActivePinia(pinia)
  const blank = { template: '<div />' }
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: blank },
      { path: '/studies/:id/quantities', name: 'study-quantities', component: blank },
      { path: '/studies/:id/rounds/new', name: 'study-rounds-new', component: blank },
    ],
  })
  await router.push('/')
  const wrapper = mount(ReconcileView, {
    attachTo: document.body,
    props: { study: { ...study, myRole }, quantityId: 5 },
    global: {
      plugins: [pinia, router],
      components: {
        ElAlert, ElButton, ElCheckbox, ElEmpty, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioButton, ElRadioGroup,
        ElSelect, ElSkeleton, ElSlider, ElTag,
      },
      stubs: { transition: false },
    },
  })
  await settle()
  return { wrapper, calls: mock.calls, router }
}

const puts = (calls: RecordedCall[]) => calls.filter((c) => c.method === 'PUT')
const radio = (w: Awaited<ReturnType<typeof mountView>>['wrapper'], id: string) => w.get(`[data-testid="${id}"] input`)

describe('ReconcileView', { timeout: 15000 }, () => {
  afterEach(() => {
    vi.unstubAllGlobals()
    document.body.innerHTML = ''
  })

  it('shows every expert with the pool and no chosen family yet, then the chosen fit on the chart', async () => {
    const { wrapper } = await mountView([{ status: 200, body: viewFixture() }])
    const rows = wrapper.findAll('[data-testid="expert-row"]')
    expect(rows.map((r) => r.attributes('data-label'))).toEqual(['Expert 1', 'Expert 2'])
    expect(rows[0].text()).toContain('Tomasz Wierzbicki')
    expect(rows[0].text()).toContain('Night-flow records')
    expect(wrapper.get('[data-testid="combination-summary"]').text()).toContain('median 11.6')
    const panel = wrapper.get('[data-testid="panel-ranges"]')
    expect(panel.findAll('[data-testid="panel-row"]').map((r) => r.attributes('data-label'))).toEqual(['Expert 1', 'Expert 2'])
    expect(panel.find('[data-testid="panel-combined-shape"]').exists()).toBe(true)
    expect(panel.find('[data-testid="panel-prior-line"]').exists()).toBe(false)
    await radio(wrapper, 'fit-row"][data-family="normal"] [data-testid="fit-choose').setValue(true)
    await settle()
    expect(panel.find('[data-testid="panel-prior-line"]').exists()).toBe(true)
    expect(panel.text()).toContain('Normal prior (chosen fit)')
    expect(wrapper.get('[data-testid="fit-row"][data-family="normal"]').classes()).toContain('is-chosen')
  })

  it('recomputes performance weights in the browser when the cutoff changes', async () => {
    const { wrapper } = await mountView([{ status: 200, body: viewFixture() }])
    await radio(wrapper, 'weights-performance').setValue(true)
    await settle()
    const weights = () => wrapper.findAll('[data-testid="cooke-weight"]').map((c) => c.text())
    expect(weights()).toEqual(['0.958', '0.0422'])
    const cutoff = wrapper.get('[data-testid="cooke-cutoff"] input')
    await cutoff.setValue('0.05')
    await cutoff.trigger('change')
    await settle()
    expect(weights()).toEqual(['1', '0'])
    expect(wrapper.get('[data-testid="cooke-effect"]').text()).toContain('Expert 2 falls below the cutoff')
    expect(wrapper.findAll('[data-testid="expert-weight"]').map((c) => c.text())).toEqual(['1', '0'])
  })

  it('shows the analyst where an expert’s fitted shape contradicts that expert’s range', async () => {
    const box = expert(5, 'Expert 3', 'Ana Ruiz', { family: 'uniform', lower: 6, upper: 14 }, 'Pressure logs.', ['This shape says values above 14 are impossible, but you said 25 is plausible.'])
    const { wrapper } = await mountView([{ status: 200, body: viewFixture({ experts: [...viewFixture().experts, box], included: [3, 4, 5] }) }])
    expect(wrapper.findAll('[data-testid="expert-fit-warning"]').map((p) => p.text())).toEqual([
      'Fitted shape: This shape says values above 14 are impossible, but you said 25 is plausible.',
    ])
  })

  it('cautions in plain words when performance weights rest on fewer calibration questions or experts than the minimums', async () => {
    const { wrapper } = await mountView([{ status: 200, body: viewFixture({ calibration: { ...viewFixture().calibration, questionCount: 4 } }) }])
    expect(wrapper.find('[data-testid="weight-caution"]').exists()).toBe(false)
    await radio(wrapper, 'weights-performance').setValue(true)
    await settle()
    expect(wrapper.findAll('[data-testid="weight-caution"]').map((c) => c.text())).toEqual([
      'Performance weights here rest on 4 calibration questions; common practice asks for at least 10. With so few, one more question could change the weights a lot: compare the result with equal weights before relying on it.',
      'Performance weights here compare 2 experts; this tool asks for at least 4 before the weights say much. With so few, the weights mostly pick one person: compare the result with equal weights before relying on it.',
    ])
  })

  it('does not save weights set by hand without a reason; with one, sends one weight per included expert', async () => {
    const { wrapper, calls } = await mountView([{ status: 200, body: viewFixture() }], (c) => ({ status: 200, body: savedView(c.body as Record<string, unknown>, 1) }))
    await radio(wrapper, 'weights-custom').setValue(true)
    await settle()
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(0)
    expect(wrapper.get('[data-testid="weights-reason"]').text()).toContain('Say why you set the weights by hand')

    await wrapper.get('[data-testid="weights-reason"] textarea').setValue('Expert 1 ran the pilot districts herself.')
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(1)
    expect(puts(calls)[0].body).toMatchObject({
      roundId: 7, method: 'linear', weights: [1, 1], weightsReason: 'Expert 1 ran the pilot districts herself.', excludedExperts: [], reconciled: false, version: 0,
    })
    expect(puts(calls)[0].body).not.toHaveProperty('consensus')
    expect(wrapper.get('[data-testid="reconcile-status"]').attributes('data-status')).toBe('draft')
  })

  it('marks reconciled only with a family and a rationale, then shows the status and offers to reopen', async () => {
    const { wrapper, calls } = await mountView([{ status: 200, body: viewFixture() }], (c) => ({ status: 200, body: savedView(c.body as Record<string, unknown>, 1) }))
    await wrapper.get('[data-testid="mark-reconciled"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(0)
    expect(wrapper.text()).toContain('Choose the family of the final prior')
    expect(wrapper.get('[data-testid="rationale"]').text()).toContain('at least 20 characters')

    await radio(wrapper, 'fit-row"][data-family="normal"] [data-testid="fit-choose').setValue(true)
    await wrapper.get('[data-testid="rationale"] textarea').setValue('Equal weights: no calibration evidence favours either expert.')
    await wrapper.get('[data-testid="mark-reconciled"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(1)
    expect(puts(calls)[0].body).toMatchObject({ family: 'normal', reconciled: true, distribution: null })
    const status = wrapper.get('[data-testid="reconcile-status"]')
    expect(status.attributes('data-status')).toBe('reconciled')
    expect(status.text()).toContain('Priya Natarajan')
    expect(wrapper.find('[data-testid="reopen"]').exists()).toBe(true)
    expect(wrapper.get('[data-testid="mark-reconciled"]').attributes('disabled')).toBeDefined()
  })

  it('keeps the analyst’s choices after a 409 and saves them over the reloaded version', async () => {
    const theirs = savedView({ method: 'linear', weights: 'equal', family: 'normal', rationale: 'Their reasoning.' }, 4, 'Alex Morgan')
    let first = true
    const { wrapper, calls } = await mountView(
      [{ status: 200, body: viewFixture() }, { status: 200, body: theirs }],
      (c) => {
        if (first) {
          first = false
          return { status: 409, body: { error: { message: 'Another analyst saved this reconciliation since you opened it; reload to see their choice' } } }
        }
        return { status: 200, body: savedView(c.body as Record<string, unknown>, 5) }
      },
    )
    await radio(wrapper, 'method-logarithmic').setValue(true)
    await wrapper.get('[data-testid="rationale"] textarea').setValue('The log pool rewards where the experts agree.')
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(wrapper.find('[data-testid="conflict-alert"]').exists()).toBe(true)
    await wrapper.get('[data-testid="conflict-reload"]').trigger('click')
    await settle()
    expect(wrapper.get('[data-testid="conflict-theirs"]').text()).toContain('Their reasoning.')
    expect((wrapper.get('[data-testid="method-logarithmic"] input').element as HTMLInputElement).checked).toBe(true)
    expect((wrapper.get('[data-testid="rationale"] textarea').element as HTMLTextAreaElement).value).toBe('The log pool rewards where the experts agree.')
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(puts(calls).map((c) => (c.body as { version: number }).version)).toEqual([0, 4])
    expect(puts(calls)[1].body).toMatchObject({ method: 'logarithmic', rationale: 'The log pool rewards where the experts agree.' })
    expect(wrapper.find('[data-testid="conflict-alert"]').exists()).toBe(false)
  })

  it('records an agreed consensus with who took part, sending only the rows with values, and warns when it is too narrow', async () => {
    const { wrapper, calls } = await mountView([{ status: 200, body: viewFixture() }], (c) => ({ status: 200, body: savedView(c.body as Record<string, unknown>, 1) }))
    await radio(wrapper, 'method-consensus').setValue(true)
    await settle()
    const values = wrapper.findAll('[data-testid="consensus-value"] input')
    expect(values).toHaveLength(5)
    for (const [i, v] of [[1, '11.8'], [2, '12'], [3, '12.2']] as const) {
      await values[i].setValue(v)
      await values[i].trigger('change')
    }
    await settle()
    // 90 % interval about 11.5–12.5 against medians 10 and 14 (the POOL-linear-2 experts).
    expect(wrapper.find('[data-testid="consensus-warning"]').exists()).toBe(true)
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(0)
    expect(wrapper.get('[data-testid="consensus-participants"]').text()).toContain('Say who took part in the discussion')
    await wrapper.get('[data-testid="consensus-participants"] input').setValue('Both experts and the analyst')
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await settle()
    expect(puts(calls)).toHaveLength(1)
    expect(puts(calls)[0].body).toMatchObject({
      method: 'consensus',
      consensus: { points: [{ value: 11.8, prob: 0.25 }, { value: 12, prob: 0.5 }, { value: 12.2, prob: 0.75 }], participants: 'Both experts and the analyst', notes: '' },
    })
  })

  it('shows the role note on 403 and a way forward when no round asked the quantity', async () => {
    const forbidden = await mountView([{ status: 403, body: { error: { message: 'Your role in this study does not allow this' } } }], undefined, 'expert')
    expect(forbidden.wrapper.find('[data-testid="study-not-allowed"]').exists()).toBe(true)
    forbidden.wrapper.unmount()
    const none = await mountView([{ status: 409, body: { error: { message: 'No round has asked about this quantity yet' } } }])
    expect(none.wrapper.get('[data-testid="reconcile-no-round"]').text()).toContain('No round has asked about this quantity yet')
  })

  it('offers a feedback round for this quantity with feedback on', async () => {
    const { wrapper, router } = await mountView([{ status: 200, body: viewFixture() }])
    await wrapper.get('[data-testid="feedback-round"]').trigger('click')
    await settle()
    expect(router.currentRoute.value.fullPath).toBe('/studies/1/rounds/new?feedback=1&quantities=5')
  })
})
