// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import {
  ElAlert, ElButton, ElCheckbox, ElEmpty, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioButton, ElRadioGroup, ElSelect, ElSlider, ElTag,
} from 'element-plus'
import { fitAll, toUnivariate } from '@shared/stats'
import type { Summary } from '@shared/elicitation/reconcile'
import ExpertsSection from '@/components/reconcile/ExpertsSection.vue'
import CombineSection from '@/components/reconcile/CombineSection.vue'
import FitSection from '@/components/reconcile/FitSection.vue'
import RobustnessSection from '@/components/reconcile/RobustnessSection.vue'
import DecisionSection from '@/components/reconcile/DecisionSection.vue'
import { computePreview, liveCooke } from '@/reconcile/preview'
import { rangeOf } from '@/reconcile/panel'
import { expert, viewFixture } from './fixture'

const components = {
  ElAlert, ElButton, ElCheckbox, ElEmpty, ElForm, ElFormItem, ElInput, ElInputNumber, ElOption, ElRadio, ElRadioButton, ElRadioGroup, ElSelect, ElSlider, ElTag,
}
const global = { components }

describe('ExpertsSection', () => {
  const v = viewFixture({ rounds: [{ id: 7, number: 1, title: 'Round 1', status: 'closed', submitted: 2 }, { id: 9, number: 2, title: 'Round 2', status: 'open', submitted: 1 }] })
  const base = {
    view: v, loading: false, answeredRounds: v.rounds, otherRounds: [v.rounds[1]], compareError: null, compare: null, compareRoundId: null,
    panel: {
      rows: v.experts.map((e, i) => ({ id: e.expertId, label: e.label, range: rangeOf(e.distribution), excluded: i === 1, tone: '#5f87ad', compare: null })),
      compareLabel: null, combined: toUnivariate(v.experts[0].distribution), combinedLabel: 'Linear pool, equal weights', prior: null, priorLabel: '',
      bounds: { lower: -Infinity, upper: Infinity }, xLabel: 'flow (L/s)', caption: 'Two experts.',
    },
    excluded: [4], tones: { 3: '#5f87ad', 4: '#b0707f' }, weights: { 3: 1 }, unit: 'L/s', disabled: false,
  }

  it('lists the answered rounds, emits the round picked and which expert is toggled', async () => {
    const wrapper = mount(ExpertsSection, { props: base, global })
    expect(wrapper.findAll('[data-testid="round-option"]').map((r) => r.text())).toEqual(['Round 1 · 2 answers', 'Round 2 · 1 answer'])
    await wrapper.findAll('[data-testid="round-option"] input')[1].setValue(true)
    expect(wrapper.emitted('selectRound')).toEqual([[9]])
    const rows = wrapper.findAll('[data-testid="expert-row"]')
    expect(rows.map((r) => r.attributes('data-label'))).toEqual(['Expert 1', 'Expert 2'])
    expect(rows[1].classes()).toContain('is-excluded')
    expect(wrapper.findAll('[data-testid="panel-row"]').map((r) => r.attributes('data-excluded'))).toEqual(['false', 'true'])
    await rows[1].get('[data-testid="expert-toggle"] input').setValue(true)
    expect(wrapper.emitted('toggle')).toEqual([[4, true]])
  })

  it('says so when nobody has answered in the round, and shows a failed comparison', () => {
    const wrapper = mount(ExpertsSection, { props: { ...base, view: { ...v, experts: [] }, compareError: 'Round not found' }, global })
    expect(wrapper.find('[data-testid="expert-row"]').exists()).toBe(false)
    expect(wrapper.text()).toContain('No expert has submitted an answer')
    expect(wrapper.get('[role="alert"]').text()).toBe('Could not load the other round: Round not found')
  })
})

