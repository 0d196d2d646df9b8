// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { toUnivariate, type Distribution } from '@shared/stats'
import PanelRanges from '@/components/reconcile/PanelRanges.vue'
import { axisPercent, densityPath, rangeOf, roundedAxis } from '@/reconcile/panel'

const REAL = { lower: -Infinity, upper: Infinity }

describe('roundedAxis (constructed cases)', () => {
  it('widens the range to whole multiples of a 1-2-5 step', () => {
    // The 90 % interval of the POOL-linear-2 pool, 7.286 to 17.85: a span of 10.6 in about five steps gives steps of 5.
    expect(roundedAxis(7.28598745543, 17.8454032129, REAL)).toEqual({ min: 5, max: 20, ticks: [5, 10, 15, 20] })
    expect(roundedAxis(0.013, 0.0461, REAL)).toEqual({ min: 0.01, max: 0.05, ticks: [0.01, 0.02, 0.03, 0.04, 0.05] })
    // A span of 4.9 in about five steps gives steps of 1.
    expect(roundedAxis(-3.2, 1.7, REAL)).toEqual({ min: -4, max: 2, ticks: [-4, -3, -2, -1, 0, 1, 2] })
  })

  it('never goes past the support, whose bounds are ends of their own', () => {
    expect(roundedAxis(-0.3, 1.2, { lower: 0, upper: 1 })).toEqual({ min: 0, max: 1, ticks: [0, 0.2, 0.4, 0.6, 0.8, 1] })
    expect(roundedAxis(0.5, 37, { lower: 0, upper: Infinity })).toEqual({ min: 0, max: 40, ticks: [0, 10, 20, 30, 40] })
    const bounded = roundedAxis(2.4, 9.7, { lower: 2.5, upper: 9.5 })
    expect([bounded.min, bounded.max]).toEqual([2.5, 9.5])
    expect(bounded.ticks).toEqual([4, 6, 8])
  })

  it('still gives an axis when every value is the same', () => {
    // 12 ± 10 % is 10.8 to 13.2, in steps of 0.5.
    expect(roundedAxis(12, 12, REAL)).toEqual({ min: 10.5, max: 13.5, ticks: [10.5, 11, 11.5, 12, 12.5, 13, 13.5] })
  })

  it('places values in per cent of the axis and draws a closed shape for a fill', () => {
    const axis = { min: 5, max: 20, ticks: [] }
    expect(axisPercent(axis, 8.75)).toBe(25)
    expect(axisPercent(axis, 40)).toBe(100)
    const path = densityPath([{ x: 5, y: 0 }, { x: 12.5, y: 2 }, { x: 20, y: 0 }], axis, 2, true)
    expect(path).toBe('M0.0,100 L0.0,100.00 L500.0,4.00 L1000.0,100.00 L1000.0,100 Z')
  })
})

describe('PanelRanges', () => {
  const a: Distribution = { family: 'normal', mu: 10, sigma: 2 }
  const b: Distribution = { family: 'normal', mu: 14, sigma: 3 }
  const props = {
    rows: [
      { id: 3, label: 'Expert 1', range: rangeOf(a), excluded: false, tone: '#5f87ad', compare: null },
      { id: 4, label: 'Expert 2', range: rangeOf(b), excluded: true, tone: '#b0707f', compare: rangeOf({ family: 'normal', mu: 16, sigma: 4 }) },
    ],
    compareLabel: 'Round 1',
    combined: toUnivariate(a),
    combinedLabel: 'Linear pool, equal weights',
    prior: null,
    priorLabel: '',
    bounds: { lower: 0, upper: Infinity },
    xLabel: 'flow (L/s)',
    caption: 'Two experts.',
  }

  it('draws one row per expert at its place on a round axis, with the combination filled beneath', () => {
    const wrapper = mount(PanelRanges, { props })
    const ticks = wrapper.findAll('[data-testid="panel-tick"]').map((t) => Number(t.text()))
    // Values from 5.06 (Expert 1's 2 % of the combination) to 22.6 (Expert 2's 95 % in round 1), on the positive line: 5 to 25 in steps of 5.
    expect(ticks).toEqual([5, 10, 15, 20, 25])
    const rows = wrapper.findAll('[data-testid="panel-row"]')
    expect(rows.map((r) => [r.attributes('data-label'), r.attributes('data-excluded')])).toEqual([['Expert 1', 'false'], ['Expert 2', 'true']])
    // Expert 1's median 10 sits a quarter along 5–25; the 5 % value 6.710 at 8.55 %.
    expect(rows[0].get('[data-testid="panel-median"]').attributes('style')).toContain('left: 25.00%')
    expect(rows[0].get('[data-testid="panel-range"]').attributes('style')).toContain('left: 8.55%')
    expect(rows[0].find('[data-testid="panel-compare"]').exists()).toBe(false)
    expect(rows[1].find('[data-testid="panel-compare"]').exists()).toBe(true)
    expect(rows[1].text()).toContain('Expert 2 (left out): 5 % 9.065, middle half 11.98 to 16.02, median 14, 95 % 18.93.')
    expect(wrapper.get('[data-testid="panel-combined-shape"]').attributes('d')).toMatch(/Z$/)
    expect(wrapper.find('[data-testid="panel-prior-line"]').exists()).toBe(false)
    expect(wrapper.text()).toContain('Round 1')
  })

  it('adds the prior as a line over the combination and says when nothing is combined', async () => {
    const wrapper = mount(PanelRanges, { props: { ...props, prior: { family: 'normal', mu: 12, sigma: 3 } as Distribution, priorLabel: 'Normal prior (chosen fit)' } })
    expect(wrapper.get('[data-testid="panel-prior-line"]').attributes('d')).toMatch(/^M0\.0,/)
    expect(wrapper.text()).toContain('Normal prior (chosen fit)')
    await wrapper.setProps({ combined: null, prior: null })
    expect(wrapper.get('[data-testid="panel-combined"]').text()).toBe('Nothing combined yet')
  })
})
