import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { cdf, fitDistribution, quantile, sumSquaredError, type Distribution, type Family, type FitOptions, type Point } from '@shared/stats'
import { gammaPShapeDerivatives } from '@shared/stats/gamma-shape'
import { expectRel } from './checks'

// Reference: scipy 1.17 least_squares (MINPACK Levenberg–Marquardt, tolerances 1e-15) from hundreds of starting points
// per case, the best refined to a zero of the gradient with mpmath at 40 digits; the uniform by bounded scalar
// minimisation on every interval between two points. Written by the committed generator
// tests/unit/stats/fixtures/generate_hard_fits.py, which records the library versions in the fixture.
interface Case {
  id: string
  family: Family
  why: string
  options: FitOptions
  points: Point[]
  expected: { params: Record<string, number>; sse: number }
  otherLocalMinima?: { sse: number; params: Record<string, number> }[]
}
const FIXTURE = JSON.parse(readFileSync(resolve(__dirname, 'fixtures/hard-fits.json'), 'utf8')) as {
  versions: Record<string, string>
  cases: Case[]
  shapeDerivatives: { shape: number; x: number; p: number; dp: number; d2p: number }[]
}

const paramsOf = (d: Distribution): Record<string, number> => {
  const { family: _family, ...rest } = d as Distribution & Record<string, number>
  return rest
}

const reference = (c: Case): Distribution => ({ family: c.family, ...c.options, ...c.expected.params }) as unknown as Distribution

describe('hard judgements against scipy and mpmath (fixtures/hard-fits.json)', () => {
  it('the fixture records the libraries it was made with', () => {
    expect(FIXTURE.versions.scipy).toMatch(/^\d+\.\d+/)
    expect(FIXTURE.versions.mpmath).toMatch(/^\d+\.\d+/)
    expect(FIXTURE.cases.length).toBeGreaterThanOrEqual(20)
  })

  for (const c of FIXTURE.cases) {
    it(`${c.id} (${c.why}): the global minimum — parameters to 1e-7, the criterion no worse than the reference's`, () => {
      const fit = fitDistribution(c.points, c.family, c.options)
      const got = paramsOf(fit.distribution)
      for (const [k, v] of Object.entries(c.expected.params)) expectRel(got[k], v, 1e-7, `${c.id} ${k} (scipy + mpmath)`)
      // the reference parameters rounded to doubles, evaluated by the engine: a fit in a large unit can be no better
      const atReference = sumSquaredError(reference(c), c.points)
      expect(fit.sse, `${c.id} criterion`).toBeLessThanOrEqual(atReference * (1 + 1e-9) + 1e-18)
      expectRel(fit.sse, c.expected.sse, 1e-6, `${c.id} criterion (mpmath)`)
      for (const local of c.otherLocalMinima ?? []) expect(fit.sse).toBeLessThan(local.sse)
    })
  }

  it('the issue cases: normal σ ≈ 1.9e15 with SSE ≈ 0.0016, a finite Student-t scale, gamma shape 0.777 with SSE 0.010', () => {
    const q = [1e15, 2e15, 3.5e15].map((value, i) => ({ value, prob: [0.25, 0.5, 0.75][i] }))
    const normal = fitDistribution(q, 'normal')
    expect((normal.distribution as { sigma: number }).sigma).toBeGreaterThan(1.8e15)
    expect((normal.distribution as { sigma: number }).sigma).toBeLessThan(1.9e15)
    expect(normal.sse).toBeLessThan(0.0017)
    const t = fitDistribution(q, 'student-t', { df: 30 }).distribution as { sigma: number }
    expect(Number.isFinite(t.sigma) && t.sigma > 1e15 && t.sigma < 2e15).toBe(true)
    const spread = fitDistribution([{ value: 1e-6, prob: 0.1 }, { value: 1e-5, prob: 0.5 }, { value: 1e-3, prob: 0.9 }], 'gamma')
    expect((spread.distribution as { shape: number }).shape).toBeCloseTo(0.777, 3)
    expect(spread.sse).toBeLessThan(0.0101)
  })
})

describe('shape derivatives of the regularised incomplete gamma function (mpmath, fixtures/hard-fits.json)', () => {
  const out = new Float64Array(4)
  for (const r of FIXTURE.shapeDerivatives) {
    // below the mode beyond a shape of 1e7 the engine differences P (five-point Richardson): the first derivative to ~1e-9,
    // the second to ~1e-5
    const [first, second] = r.shape > 1e7 ? [1e-8, 1e-4] : [1e-10, 1e-8]
    it(`a = ${r.shape}, x = ${r.x}: P, ∂P/∂a (${first}) and ∂²P/∂a² (${second})`, () => {
      gammaPShapeDerivatives(r.shape, r.x, out)
      expect(Math.abs(out[0] - r.p)).toBeLessThan(1e-14)
      expectRel(out[1], r.dp, first, 'dP/da')
      expectRel(out[2], r.d2p, second, 'd²P/da²')
    })
  }
})