describe('CombineSection', () => {
  const v = viewFixture()
  const cooke = liveCooke(v.calibration, v.experts, 0)
  const base = {
    included: v.experts, questionCount: 10, cautions: [], cooke, cookeAll: cooke, cutoffValue: 0, customTotal: 2, summary: v.pool as Summary, combinationLabel: 'Linear pool, equal weights',
    problems: {}, unit: 'L/s', disabled: false, errors: {}, weightsReasonAttrs: {}, participantsAttrs: {}, notesAttrs: {},
    method: 'linear' as const, weightsMode: 'equal' as const, cutoff: 0, customWeights: { 3: 1, 4: 1 }, weightsReason: '', consensusRows: [], participants: '', notes: '',
  }

  it('summarises the combination and emits the method and weights chosen', async () => {
    const wrapper = mount(CombineSection, { props: base, global })
    expect(wrapper.get('[data-testid="combination-summary"]').text()).toMatch(/Linear pool, equal weights:\s*median 11\.6/)
    expect(wrapper.find('[data-testid="custom-weights"]').exists()).toBe(false)
    await wrapper.get('[data-testid="method-logarithmic"] input').setValue(true)
    expect(wrapper.emitted('update:method')).toEqual([['logarithmic']])
    await wrapper.get('[data-testid="weights-custom"] input').setValue(true)
    expect(wrapper.emitted('update:weightsMode')).toEqual([['custom']])
  })

  it('shows the weights set by hand with their shares, and the consensus inputs instead of weights for a consensus', async () => {
    const custom = mount(CombineSection, { props: { ...base, weightsMode: 'custom', customWeights: { 3: 3, 4: 1 }, customTotal: 4 }, global })
    expect(custom.findAll('[data-testid="custom-weight-row"]').map((r) => r.findAll('td')[1].text())).toEqual(['0.75', '0.25'])
    const consensus = mount(CombineSection, { props: { ...base, method: 'consensus', problems: { consensus: 'Enter at least two agreed values' }, summary: null }, global })
    expect(consensus.find('[data-testid="weights-equal"]').exists()).toBe(false)
    expect(consensus.find('[data-testid="consensus-participants"]').exists()).toBe(true)
    expect(consensus.get('[data-testid="combination-problem"]').text()).toBe('Enter at least two agreed values')
  })
})

describe('FitSection', () => {
  const fits = fitAll([{ value: 8, prob: 0.25 }, { value: 10, prob: 0.5 }, { value: 13, prob: 0.75 }], { kind: 'real' })
  const normal = fits.find((f) => f.distribution.family === 'normal')!
  const base = {
    fits, family: null, chosenFit: null, consensus: false, adjusting: false, adjustParams: {}, adjustProblem: null, implied: null, adjustedSse: null,
    adjustReasonAttrs: {}, errors: {}, unit: 'L/s', disabled: false, adjustReason: '',
  }

  it('emits the family chosen and offers a hand adjustment only once a fit is chosen', async () => {
    const wrapper = mount(FitSection, { props: base, global })
    expect(wrapper.get('[data-testid="adjust-open"]').attributes('disabled')).toBeDefined()
    await wrapper.get('[data-testid="fit-row"][data-family="normal"] input').setValue(true)
    expect(wrapper.emitted('choose')).toEqual([['normal']])
    await wrapper.setProps({ family: 'normal', chosenFit: normal })
    await wrapper.get('[data-testid="adjust-open"]').trigger('click')
    expect(wrapper.emitted('startAdjust')).toHaveLength(1)
  })

  it('shows the adjusted parameters, their effect, and the problem with bad ones', async () => {
    const wrapper = mount(FitSection, {
      props: { ...base, family: 'normal', chosenFit: normal, adjusting: true, adjustParams: { mu: 11, sigma: 3 }, implied: { q05: 6.07, q50: 11, q95: 15.93 }, adjustedSse: 0.0021 },
      global,
    })
    expect(wrapper.get('[data-testid="adjust-effect"]').text()).toContain('Implied 5 % 6.07, median 11, 95 % 15.93.')
    expect(wrapper.get('[data-testid="adjust-effect"]').text()).toContain('SSE against the combination: 0.0021')
    await wrapper.get('[data-testid="adjust-discard"]').trigger('click')
    expect(wrapper.emitted('discardAdjust')).toHaveLength(1)
    await wrapper.setProps({ adjustProblem: 'Enter the standard deviation', implied: null })
    expect(wrapper.find('[data-testid="adjust-effect"]').exists()).toBe(false)
    expect(wrapper.get('[data-testid="adjust-form"] [role="alert"]').text()).toBe('Enter the standard deviation')
  })
})

