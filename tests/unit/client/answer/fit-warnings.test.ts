// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { fitAnswer } from '@shared/elicitation/answers'
import type { Family } from '@shared/stats'
import FeedbackCard from '@/components/answer/FeedbackCard.vue'

// The answer: plausible bounds 5 and 25, quartiles 8 / 10 / 12, positive quantity.
const answer = { lower: 5, upper: 25, points: [8, 10, 12].map((value, i) => ({ value, prob: [0.25, 0.5, 0.75][i] })) }
const { fits, check } = fitAnswer({ method: 'quantile' }, answer, { kind: 'positive' })

function card(chosenFamily: Family | null) {
  return mount(FeedbackCard, {
    props: {
      quantity: { name: 'Night flow', unit: 'L/s', support: { kind: 'positive' } }, method: 'quantile', fits, source: 'browser', chosenFamily,
      complete: true, fitMessage: null, points: check.points, bounds: { lower: 5, upper: 25 }, waiting: '',
    },
    global: { stubs: { FeedbackChart: true } },
  })
}

describe('the expert sees where a fitted shape contradicts the answer', () => {
  it('the suggested fit has no warning, and the expert is shown no list of families, error sums or ranking', () => {
    const w = card(null)
    expect(w.get('[data-testid="feedback-card"]').attributes('data-family')).not.toBe('uniform')
    expect(w.findAll('[data-testid="fit-warning"]')).toHaveLength(0)
    expect(w.findAll('[data-testid="family-option"]')).toHaveLength(0)
    expect(w.text()).not.toMatch(/best fit|suggested|\bSSE\b|squared|uniform|lognormal|gamma/i)
    w.unmount()
  })

  it('a uniform chosen on purpose (by the analyst, or stored before) shows its warning in plain words', () => {
    const w = card('uniform')
    expect(w.findAll('[data-testid="fit-warning"]').map((li) => li.text())).toEqual([
      'This shape says values above 14 are impossible, but you said 25 is plausible.',
      'This shape says values below 6 are impossible, but you said 5 is plausible.',
    ])
    w.unmount()
  })
})
