import { describe, expect, it } from 'vitest'
import { linkedComponents, linkedSetMatrix, linkedSetName, linkPoolWeights } from '../../../shared/elicitation/linked-sets'

// Values worked by hand (constructed), following the rule written in docs/methods/joint-priors.md.
describe('the weights of a link’s experts', () => {
  const threeToOne = new Map([[11, 0.75], [12, 0.25]])
  const equal = new Map([[11, 0.5], [12, 0.5]])

  it('averages the two reconciliations’ weights', () => {
    expect(linkPoolWeights([11, 12], threeToOne, equal)).toEqual({ weights: [0.625, 0.375], rule: 'The average of the experts’ weights in the two quantities’ reconciliations' })
  })

  it('gives equal weights while neither quantity is reconciled, and equal weights for the side not reconciled', () => {
    expect(linkPoolWeights([11, 12, 13], null, null)).toEqual({ weights: [1 / 3, 1 / 3, 1 / 3], rule: 'Equal weights: neither quantity is reconciled yet' })
    expect(linkPoolWeights([11, 12], null, threeToOne).weights).toEqual([0.625, 0.375])
  })

  it('renormalises each side over the link’s experts: an expert absent from a reconciliation gets 0 there', () => {
    // Side one knows experts 11, 12 and 14 (0.5, 0.25, 0.25); only 11 and 13 answered the link: (1, 0) on that side.
    const wider = new Map([[11, 0.5], [12, 0.25], [14, 0.25]])
    const side2 = new Map([[11, 0.25], [13, 0.75]])
    expect(linkPoolWeights([11, 13], wider, side2).weights).toEqual([0.625, 0.375])
  })

  it('drops a side where none of the link’s experts carries weight, and says so', () => {
    const onlyOthers = new Map([[20, 1]])
    expect(linkPoolWeights([11, 12], onlyOthers, threeToOne)).toEqual({
      weights: [0.75, 0.25], rule: 'Only the second quantity’s reconciliation weights: these experts carry no weight in the other’s reconciliation',
    })
    expect(linkPoolWeights([11, 12], onlyOthers, null)).toEqual({
      weights: [0.5, 0.5], rule: 'Only the second quantity’s equal weights (it is not reconciled yet): these experts carry no weight in the other’s reconciliation',
    })
    expect(linkPoolWeights([11, 12], onlyOthers, onlyOthers)).toEqual({ weights: [0, 0], rule: 'None of these experts carries weight in either quantity’s reconciliation' })
    expect(linkPoolWeights([], null, null)).toEqual({ weights: [], rule: 'Nobody has answered yet' })
  })
})

describe('linked sets', () => {
  it('joins quantities linked directly or through each other, in the given order, leaving unlinked ones out', () => {
    expect(linkedComponents([1, 2, 3, 4, 5, 6], [[3, 1], [5, 6], [1, 4]])).toEqual([[1, 3, 4], [5, 6]])
    expect(linkedComponents([1, 2], [])).toEqual([])
  })

  it('builds the matrix with 1 on the diagonal, each link’s correlation, and 0 for pairs no link joins', () => {
    expect(linkedSetMatrix([1, 3, 4], [{ first: 3, second: 1, correlation: 0.4 }, { first: 1, second: 4, correlation: -0.2 }])).toEqual({
      matrix: [[1, 0.4, -0.2], [0.4, 1, 0], [-0.2, 0, 1]],
      unlinked: [[3, 4]],
    })
  })

  it('names the joint vector after the symbols, as model code allows', () => {
    expect(linkedSetName(['bursts', 'repair-time', '2nd'])).toBe('joint_bursts_repair_time_q_2nd')
  })
})
