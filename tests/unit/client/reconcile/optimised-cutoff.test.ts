// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElButton, ElFormItem, ElInputNumber } from 'element-plus'
import PerformanceWeights from '@/components/reconcile/PerformanceWeights.vue'
import { COOKE_QUANTILES, liveCooke, liveOptimisedCutoff } from '@/reconcile/preview'
import { optimisedCutoff } from '@shared/stats'
import { viewFixture } from './fixture'

const global = { components: { ElButton, ElFormItem, ElInputNumber } }

// The constructed two-expert panel of the fixture (COOKE-worked-example). The engine's optimised cutoff is checked against
// an independent implementation in tests/unit/stats/cooke-cutoff.test.ts; here the screen offers that value and applies it.
describe("the optimised cutoff on the weights view", () => {
  const v = viewFixture()
  const calibrations = liveCooke(v.calibration, v.experts, 0).scores!.map((s) => s.calibration)

  it("is the engine's optimised cutoff for the included experts, one of their calibration scores", () => {
    const live = liveOptimisedCutoff(v.calibration, v.experts)
    const engine = optimisedCutoff({
      quantiles: COOKE_QUANTILES,
      experts: v.experts.map((e) => ({ id: String(e.expertId), label: e.label, assessments: v.calibration.assessments.find((a) => Number(a.id) === e.expertId)!.assessments })),
      realizations: v.calibration.realizations,
    })
    expect(live).toBe(engine.best.cutoff)
    expect(calibrations).toContain(live)
  })

  it('is not offered while the scores cannot be computed (no expert included)', () => {
    expect(liveOptimisedCutoff(v.calibration, [])).toBeNull()
  })

  it('sets the cutoff when the analyst presses the button, and is disabled once it is the cutoff', async () => {
    const best = liveOptimisedCutoff(v.calibration, v.experts)!
    const updates: number[] = []
    const wrapper = mount(PerformanceWeights, {
      props: {
        included: v.experts, questionCount: 10, cautions: [], cooke: liveCooke(v.calibration, v.experts, 0), cookeAll: liveCooke(v.calibration, v.experts, 0),
        optimisedCutoff: best, cutoffValue: 0, cutoff: 0, 'onUpdate:cutoff': (c: number | undefined) => { updates.push(c!) },
      },
      global,
    })
    const button = wrapper.get('[data-testid="use-optimised-cutoff"]')
    expect(button.text()).toMatch(/^Use the optimised cutoff \(/)
    await button.trigger('click')
    expect(updates).toEqual([best])
    await wrapper.setProps({ cutoffValue: best, cutoff: best })
    expect(wrapper.get('[data-testid="use-optimised-cutoff"]').attributes('disabled')).toBeDefined()
    await wrapper.setProps({ optimisedCutoff: null })
    expect(wrapper.find('[data-testid="use-optimised-cutoff"]').exists()).toBe(false)
  })
})
