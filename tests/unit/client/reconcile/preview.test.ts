import { describe, expect, it } from 'vitest'
import { combine, summarise } from '@shared/elicitation/reconcile'
import { computePreview, liveCooke, type PreviewInput } from '@/reconcile/preview'
import { expert, viewFixture } from './fixture'

function input(changes: Partial<PreviewInput> = {}): PreviewInput {
  const v = viewFixture()
  return {
    method: 'linear', experts: v.experts, excluded: [], weightsMode: 'equal', customWeights: {}, cutoff: 0,
    calibration: v.calibration, consensus: [], support: { kind: 'real' }, ...changes,
  }
}
const components = () => viewFixture().experts.map((e) => ({ expertId: e.expertId, label: e.label, distribution: e.distribution }))

describe('live preview of the combination', () => {
  it('pools with equal weights: the linear pool of N(10,2²) and N(14,3²) (POOL-linear-2)', () => {
    const p = computePreview(input())
    expect(p.weights).toEqual([0.5, 0.5])
    expect(p.summary!.q50).toBeCloseTo(11.6, 6)
    expect(p.summary!.q05).toBeCloseTo(7.28598745543, 6)
    expect(p.summary!.q95).toBeCloseTo(17.8454032129, 6)
    expect(p.summary!.sd).toBeCloseTo(3.2403703492, 5)
    expect(p.fits.map((f) => f.distribution.family).sort()).toEqual(['normal', 'student-t', 'uniform'])
  })

  it('uses Cooke performance weights computed in the browser, equal to shared combine() with those weights (COOKE-worked-example)', () => {
    const p = computePreview(input({ weightsMode: 'performance' }))
    expect(p.weights[0]).toBeCloseTo(0.957753869124, 9)
    expect(p.weights[1]).toBeCloseTo(0.0422461308765, 9)
    expect(p.summary).toEqual(summarise(combine('linear', components(), p.weights)))
    const log = computePreview(input({ method: 'logarithmic', weightsMode: 'performance' }))
    expect(log.summary).toEqual(summarise(combine('logarithmic', components(), log.weights)))
  })

  it('shows the effect of the cutoff at once: at α = 0.05 expert B gets no weight', () => {
    const cooke = liveCooke(viewFixture().calibration, viewFixture().experts, 0.05)
    expect(cooke.scores!.map((s) => s.normalizedWeight)).toEqual([1, 0])
    const p = computePreview(input({ weightsMode: 'performance', cutoff: 0.05 }))
    expect(p.weights).toEqual([1, 0])
    expect(p.summary!.q50).toBeCloseTo(10, 6)
    const none = computePreview(input({ weightsMode: 'performance', cutoff: 0.9 }))
    expect(none.problems.weights).toBe('No expert passes the calibration cutoff; lower it or use equal weights')
    expect(none.summary).toBeNull()
  })

  it('names an expert with a malformed calibration answer by their study label, never by a database id', () => {
    const v = viewFixture()
    const crossed = v.calibration.assessments.map((a) => (a.id === '4' ? { ...a, assessments: a.assessments.map((q, i) => (i === 2 ? [q[2], q[1], q[0]] : q)) } : a))
    const cooke = liveCooke({ ...v.calibration, assessments: crossed }, v.experts, 0)
    expect(cooke.scores).toBeNull()
    expect(cooke.problem).toBe('Expert 2, question 3: quantile values must increase.')
  })

  it('normalises weights set by hand, and refuses all-zero weights', () => {
    const p = computePreview(input({ weightsMode: 'custom', customWeights: { 3: 3, 4: 1 } }))
    expect(p.weights).toEqual([0.75, 0.25])
    expect(p.summary).toEqual(summarise(combine('linear', components(), [0.75, 0.25])))
    expect(computePreview(input({ weightsMode: 'custom', customWeights: { 3: 0, 4: 0 } })).problems.weights).toBe('At least one weight must be above 0')
  })

  it('leaves switched-off experts out, and moves the pool without each expert in turn (three or more)', () => {
    const three = [...viewFixture().experts, expert(5, 'Expert 3', 'Rafael Duarte', { family: 'normal', mu: 30, sigma: 2 })]
    const p = computePreview(input({ experts: three, calibration: { ...viewFixture().calibration, questionCount: 0 } }))
    expect(p.leaveOneOut.map((r) => r.label)).toEqual(['Expert 1', 'Expert 2', 'Expert 3'])
    const withoutC = p.leaveOneOut[2]
    expect(withoutC.q50).toBeCloseTo(11.6, 6)
    expect(withoutC.medianShift).toBeLessThan(0)
    // N(10, 2²) and N(30, 2²): 90 % intervals 6.7–13.3 and 26.7–33.3 do not overlap.
    expect(p.disagreements).toEqual([{ a: 'Expert 1', b: 'Expert 3' }, { a: 'Expert 2', b: 'Expert 3' }])
    const off = computePreview(input({ experts: three, excluded: [5] }))
    expect(off.included.map((e) => e.expertId)).toEqual([3, 4])
    expect(off.disagreements).toEqual([])
    expect(off.leaveOneOut).toEqual([])
  })

  it('asks to save before performance weights can include an expert the server left out', () => {
    const v = viewFixture()
    const calibration = { ...v.calibration, assessments: v.calibration.assessments.slice(0, 1) }
    const p = computePreview(input({ weightsMode: 'performance', calibration }))
    expect(p.problems.weights).toMatch(/computed when you save/)
  })

  it('fits an agreed consensus like an answer and warns when it is narrower than the spread of the medians', () => {
    const p = computePreview(input({
      method: 'consensus',
      consensus: [{ value: 11.5, prob: 0.25 }, { value: 12, prob: 0.5 }, { value: 12.5, prob: 0.75 }, { value: null, prob: 0.95 }],
    }))
    expect(p.fits[0].distribution.family).toBe('normal')
    expect(p.summary!.q50).toBeCloseTo(12, 6)
    // 90 % interval about 11.2–12.8, narrower than the medians' spread 10 to 14.
    expect(p.consensusCheck).toMatchObject({ narrow: true })
    expect(p.consensusCheck!.spread).toBeCloseTo(4, 9)
    const wide = computePreview(input({ method: 'consensus', consensus: [{ value: 11, prob: 0.25 }, { value: 12, prob: 0.5 }, { value: 13, prob: 0.75 }] }))
    expect(wide.consensusCheck!.narrow).toBe(false)
    expect(computePreview(input({ method: 'consensus', consensus: [{ value: 12, prob: 0.5 }] })).problems.consensus).toMatch(/at least two/)
  })
})
