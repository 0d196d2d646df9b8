// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import RoundQuestions from '@/components/answer/RoundQuestions.vue'
import type { RoundItem } from '@/api/rounds'
import type { RoundLink } from '@/api/links'

const item = (id: number, name: string): RoundItem => ({
  quantityId: id, method: 'quantile', askTails: false,
  quantity: { id, name, symbol: `q${id}`, unit: 'h', question: `What is the ${name.toLowerCase()}?`, support: { kind: 'positive' }, assumptions: '', evidenceNotes: '', files: [] },
})
const link: RoundLink = {
  id: 4, roundId: 1, first: { quantityId: 1, name: 'Mains burst rate', symbol: 'q1' }, second: { quantityId: 2, name: 'Repair time', symbol: 'q2' },
  wording: 'Suppose mains burst rate turned out above your middle value. How likely is it that repair time is also above yours?', position: 1, version: 1, createdAt: '', updatedAt: '',
}

describe('the round’s questions before answering', () => {
  it('lists the questions about two quantities together after the quantities, in their wording', () => {
    const wrapper = mount(RoundQuestions, { props: { items: [item(1, 'Mains burst rate'), item(2, 'Repair time')], links: [link] } })
    expect(wrapper.findAll('[data-testid="answer-quantity"]')).toHaveLength(2)
    expect(wrapper.findAll('[data-testid="answer-links"] li').map((li) => li.text())).toEqual([link.wording])
  })

  it('says nothing about links in a round without any', () => {
    const wrapper = mount(RoundQuestions, { props: { items: [item(1, 'Mains burst rate')], links: [] } })
    expect(wrapper.find('[data-testid="answer-links"]').exists()).toBe(false)
    expect(wrapper.text()).not.toContain('two quantities together')
  })
})
