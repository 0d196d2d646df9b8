import { describe, expect, it } from 'vitest'
import { fitAnswer, plausibleRange } from '@shared/elicitation/answers'
import { PLAUSIBLE_BOUND_PROB } from '@shared/elicitation/bounds'
import { BOUND_WEIGHT, chosenFit, criterionPoints, judgeFit, MAX_OUTSIDE_SHARE, NEAR_TIE, orderFits } from '@shared/elicitation/fits'
import { cdf, pdf, sf, sumSquaredError, type Distribution, type FitResult, type Support } from '@shared/stats'

const quartiles = (q: number[]) => q.map((value, i) => ({ value, prob: [0.25, 0.5, 0.75][i] }))
const quantileAnswer = (lower: number, upper: number, q: number[], support: Support) =>
  fitAnswer({ method: 'quantile' }, { lower, upper, points: quartiles(q) }, support)

/** The issue's answer (bounds 5 and 25, quartiles 8 / 10 / 12) and its mirror image x → 30 − x, on every support that holds them. */
const SUPPORTS: Support[] = [{ kind: 'real' }, { kind: 'positive' }, { kind: 'bounded', lower: 0, upper: 30 }, { kind: 'bounded', lower: 5, upper: 25 }]
const CASES = [
  { name: 'long upper tail (bounds 5 and 25, quartiles 8 / 10 / 12)', q: [8, 10, 12], tail: (d: Distribution) => sf(d, 14) },
  { name: 'mirror: long lower tail (bounds 5 and 25, quartiles 18 / 20 / 22)', q: [18, 20, 22], tail: (d: Distribution) => cdf(d, 16) },
]

describe('the default fit never contradicts the plausible bounds (issue case and its mirror; constructed cases)', () => {
  for (const c of CASES) {
    for (const support of SUPPORTS) {
      it(`${c.name}, ${support.kind}${support.kind === 'bounded' ? ` [${support.lower}, ${support.upper}]` : ''}`, () => {
        const { fits } = quantileAnswer(5, 25, c.q, support)
        const d = fits[0].distribution
        expect(d.family).not.toBe('uniform')
        // On the support [5, 25] itself the ends are the quantity's own limits, where a scaled beta's density may vanish.
        const [from, to] = support.kind === 'bounded' && support.lower === 5 ? [5.25, 24.75] : [5, 25]
        for (let x = from; x <= to; x += 0.25) expect(pdf(d, x), `density at ${x}`).toBeGreaterThan(0)
        expect(c.tail(d)).toBeGreaterThanOrEqual(0.05)
        expect(cdf(d, 5) + sf(d, 25)).toBeLessThanOrEqual(MAX_OUTSIDE_SHARE)
        expect(fits[0].contradicts).toBe(false)
        const box = fits.find((f) => f.distribution.family === 'uniform')!
        expect(box.contradicts).toBe(true)
        expect(fits.at(-1)).toBe(box)
      })
    }
  }

  it('the uniform stays selectable and says in plain words what it contradicts', () => {
    const { fits } = quantileAnswer(5, 25, [8, 10, 12], { kind: 'positive' })
    const box = fits.find((f) => f.distribution.family === 'uniform')!
    expect(box.distribution).toMatchObject({ lower: expect.closeTo(6, 9), upper: expect.closeTo(14, 9) })
    expect(box.warnings).toContain('This shape says values above 14 are impossible, but you said 25 is plausible.')
    expect(box.warnings).toContain('This shape says values below 6 are impossible, but you said 5 is plausible.')
    expect(fits[0].warnings).toEqual([])
  })
})

describe('the bounds enter the criterion (tool convention: 1 % / 99 % points at weight 1/2)', () => {
  it('adds the bounds as the PLAUSIBLE_BOUND_PROB points with BOUND_WEIGHT, the quantiles at weight 1', () => {
    const c = criterionPoints(quartiles([8, 10, 12]), { lower: 5, upper: 25, source: 'bounds' }, { kind: 'real' })
    expect(c.points).toEqual([{ value: 5, prob: PLAUSIBLE_BOUND_PROB }, ...quartiles([8, 10, 12]), { value: 25, prob: 1 - PLAUSIBLE_BOUND_PROB }])
    expect(c.weights).toEqual([BOUND_WEIGHT, 1, 1, 1, BOUND_WEIGHT])
    expect(BOUND_WEIGHT).toBe(0.5)
    expect(PLAUSIBLE_BOUND_PROB).toBe(0.01)
  })

  it('leaves out a bound on the edge of the support, and bins (no separate bounds) add no points', () => {
    expect(criterionPoints(quartiles([8, 10, 12]), { lower: 0, upper: 25, source: 'bounds' }, { kind: 'positive' }).weights).toEqual([1, 1, 1, BOUND_WEIGHT])
    expect(criterionPoints(quartiles([0.2, 0.3, 0.4]), { lower: 0, upper: 1, source: 'bounds' }, { kind: 'proportion' })).toEqual({ points: quartiles([0.2, 0.3, 0.4]) })
    expect(criterionPoints(quartiles([8, 10, 12]), { lower: 5, upper: 25, source: 'bins' }, { kind: 'real' }).weights).toBeUndefined()
  })

  it('the stored criterion is the weighted sum over quantiles and bounds', () => {
    const { fits } = quantileAnswer(5, 25, [8, 10, 12], { kind: 'real' })
    const c = criterionPoints(quartiles([8, 10, 12]), { lower: 5, upper: 25, source: 'bounds' }, { kind: 'real' })
    for (const f of fits) expect(f.sse).toBeCloseTo(sumSquaredError(f.distribution, c.points, c.weights), 15)
  })

  it('moving a bound moves the fit (the old fit ignored the bounds)', () => {
    const near = quantileAnswer(5, 16, [8, 10, 12], { kind: 'real' }).fits.find((f) => f.distribution.family === 'normal')!
    const far = quantileAnswer(5, 40, [8, 10, 12], { kind: 'real' }).fits.find((f) => f.distribution.family === 'normal')!
    expect(far.distribution).not.toEqual(near.distribution)
    expect((far.distribution as { sigma: number }).sigma).toBeGreaterThan((near.distribution as { sigma: number }).sigma)
  })
})

