import { describe, expect, it } from 'vitest'
import { niceAxis, niceStep } from '@shared/format/axis'

// Round axis ends: outward to multiples of a 1-2-5 step (common practice for axis ticks); values constructed by hand.
describe('niceAxis', () => {
  it('rounds the ends outward to the step: 1.8 to 28.7 becomes 0 to 30 by 5', () => {
    expect(niceAxis(1.8, 28.7)).toEqual({ min: 0, max: 30, step: 5 })
  })

  it('keeps ends already on the step and handles negative and small ranges without float tails', () => {
    expect(niceAxis(-10, 50)).toEqual({ min: -10, max: 50, step: 10 })
    expect(niceAxis(0.113, 0.387)).toEqual({ min: 0.1, max: 0.4, step: 0.05 })
    expect(niceAxis(-3.61, -0.42)).toEqual({ min: -4, max: 0, step: 1 })
    expect(niceAxis(1234, 1789)).toEqual({ min: 1200, max: 1800, step: 100 })
  })

  it('clips the rounded ends to the quantity’s possible values', () => {
    expect(niceAxis(0.013, 0.93, 6, 0, 1)).toEqual({ min: 0, max: 1, step: 0.2 })
    expect(niceAxis(0.31, 7.22, 6, 0.3, 7.25)).toEqual({ min: 0.3, max: 7.25, step: 2 })
  })

  it('gives about a unit-wide axis (to the next multiple of 0.2) around a single point or an empty range', () => {
    expect(niceAxis(5, 5)).toEqual({ min: 4.4, max: 5.6, step: 0.2 })
    expect(niceAxis(Number.NaN, Number.NaN)).toEqual({ min: -0.6, max: 0.6, step: 0.2 })
  })

  it('steps are 1, 2 or 5 times a power of ten', () => {
    expect([niceStep(3), niceStep(0.45), niceStep(12), niceStep(250), niceStep(26.9, 6)]).toEqual([1, 0.2, 5, 100, 5])
  })
})
