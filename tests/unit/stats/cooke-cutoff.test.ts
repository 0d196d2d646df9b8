import { describe, expect, it } from 'vitest'
import { EngineInputError, optimisedCutoff, type CookeInput } from '@shared/stats'
import fx from './fixtures/cooke-cutoff.json'

const rel = (got: number, want: number) => Math.abs(got - want) / Math.abs(want)

// The panel is CONSTRUCTED (three invented experts, ten invented calibration questions). Outside check: cooke-cutoff.json,
// written by generate_cooke_cutoff.py, an independent mpmath implementation of the classical model and its optimised
// decision maker (Cooke 1991, Experts in Uncertainty, ch. 12; Cooke & Goossens 2008), calibration cross-checked by scipy.
describe("Cooke's optimised cutoff on a constructed three-expert panel", () => {
  const input: CookeInput = {
    quantiles: fx.quantiles,
    experts: Object.entries(fx.panel).map(([id, assessments], i) => ({ id, label: `Expert ${String.fromCharCode(65 + i)}`, assessments })),
    realizations: fx.realizations,
    overshoot: fx.overshoot,
  }

  it('tries every expert calibration score as the cutoff and scores the decision maker at each', () => {
    const { candidates } = optimisedCutoff(input)
    expect(candidates).toHaveLength(fx.candidates.length)
    candidates.forEach((c, i) => {
      const want = fx.candidates[i]
      expect(rel(c.cutoff, want.cutoff)).toBeLessThan(1e-12)
      expect(c.expertIds).toEqual(want.experts)
      expect(c.binCounts).toEqual(want.counts)
      expect(rel(c.calibration, want.calibration)).toBeLessThan(1e-9)
      expect(rel(c.information, want.information)).toBeLessThan(1e-9)
      expect(rel(c.score, want.score)).toBeLessThan(1e-9)
    })
  })

  it('chooses the cutoff with the largest calibration × information (here only the best-calibrated expert is kept)', () => {
    const { best } = optimisedCutoff(input)
    expect(rel(best.cutoff, fx.best.cutoff)).toBeLessThan(1e-12)
    expect(best.expertIds).toEqual(fx.best.experts)
    expect(best.cutoff).toBeGreaterThan(0)
  })

  it('checks its input like the classical model', () => {
    expect(() => optimisedCutoff({ ...input, realizations: [] })).toThrow(EngineInputError)
  })
})
