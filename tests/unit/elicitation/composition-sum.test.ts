import { describe, expect, it } from 'vitest'
import { compositionSumReading } from '../../../shared/elicitation/composition'

/** Values constructed for these checks (shares of Kestrel Valley households); the tolerance is Priorsmith's 0.05 convention. */
const shares = (...means: (number | null)[]) => means.map((mean, i) => ({ name: ['Join', 'Meter only', 'Decline'][i], mean }))

describe('compositionSumReading', () => {
  it('says the shares make up the whole when their means add up to 1', () => {
    const r = compositionSumReading(shares(0.3, 0.199, 0.5), { restLabel: null })
    expect(r.sum).toBeCloseTo(0.999, 12)
    expect(r).toMatchObject({ tone: 'fits', missing: [], message: 'Your shares add up to about 100 %: together they make up the whole, as they should.' })
  })

  it('within the tolerance, says the total is close enough and that the prior scales it a little', () => {
    const r = compositionSumReading(shares(0.35, 0.24, 0.45), { restLabel: null })
    expect(r).toMatchObject({ tone: 'fits', message: 'Your shares add up to about 104 %: close enough to the whole. The joint prior shrinks them a little, in proportion, so that they add up to exactly 100 %.' })
  })

  it('says how much too much, and what happens otherwise, above the whole', () => {
    const r = compositionSumReading(shares(0.4, 0.27, 0.45), { restLabel: null })
    expect(r.tone).toBe('check')
    expect(r.message).toBe('Your shares add up to about 112 %: together they claim about 12 % more than the whole. Lowering one or more shares makes them fit; otherwise the joint prior shrinks them all in proportion.')
  })

  it('tells 104 % apart from the tolerance edge: 105.5 % is past it and 104.9 % is not', () => {
    expect(compositionSumReading(shares(0.355, 0.2, 0.5), { restLabel: null }).tone).toBe('check')
    expect(compositionSumReading(shares(0.349, 0.2, 0.5), { restLabel: null }).tone).toBe('fits')
  })

  it('says how much is left to nobody below the whole', () => {
    const r = compositionSumReading(shares(0.2, 0.1, 0.5), { restLabel: null })
    expect(r).toMatchObject({ tone: 'check', message: expect.stringMatching(/^Your shares add up to about 80 %: together they leave about 20 % of the whole to nobody\./) })
  })

  it('with an "other" share, the rest goes to it, and a total at or above the whole leaves nothing for it', () => {
    expect(compositionSumReading(shares(0.3, 0.45), { restLabel: 'Other' })).toMatchObject({ tone: 'fits', message: 'Your shares add up to about 75 %, which leaves about 25 % for Other.' })
    expect(compositionSumReading(shares(0.6, 0.45), { restLabel: 'Other' })).toMatchObject({ tone: 'check', message: expect.stringContaining('that leaves nothing for Other') })
  })

  it('before every share is answered, gives the total so far and names those still to answer', () => {
    const r = compositionSumReading(shares(0.3, null, null), { restLabel: null })
    expect(r).toMatchObject({ sum: 0.3, missing: ['Meter only', 'Decline'], tone: 'waiting', message: 'Your shares so far add up to about 30 %, which leaves about 70 % for Meter only and Decline.' })
    expect(compositionSumReading(shares(0.7, 0.5, null), { restLabel: null })).toMatchObject({ tone: 'check', message: expect.stringContaining('already more than the whole, before Decline') })
    expect(compositionSumReading(shares(null, null, null), { restLabel: null })).toMatchObject({ sum: null, tone: 'waiting' })
  })
})