describe('the default-fit rule (constructed cases)', () => {
  const fit = (distribution: Distribution, sse: number): FitResult => ({ distribution, sse })
  const range = { lower: 0, upper: 10, source: 'bounds' } as const

  it('a uniform that spans the plausible range and fits clearly better than any smooth family is the default', () => {
    const { fits } = quantileAnswer(0, 100, [25, 50, 75], { kind: 'real' })
    expect(fits[0].distribution.family).toBe('uniform')
    expect(fits[0].contradicts).toBe(false)
    expect(fits[1].sse - fits[0].sse).toBeGreaterThan(NEAR_TIE)
  })

  it('near-ties (criterion within NEAR_TIE) go to the smooth family; beyond it, to the better fit', () => {
    const box = fit({ family: 'uniform', lower: -0.2, upper: 10.2 }, 0.0001)
    const bell = (sse: number) => fit({ family: 'normal', mu: 5, sigma: 2 }, sse)
    expect(orderFits([box, bell(0.0001 + NEAR_TIE * 0.9)], range)[0].distribution.family).toBe('normal')
    expect(orderFits([box, bell(0.0001 + NEAR_TIE * 1.1)], range)[0].distribution.family).toBe('uniform')
  })

  it('more than MAX_OUTSIDE_SHARE outside the range is never the default, and says how much', () => {
    const wide = fit({ family: 'normal', mu: 5, sigma: 3.5 }, 0)
    const ok = fit({ family: 'normal', mu: 5, sigma: 2.4 }, 0.01)
    expect(cdf(wide.distribution, 0) + sf(wide.distribution, 10)).toBeGreaterThan(MAX_OUTSIDE_SHARE)
    const ordered = orderFits([wide, ok], range)
    expect(ordered.map((f) => f.contradicts)).toEqual([false, true])
    expect(ordered[1].warnings[0]).toBe('This shape gives a 15 % chance of a value outside 0 to 10, although you would be very surprised by such a value.')
  })

  it('warns when a smooth shape leaves part of the range with almost no chance', () => {
    const j = judgeFit({ family: 'normal', mu: 20, sigma: 1.5 }, { lower: 5, upper: 25, source: 'bounds' })
    expect(j.gap).toBe(false)
    expect(j.warnings).toEqual(['This shape gives values below 14.4 almost no chance (under 1 in 10,000), but you said 5 is plausible.'])
  })

  it('chips and intervals: the range is the span of the bins that hold probability', () => {
    expect(plausibleRange({ method: 'chip-grid', edges: [0, 1, 2, 3, 4, 6], chips: 10 }, { chips: [0, 2, 5, 3, 0] })).toEqual({ lower: 1, upper: 4, source: 'bins' })
    expect(plausibleRange({ method: 'fixed-interval', edges: [10, 20] }, { probs: [0.25, 0.5, 0.25] })).toEqual({ lower: null, upper: null, source: 'bins' })
    expect(plausibleRange({ method: 'fixed-interval', edges: [10, 20] }, { probs: [0, 0.5, 0.5] })).toEqual({ lower: 10, upper: null, source: 'bins' })
    const { fits } = fitAnswer({ method: 'chip-grid', edges: [0, 2, 4, 6, 8, 10], chips: 10 }, { edges: [0, 2, 4, 6, 8, 10], chips: [1, 2, 4, 2, 1] }, { kind: 'real' })
    const box = fits.find((f) => f.distribution.family === 'uniform')!
    expect(box.contradicts).toBe(true)
    expect(box.warnings[0]).toMatch(/^This shape says values (above|below) [\d.]+ are impossible, but your answer gives some chance to values (up|down) to (10|0)\.$/)
    expect(fits[0].distribution.family).not.toBe('uniform')
  })
})

describe('the fit shown for an expert (Priorsmith convention: the chosen family, else the best; constructed cases)', () => {
  const fits = [
    { distribution: { family: 'gamma' as const, shape: 4, rate: 2 }, sse: 1e-4 },
    { distribution: { family: 'lognormal' as const, mu: 0.6, sigma: 0.5 }, sse: 3e-4 },
  ]
  it('takes the family the expert chose', () => {
    expect(chosenFit(fits, 'lognormal')).toBe(fits[1])
  })
  it('falls back to the best (first) fit when nothing was chosen or the chosen family was not fitted', () => {
    expect(chosenFit(fits, null)).toBe(fits[0])
    expect(chosenFit(fits, undefined)).toBe(fits[0])
    expect(chosenFit(fits, 'beta')).toBe(fits[0])
  })
  it('gives null when nothing was fitted', () => {
    expect(chosenFit([], 'gamma')).toBeNull()
  })
})
