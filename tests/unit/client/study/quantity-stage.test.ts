// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import QuantityStage from '@/components/study/QuantityStage.vue'

function steps(stage: 'framed' | 'judged' | 'reconciled' | 'in-record') {
  const wrapper = mount(QuantityStage, { props: { stage } })
  return {
    wrapper,
    states: wrapper.findAll('li').map((li) => [li.attributes('data-step'), li.classes().find((c) => c.startsWith('is-'))]),
    current: wrapper.findAll('li[aria-current="step"]').map((li) => li.attributes('data-step')),
  }
}

describe('QuantityStage', () => {
  it('marks the steps before the stage as reached and the stage itself as current', () => {
    const { wrapper, states, current } = steps('reconciled')
    expect(states).toEqual([
      ['framed', 'is-done'],
      ['judged', 'is-done'],
      ['reconciled', 'is-current'],
      ['in-record', 'is-todo'],
    ])
    expect(current).toEqual(['reconciled'])
    expect(wrapper.get('ol').attributes('aria-label')).toContain('Reconciled: step 3 of 4')
    expect(wrapper.get('[data-testid="quantity-stage"]').attributes('data-stage')).toBe('reconciled')
  })

  it('starts at framed and ends at in record', () => {
    expect(steps('framed').states.map(([, s]) => s)).toEqual(['is-current', 'is-todo', 'is-todo', 'is-todo'])
    expect(steps('in-record').states.map(([, s]) => s)).toEqual(['is-done', 'is-done', 'is-done', 'is-current'])
  })

  it('says in words which steps are reached, for screen readers', () => {
    const text = steps('judged').wrapper.text()
    expect(text).toContain('Framed(reached)')
    expect(text).toContain('Judged(current stage)')
    expect(text).toContain('In record(not yet)')
  })
})