// Property: the same judgement in another unit (×1e-9 … ×1e12, and shifted for families with a location) is fitted by
// the same distribution up to that change of unit, with the same criterion.
describe('fits do not depend on the unit (fast-check)', () => {
  const FIVE = [0.05, 0.25, 0.5, 0.75, 0.95]
  type Unit = { k: number; c: number }
  /** The distribution a change of unit x → k·x + c turns d into. */
  const inUnit = (d: Distribution, { k, c }: Unit): Distribution => {
    switch (d.family) {
      case 'normal':
      case 'student-t':
        return { ...d, mu: k * d.mu + c, sigma: k * d.sigma }
      case 'lognormal':
        return { ...d, meanlog: d.meanlog + Math.log(k) }
      case 'gamma':
        return { ...d, rate: d.rate / k }
      case 'scaled-beta':
      case 'uniform':
        return { ...d, lower: k * d.lower + c, upper: k * d.upper + c }
      case 'beta':
        return d
    }
  }
  const optionsIn = (o: FitOptions, { k, c }: Unit): FitOptions => ({
    ...o,
    lower: o.lower === undefined ? undefined : k * o.lower + c,
    upper: o.upper === undefined ? undefined : k * o.upper + c,
  })
  const SCALES = [1e-9, 1e-3, 1e3, 1e12]

  const judgement = fc.record({
    truth: fc.oneof(
      fc.record({ family: fc.constant('gamma' as const), shape: fc.double({ min: 0.2, max: 300, noNaN: true }), rate: fc.constant(1) }),
      fc.record({ family: fc.constant('lognormal' as const), meanlog: fc.constant(0), sdlog: fc.double({ min: 0.05, max: 3, noNaN: true }) }),
      fc.record({ family: fc.constant('beta' as const), alpha: fc.double({ min: 0.3, max: 40, noNaN: true }), beta: fc.double({ min: 0.3, max: 40, noNaN: true }) }),
    ),
    jitter: fc.array(fc.double({ min: -0.04, max: 0.04, noNaN: true }), { minLength: 5, maxLength: 5 }),
    count: fc.constantFrom(3, 4, 5),
  })

  /** Quantiles of a skewed distribution at jittered probabilities reported at the nominal ones (so the fit is not exact). */
  const pointsOf = (j: { truth: Distribution; jitter: number[]; count: number }): Point[] => {
    const probs = j.count === 3 ? [0.25, 0.5, 0.75] : j.count === 4 ? [0.1, 0.4, 0.6, 0.9] : FIVE
    const values = probs.map((p, i) => quantile(j.truth, Math.min(0.99, Math.max(0.01, p + j.jitter[i]))))
    for (let i = 1; i < values.length; i++) if (!(values[i] > values[i - 1])) values[i] = values[i - 1] * (1 + 1e-6) + 1e-9
    return values.map((value, i) => ({ value, prob: probs[i] }))
  }

  const sameFit = (family: Family, options: FitOptions, base: Point[], unit: Unit): void => {
    const a = fitDistribution(base, family, options)
    const moved = base.map((pt) => ({ value: unit.k * pt.value + unit.c, prob: pt.prob }))
    const b = fitDistribution(moved, family, optionsIn(options, unit))
    expect(Math.abs(b.sse - a.sse), `${family} ×${unit.k} +${unit.c}: SSE ${b.sse} vs ${a.sse}`).toBeLessThanOrEqual(1e-9 * a.sse + 1e-20)
    const want = paramsOf(inUnit(a.distribution, unit))
    const got = paramsOf(b.distribution)
    const spread = Math.abs(moved[moved.length - 1].value - moved[0].value)
    for (const [key, v] of Object.entries(want)) {
      const scale = ['mu', 'lower', 'upper'].includes(key) ? spread : key === 'meanlog' ? 1 : Math.abs(v)
      // a poor fit (a beta forced onto values crowded at one end of its range) lies in a flat valley of the criterion: double
      // precision cannot tell its points apart once the criterion agrees to 1e-9, and parameters along it differ by ~1e-8,
      // fitted probabilities by up to ~1e-8
      expect(Math.abs(got[key] - v), `${family} ×${unit.k} +${unit.c}: ${key} ${got[key]} vs ${v}`).toBeLessThanOrEqual(1e-6 * scale)
    }
    base.forEach((pt, i) =>
      expect(Math.abs(cdf(b.distribution, moved[i].value) - cdf(a.distribution, pt.value)), `${family} ×${unit.k}: F at point ${i}`).toBeLessThanOrEqual(1e-7),
    )
  }

  it('scale families (gamma, lognormal) and the beta scaled to a range: every unit from ×1e-9 to ×1e12', () => {
    fc.assert(
      fc.property(judgement, (j) => {
        const base = pointsOf(j as { truth: Distribution; jitter: number[]; count: number })
        const positive = j.truth.family !== 'beta'
        for (const k of SCALES) {
          if (positive) {
            sameFit('gamma', {}, base, { k, c: 0 })
            sameFit('lognormal', {}, base, { k, c: 0 })
          } else sameFit('scaled-beta', { lower: -0.05, upper: 1.05 }, base, { k, c: 0 })
        }
      }),
      { numRuns: 25, seed: 20261203 },
    )
  })

  it('location-scale families (normal, Student-t, uniform free or with a fixed end): every unit and shifts', () => {
    fc.assert(
      fc.property(judgement, fc.constantFrom(-1e3, 0, 50, 1e4), (j, shiftInSpreads) => {
        const base = pointsOf(j as { truth: Distribution; jitter: number[]; count: number })
        const spread = base[base.length - 1].value - base[0].value
        for (const k of SCALES) {
          const unit = { k, c: shiftInSpreads * spread * k }
          sameFit('normal', {}, base, unit)
          sameFit('student-t', { df: 3 }, base, unit)
          sameFit('student-t', { df: 30 }, base, unit)
          sameFit('uniform', {}, base, unit)
          sameFit('uniform', { lower: base[0].value - spread / 3 }, base, unit)
          sameFit('uniform', { upper: base[base.length - 1].value + spread / 5 }, base, unit)
        }
      }),
      { numRuns: 25, seed: 20261204 },
    )
  })
})
