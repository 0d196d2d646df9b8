// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import QuantitySection from '@/components/record/QuantitySection.vue'
import type { RecordQuantity } from '@/api/record'
import { quantity } from './fixtures'

/** The weights table of a record's combination: each weight under the label of the expert it belongs to. */
function weightTable(q: RecordQuantity): string[][] {
  const wrapper = mount(QuantitySection, { props: { quantity: q, number: 4 }, global: { stubs: { FinalPriorChart: true, ModelCodeBlock: true } } })
  return wrapper.findAll('[data-testid="record-weights"] tbody tr').map((tr) => tr.findAll('td').map((td) => td.text()))
}

const judgement = (code: string, round: number) => ({ ...quantity().judgements[0], expert: { code }, round })

describe('record: weights by expert', () => {
  it('labels each weight with its own expert even when the judgements listed do not line up with the weights', () => {
    // Round 2 was combined; Expert 2 answered only round 1 and Expert 5 joined in round 2, so a list built from the
    // judgements in order would pair the weights with the wrong people (or fall back to numbering them).
    const q = quantity({
      judgements: [judgement('Expert 2', 1), judgement('Expert 1', 2), judgement('Expert 5', 2), judgement('Expert 3', 2)],
      combination: {
        ...quantity().combination!, round: 2, weightsMode: 'performance', weights: [0.7, 0.3], excludedExperts: ['Expert 3'],
        expertWeights: [{ expert: { code: 'Expert 5' }, weight: 0.7 }, { expert: { code: 'Expert 1' }, weight: 0.3 }],
      },
    })
    expect(weightTable(q)).toEqual([['Expert 5', '0.7'], ['Expert 1', '0.3']])
  })

  it('shows names beside the labels when the record shows names, and no table for a record that kept no labelled weights', () => {
    const named = quantity({ combination: { ...quantity().combination!, expertWeights: [{ expert: { code: 'Expert 1', name: 'Helen Okafor' }, weight: 1 }] } })
    expect(weightTable(named)).toEqual([['Expert 1 (Helen Okafor)', '1']])
    const older = quantity({ judgements: [judgement('Expert 1', 1), judgement('Expert 2', 1)], combination: { ...quantity().combination!, weights: [0.5, 0.25, 0.25] } })
    expect(weightTable(older)).toEqual([])
  })
})
