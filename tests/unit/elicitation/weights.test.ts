import { describe, expect, it } from 'vitest'
import { MIN_SEED_QUESTIONS, MIN_WEIGHTED_EXPERTS, performanceWeightCautions } from '@shared/elicitation/weights'

describe('cautions on performance weights (minimums: 10 seed questions, common practice; 4 experts, tool convention)', () => {
  it('states the minimums', () => {
    expect(MIN_SEED_QUESTIONS).toBe(10)
    expect(MIN_WEIGHTED_EXPERTS).toBe(4)
  })

  it('cautions below either minimum and not at or above it', () => {
    expect(performanceWeightCautions(10, 4)).toEqual([])
    expect(performanceWeightCautions(15, 13)).toEqual([])
    expect(performanceWeightCautions(9, 4)).toHaveLength(1)
    expect(performanceWeightCautions(10, 3)).toHaveLength(1)
    const both = performanceWeightCautions(4, 2)
    expect(both).toHaveLength(2)
    expect(both[0]).toMatch(/^Performance weights here rest on 4 calibration questions; common practice asks for at least 10\./)
    expect(both[1]).toMatch(/^Performance weights here compare 2 experts; this tool asks for at least 4 /)
    expect(performanceWeightCautions(1, 1)[0]).toMatch(/rest on 1 calibration question;/)
  })
})
