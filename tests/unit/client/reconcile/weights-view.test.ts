// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElFormItem, ElInputNumber } from 'element-plus'
import CutoffPlot from '@/components/reconcile/CutoffPlot.vue'
import PerformanceWeights from '@/components/reconcile/PerformanceWeights.vue'
import { cutoffFromHeight, cutoffStep, heightOfCutoff, lowestDecade } from '@/reconcile/cutoff'
import { liveCooke } from '@/reconcile/preview'
import { viewFixture } from './fixture'

const global = { components: { ElFormItem, ElInputNumber } }

describe('the cutoff on a log scale (constructed cases)', () => {
  it('shows one decade below the lowest score, between 10^-2 and 10^-16, whatever the cutoff', () => {
    expect(lowestDecade([0.5, 0.0034])).toBe(-4)
    expect(lowestDecade([0.5, 0.3])).toBe(-2)
    expect(lowestDecade([0.5, 1e-30])).toBe(-16)
    expect(lowestDecade([0, 0.3])).toBe(-2)
  })

  it('turns heights into cutoffs and back, with the bottom as "no cutoff"', () => {
    expect(heightOfCutoff(0.01, -4)).toBe(0.5)
    expect(heightOfCutoff(1, -4)).toBe(1)
    expect(heightOfCutoff(0, -4)).toBe(0)
    expect(cutoffFromHeight(0.5, -4)).toBe(0.01)
    expect(cutoffFromHeight(0.75, -4)).toBe(0.1)
    expect(cutoffFromHeight(0.6, -4)).toBe(0.025)
    expect(cutoffFromHeight(0.02, -4)).toBe(0)
    expect(cutoffFromHeight(1, -4)).toBe(0.99)
  })

  it('steps a quarter decade per arrow key and a decade per page key', () => {
    expect(cutoffStep(0.01, 'ArrowUp', -4)).toBe(0.018)
    expect(cutoffStep(0.01, 'ArrowDown', -4)).toBe(0.0056)
    expect(cutoffStep(0.01, 'PageUp', -4)).toBe(0.1)
    expect(cutoffStep(0, 'ArrowUp', -4)).toBe(0.0001)
    expect(cutoffStep(0.0001, 'ArrowDown', -4)).toBe(0)
    expect(cutoffStep(0.5, 'PageUp', -4)).toBe(0.99)
    expect(cutoffStep(0.5, 'Home', -4)).toBe(0)
    expect(cutoffStep(0.5, 'Tab', -4)).toBeNull()
  })
})