describe('RobustnessSection', () => {
  it('flags experts whose 90 % intervals do not overlap and lists leave-one-out rows for three experts', () => {
    const experts = [
      expert(3, 'Expert 1', 'Tomasz Wierzbicki', { family: 'normal', mu: 10, sigma: 1 }),
      expert(4, 'Expert 2', 'Helen Okafor', { family: 'normal', mu: 20, sigma: 1 }),
      expert(5, 'Expert 3', 'Ana Ruiz', { family: 'normal', mu: 15, sigma: 3 }),
    ]
    const v = viewFixture({ experts, included: [3, 4, 5] })
    const preview = computePreview({ method: 'linear', experts, excluded: [], weightsMode: 'equal', customWeights: {}, cutoff: 0, calibration: v.calibration, consensus: [], support: { kind: 'real' } })
    const wrapper = mount(RobustnessSection, { props: { preview, summary: preview.summary, experts, consensus: false, unit: 'L/s' }, global })
    expect(wrapper.get('[data-testid="disagreement-flag"]').text()).toContain('Expert 1 and Expert 2 do not overlap')
    expect(wrapper.findAll('[data-testid="loo-row"]').map((r) => r.attributes('data-expert-id'))).toEqual(['3', '4', '5'])
  })

  it('says every pair overlaps and that leaving one out needs three experts', () => {
    const v = viewFixture()
    const preview = computePreview({ method: 'linear', experts: v.experts, excluded: [], weightsMode: 'equal', customWeights: {}, cutoff: 0, calibration: v.calibration, consensus: [], support: { kind: 'real' } })
    const wrapper = mount(RobustnessSection, { props: { preview, summary: preview.summary, experts: v.experts, consensus: false, unit: 'L/s' }, global })
    expect(wrapper.find('[data-testid="no-disagreement"]').exists()).toBe(true)
    expect(wrapper.text()).toContain('Leaving one expert out needs at least three included experts.')
  })
})

describe('DecisionSection', () => {
  const base = {
    view: viewFixture(), canWrite: true, locked: false, dirty: false, saving: false, formError: null, conflict: false, conflictReloaded: false, reloadingTheirs: false,
    rationaleAttrs: {}, errors: {}, unit: 'L/s', roundName: () => 'Round 1', rationale: '',
  }

  it('offers to save a new reconciliation and emits the buttons pressed', async () => {
    const wrapper = mount(DecisionSection, { props: base, global })
    expect(wrapper.get('[data-testid="reconcile-status"]').attributes('data-status')).toBe('new')
    await wrapper.get('[data-testid="save-draft"]').trigger('click')
    await wrapper.get('[data-testid="mark-reconciled"]').trigger('click')
    expect(wrapper.emitted('saveDraft')).toHaveLength(1)
    expect(wrapper.emitted('markReconciled')).toHaveLength(1)
  })

  it('describes the saved prior and who saved it, offers to reopen, and hides the buttons from other roles', () => {
    const v = viewFixture()
    const saved = {
      ...v,
      saved: {
        id: 1, roundId: 7, method: 'linear' as const, weightsMode: 'equal' as const, weights: [0.5, 0.5], weightsReason: '', cutoff: 0, excludedExperts: [], consensus: null,
        family: 'normal' as const, distribution: { family: 'normal' as const, mu: 12, sigma: 3 }, fits: [], summary: v.pool, adjusted: false, adjustReason: '',
        rationale: 'Equal weights.', status: 'reconciled' as const, reconciledAt: '2026-12-02T10:00:00.000Z', version: 2, updatedAt: '2026-12-02T10:00:00.000Z',
      },
      history: [{ version: 2, savedAt: '2026-12-02T10:00:00.000Z', savedBy: 'Priya Natarajan', status: 'reconciled' as const, method: 'linear' as const, family: 'normal' as const }],
    }
    const wrapper = mount(DecisionSection, { props: { ...base, view: saved, locked: true }, global })
    expect(wrapper.get('[data-testid="reconcile-status"]').text()).toContain('Version 2, saved by Priya Natarajan')
    expect(wrapper.get('[data-testid="saved-prior"]').text()).toContain('median 12')
    expect(wrapper.get('[data-testid="saved-prior"]').text()).toContain('From the linear opinion pool, equal weights, Round 1.')
    expect(wrapper.find('[data-testid="reopen"]').exists()).toBe(true)
    const expertView = mount(DecisionSection, { props: { ...base, view: saved, canWrite: false, locked: true }, global })
    expect(expertView.find('[data-testid="save-draft"]').exists()).toBe(false)
    expect(expertView.find('[data-testid="reopen"]').exists()).toBe(false)
  })
})
