import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { fitAnswer } from '@shared/elicitation/answers'
import { PLAUSIBLE_BOUND_PROB } from '@shared/elicitation/bounds'
import { BOUND_WEIGHT, criterionPoints, MAX_OUTSIDE_SHARE } from '@shared/elicitation/fits'
import { DEFAULT_T_DF, type Distribution, type Point, type Support } from '@shared/stats'
import { expectRel } from './checks'

// Reference: scipy 1.17 (scipy.optimize.least_squares, MINPACK Levenberg–Marquardt, and Nelder–Mead for the uniform)
// fitting the same answers under the documented criterion (docs/methods/fitting.md), written by the committed
// generator tests/unit/stats/fixtures/generate_bounded_fits.py, which records the library versions in the fixture.
interface Case {
  id: string
  support: Support
  lower: number
  upper: number
  points: Point[]
  criterionPoints: (Point & { weight: number })[]
  fits: { family: string; params: Record<string, number>; criterion: number; outside: number }[]
}
const FIXTURE = JSON.parse(readFileSync(resolve(__dirname, 'fixtures/bounded-fits.json'), 'utf8')) as {
  versions: Record<string, string>
  convention: { boundProb: number; boundWeight: number; studentTDf: number }
  cases: Case[]
}

const paramsOf = (d: Distribution): Record<string, number> => {
  const { family: _family, ...rest } = d as Distribution & Record<string, number>
  return Object.fromEntries(Object.entries(rest).filter(([k]) => !['df', ...(d.family === 'scaled-beta' ? ['lower', 'upper'] : [])].includes(k))) as Record<string, number>
}

describe('fits with plausible bounds against scipy (fixtures/bounded-fits.json)', () => {
  it('the fixture was made under the same convention as the engine (scipy generator)', () => {
    expect(FIXTURE.versions.scipy).toMatch(/^\d+\.\d+/)
    expect(FIXTURE.convention).toEqual({ boundProb: PLAUSIBLE_BOUND_PROB, boundWeight: BOUND_WEIGHT, studentTDf: DEFAULT_T_DF })
    expect(FIXTURE.cases.length).toBeGreaterThanOrEqual(10)
  })

  for (const c of FIXTURE.cases) {
    describe(c.id, () => {
      const { fits } = fitAnswer({ method: 'quantile', askTails: c.points.length === 5 }, { lower: c.lower, upper: c.upper, points: c.points }, c.support)

      it('criterion points and weights as scipy used them', () => {
        const mine = criterionPoints(c.points, { lower: c.lower, upper: c.upper, source: 'bounds' }, c.support)
        expect(mine.points.map((p, i) => ({ ...p, weight: mine.weights?.[i] ?? 1 }))).toEqual(c.criterionPoints)
      })

      for (const ref of c.fits) {
        it(`${ref.family}: parameters to 1e-6 relative and criterion to 1e-7 relative of scipy's`, () => {
          const fit = fits.find((f) => f.distribution.family === ref.family)!
          expect(fit, ref.family).toBeDefined()
          const got = paramsOf(fit.distribution)
          expect(Object.keys(got).sort()).toEqual(Object.keys(ref.params).sort())
          // scipy's Nelder–Mead uniform is only as exact as its simplex; the engine's active-set uniform is never worse.
          if (ref.family === 'uniform') expect(fit.sse).toBeLessThanOrEqual(ref.criterion * (1 + 1e-9) + 1e-15)
          else expectRel(fit.sse, ref.criterion, 1e-7, `${c.id} ${ref.family} criterion (scipy)`)
          for (const [k, v] of Object.entries(ref.params)) {
            if (Math.abs(v) < 1e-9) expect(Math.abs(got[k]), `${k} (scipy)`).toBeLessThan(1e-7)
            else expectRel(got[k], v, 1e-6, `${c.id} ${ref.family} ${k} (scipy)`)
          }
          if (ref.outside < 1e-12) expect(fit.outside!).toBeLessThan(1e-9)
          else expectRel(fit.outside!, ref.outside, 1e-5, `${c.id} ${ref.family} outside share (scipy)`)
        })
      }

      it('the default is the lowest-criterion family that the scipy fits show within the range rule', () => {
        const fine = c.fits.filter((f) => f.outside <= MAX_OUTSIDE_SHARE && fits.find((g) => g.distribution.family === f.family)!.warnings.every((w) => !w.includes('impossible')))
        expect(fine.length).toBeGreaterThan(0)
        expect(fine.map((f) => f.family)).toContain(fits[0].distribution.family)
        expect(fits[0].contradicts).toBe(false)
      })
    })
  }
})