describe('CutoffPlot', () => {
  // The COOKE-worked-example panel of the fixture: calibration 0.0521 (A) and 0.00344 (B) at cutoff 0 (an independent Python implementation).
  const points = [{ expertId: 3, label: 'Expert 1', calibration: 0.0521, information: 1.2 }, { expertId: 4, label: 'Expert 2', calibration: 0.00344, information: 2.1 }]

  it('places the experts on a log scale and greys out those below the cutoff', async () => {
    const wrapper = mount(CutoffPlot, { props: { points, cutoff: 0 } })
    const dots = () => wrapper.findAll('[data-testid="cutoff-point"]')
    expect(dots().map((d) => d.attributes('data-below'))).toEqual(['false', 'false'])
    // Bottom decade 10^-4: a score of 0.0521 sits 1 - log10(0.0521)/(-4) = 67.9 % up, so 32.08 % from the top.
    expect(dots()[0].attributes('style')).toContain('top: 32.08%')
    expect(wrapper.get('[data-testid="cutoff-status"]').text()).toBe('No cutoff: 2 of 2 experts keep a weight.')
    await wrapper.setProps({ cutoff: 0.01 })
    expect(dots().map((d) => d.attributes('data-below'))).toEqual(['false', 'true'])
    expect(wrapper.get('[data-testid="cutoff-status"]').text()).toBe('Cutoff 0.01: 1 of 2 experts keep a weight.')
  })

  it('moves the cutoff with the keyboard and with the pointer', async () => {
    const wrapper = mount(CutoffPlot, { props: { points, cutoff: 0.01, 'onUpdate:cutoff': (v: number) => wrapper.setProps({ cutoff: v }) } })
    const handle = wrapper.get('[data-testid="cutoff-handle"]')
    expect(handle.attributes('role')).toBe('slider')
    await handle.trigger('keydown', { key: 'PageUp' })
    expect(wrapper.props('cutoff')).toBe(0.1)
    await handle.trigger('keydown', { key: 'Home' })
    expect(wrapper.props('cutoff')).toBe(0)
    const area = wrapper.get('[data-testid="cutoff-area"]')
    ;(area.element as HTMLElement).getBoundingClientRect = () => ({ top: 100, bottom: 300, left: 0, right: 400, height: 200, width: 400, x: 0, y: 100, toJSON: () => ({}) })
    // Half way up a plot whose bottom is 10^-4: a cutoff of 0.01.
    await area.trigger('pointerdown', { clientY: 200, button: 0, pointerId: 1 })
    expect(wrapper.props('cutoff')).toBe(0.01)
    await area.trigger('pointermove', { clientY: 150, pointerId: 1 })
    expect(wrapper.props('cutoff')).toBe(0.1)
    await area.trigger('pointerup', { clientY: 150, pointerId: 1 })
    await area.trigger('pointermove', { clientY: 290, pointerId: 1 })
    expect(wrapper.props('cutoff')).toBe(0.1)
  })
})

describe('PerformanceWeights', () => {
  const v = viewFixture()
  const mountAt = (cutoff: number) => mount(PerformanceWeights, {
    props: {
      included: v.experts, questionCount: 10, cautions: [], cooke: liveCooke(v.calibration, v.experts, cutoff), cookeAll: liveCooke(v.calibration, v.experts, 0),
      cutoffValue: cutoff, cutoff,
    },
    global,
  })

  it('shows the weights as bars with the weight with every expert kept beside, and the scores in a folded table with plain column names', () => {
    const wrapper = mountAt(0)
    const bars = wrapper.findAll('[data-testid="weight-bar"]')
    // COOKE-worked-example: normalised weights 0.957753869124 and 0.0422461308765 at α = 0.
    expect(bars.map((b) => b.text())).toEqual(['Expert 10.958', 'Expert 20.0422'])
    expect(wrapper.get('[data-testid="cooke-details"]').element.tagName).toBe('DETAILS')
    expect(wrapper.get('[data-testid="cooke-details"]').attributes('open')).toBeUndefined()
    const heads = wrapper.findAll('[data-testid="cooke-table"] thead th').map((h) => h.text())
    expect(heads).toEqual(['Expert', 'Calibration score', 'Information score', 'Weight with this cutoff', 'Weight with every expert kept'])
    expect(wrapper.text()).not.toMatch(/no cutoff\)|cutoff 0\)/i)
  })

  it('greys out the expert below the cutoff and keeps the plot when the cutoff drops everyone', () => {
    const at05 = mountAt(0.05)
    expect(at05.findAll('[data-testid="weight-bar"]').map((b) => [b.attributes('data-weight'), b.classes().includes('is-below')])).toEqual([['1', false], ['0', true]])
    expect(at05.get('[data-testid="cooke-effect"]').text()).toBe('Expert 2 falls below the cutoff 0.05 and gets no weight.')
    const atTop = mountAt(0.9)
    expect(atTop.find('[data-testid="cutoff-plot"]').exists()).toBe(true)
    expect(atTop.findAll('[data-testid="cutoff-point"]').map((p) => p.attributes('data-below'))).toEqual(['true', 'true'])
    expect(atTop.get('[data-testid="cooke-effect"]').text()).toBe('No expert reaches a calibration score of 0.9: performance weights cannot be used at this cutoff.')
    expect(atTop.findAll('[data-testid="weight-bar"]').map((b) => b.attributes('data-weight'))).toEqual(['0', '0'])
  })
})
