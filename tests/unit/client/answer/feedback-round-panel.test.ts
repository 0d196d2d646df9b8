// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { linearPool, type Distribution } from '@shared/stats'
import FeedbackRoundPanel from '@/components/answer/FeedbackRoundPanel.vue'
import type { RoundFeedback } from '@/api/judgements'
import type { RoundQuantity } from '@/api/rounds'

const BURST: RoundQuantity = {
  id: 1, name: 'Burst rate of old cast-iron mains', symbol: 'burst_rate', unit: 'bursts per 100 km per year',
  question: 'Average bursts per 100 km per year over 2027–2031?', support: { kind: 'positive' }, assumptions: '', evidenceNotes: '', files: [],
}
const UPTAKE: RoundQuantity = { ...BURST, id: 2, name: 'Leak-alert uptake', symbol: 'alert_uptake', unit: 'share of households', support: { kind: 'proportion' } }

const mine: Distribution = { family: 'lognormal', meanlog: Math.log(10), sdlog: 0.4 }
const second: Distribution = { family: 'lognormal', meanlog: Math.log(9), sdlog: 0.5 }
const third: Distribution = { family: 'lognormal', meanlog: Math.log(20), sdlog: 0.3 }

function feedback(d: [Distribution, Distribution, Distribution]): RoundFeedback {
  return {
    quantityId: 1,
    previousRound: { id: 7, number: 1 },
    mine: { answer: { method: 'quantile', lower: 3, upper: 30, points: [] } as never, distribution: d[0], rationale: 'Burst logs of my district.' },
    others: [
      { label: 'Expert 3', distribution: d[1], rationale: 'Regional statistics.' },
      { label: 'Expert 1', distribution: d[2], rationale: '' },
    ],
  }
}

const mountPanel = (quantity: RoundQuantity, d: [Distribution, Distribution, Distribution]) =>
  mount(FeedbackRoundPanel, { props: { feedback: feedback(d), quantity, canUseMine: true } })

describe('feedback round panel (expert side)', () => {
  it('draws one strip per expert under the study labels, yours marked "You", and the panel taken together as a filled shape beneath', () => {
    const wrapper = mountPanel(BURST, [mine, second, third])
    // No chart of thin curves with a dashed pooled line: strips on one axis.
    expect(wrapper.find('canvas').exists()).toBe(false)
    const rows = wrapper.findAll('[data-testid="panel-row"]')
    expect(rows.map((r) => [r.attributes('data-label'), r.attributes('data-mine') ?? null])).toEqual([['You', 'true'], ['Expert 3', null], ['Expert 1', null]])
    // Your median 10 on an axis that must reach the third expert's 95 % value 20·e^(1.645·0.3) = 32.7: 0 to 40 in steps of 10.
    expect(wrapper.findAll('[data-testid="panel-tick"]').map((t) => t.text())).toEqual(['0', '10', '20', '30', '40'])
    expect(rows[0].get('[data-testid="panel-median"]').attributes('style')).toContain('left: 25.00%')
    expect(wrapper.get('.panel-ranges__label.is-mine').text()).toBe('You')
    expect(wrapper.get('[data-testid="panel-combined-shape"]').attributes('d')).toMatch(/^M0\.0,100 L/)
    expect(wrapper.find('[data-testid="panel-prior-line"]').exists()).toBe(false)
    // The combination is the equal-weight linear pool of the three answers.
    const pooled = linearPool([mine, second, third], [1, 1, 1])
    expect(wrapper.get('[data-testid="feedback-round-panel-row"] td').text()).toBe(String(Number(pooled.quantile(0.5).toPrecision(3))))
    // Plain words for the expert: middle value, no statistician's key or family names on the strip.
    const key = wrapper.get('.panel-ranges__key').text()
    expect(key).toContain('middle value')
    expect(key).toContain('you')
    expect(wrapper.get('.panel-ranges').text()).not.toMatch(/lognormal|pooled|median/i)
  })

  it('writes a share in per cent on the axis, as it was asked', () => {
    const share = (m: number): Distribution => ({ family: 'beta', alpha: 20 * m, beta: 20 * (1 - m) })
    const wrapper = mountPanel(UPTAKE, [share(0.3), share(0.2), share(0.45)])
    const ticks = wrapper.findAll('[data-testid="panel-tick"]').map((t) => t.text())
    expect(ticks.length).toBeGreaterThanOrEqual(3)
    for (const t of ticks) expect(t).toMatch(/^\d+ %$/)
  })
})
