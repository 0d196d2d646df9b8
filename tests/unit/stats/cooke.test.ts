import { describe, expect, it } from 'vitest'
import { cookeClassical, decisionMaker, EngineInputError, type CookeInput } from '@shared/stats'
import { check, expectRel } from './checks'

// The panel is CONSTRUCTED for these checks (two invented experts, ten invented calibration questions): it is not the
// worked example of any publication. Formulas: Cooke (1991) Experts in Uncertainty, ch. 12; Cooke & Goossens (2008) RESS
// 93:657–674; intrinsic range with 10 % overshoot as in Blischke & Murthy (eds., 2003) §15.3.2 (docs/methods/cooke.md).
// Outside check: the expected values come from an independent Python implementation of the classical model
// (cooke_case in fixtures/generate_checks.py, mpmath at 40 digits), with the calibration cross-checked by scipy's chi2.sf
// and the decision maker's quantiles by scipy's brentq; it shares no code with shared/stats/cooke.ts.
describe("Cooke's classical model on a constructed two-expert panel (COOKE-worked-example, independent Python implementation)", () => {
  const c = check('COOKE-worked-example')
  const quantiles = [0.05, 0.5, 0.95]
  const q = c.inputs.quantiles_q5_q50_q95 as Record<string, number[][]>
  const input = (cutoff: number): CookeInput => ({
    quantiles,
    experts: Object.entries(q).map(([id, assessments], i) => ({ id, label: `Expert ${i + 1}`, assessments: assessments.map((a) => [...a]) })),
    realizations: c.inputs.realisations,
    overshoot: c.inputs.overshoot,
    cutoff,
  })
  const tol = c.tolerance.rel

  it('bins, statistic 2N·I(s, p), calibration, mean information and C × I for each expert', () => {
    const r = cookeClassical(input(0))
    for (const e of r.experts) {
      const exp = c.expected[e.id]
      expect(e.binCounts).toEqual(exp.counts)
      expectRel(e.statistic, exp.stat_2NI, tol, `${e.id} statistic`)
      expectRel(e.calibration, exp.calibration, tol, `${e.id} calibration`)
      expectRel(e.information, exp.information_mean, tol, `${e.id} information`)
      expectRel(e.weight, exp.unnormalised_weight, tol, `${e.id} weight`)
    }
  })

  it('per-question intrinsic ranges with overshoot and information scores', () => {
    const r = cookeClassical(input(0))
    c.expected.per_question.forEach((row: Record<string, number>, i: number) => {
      expectRel(r.ranges[i].lower, row.Lstar, 1e-12, `L* q${row.q}`)
      expectRel(r.ranges[i].upper, row.Ustar, 1e-12, `U* q${row.q}`)
      expectRel(r.experts[0].informationByQuestion[i], row.info_A, tol, `I_A q${row.q}`)
      expectRel(r.experts[1].informationByQuestion[i], row.info_B, tol, `I_B q${row.q}`)
    })
  })

  it('normalised weights with cutoff α = 0 and α = 0.05 (B falls below the cutoff)', () => {
    const w0 = cookeClassical(input(0)).experts
    expectRel(w0[0].normalizedWeight, c.expected.normalised_weights_alpha_0.A, tol)
    expectRel(w0[1].normalizedWeight, c.expected.normalised_weights_alpha_0.B, tol)
    const w5 = cookeClassical(input(0.05)).experts
    expect(w5.map((e) => e.normalizedWeight)).toEqual([1, 0])
  })

  it('decision maker for question 1: linear pool of the minimum-information distributions, α = 0 weights', () => {
    const r = cookeClassical(input(0))
    const dm = decisionMaker(
      quantiles,
      [q.A[0], q.B[0]],
      r.experts.map((e) => e.normalizedWeight),
      r.ranges[0],
    )
    for (const [p, v] of Object.entries(c.expected.DM_Q1_alpha_0_quantiles as Record<string, number>)) expectRel(dm.quantile(Number(p)), v, tol, `DM q${p}`)
  })

  it('closed-form check of A: I(s, p) = 0.2 ln 2 + 0.8 ln(8/9)', () => {
    const r = cookeClassical(input(0))
    expectRel(r.experts[0].statistic / 20, 0.2 * Math.log(2) + 0.8 * Math.log(8 / 9), 1e-13)
  })

  it('rejects malformed assessments, naming the expert by the label the caller gives, never by its id', () => {
    const bad = input(0)
    bad.experts[1].assessments[2] = [12, 6, 2]
    expect(() => cookeClassical(bad)).toThrow(EngineInputError)
    expect(() => cookeClassical(bad)).toThrow(/^Expert 2, question 3: quantile values must increase\.$/)
    expect(() => cookeClassical({ ...input(0), realizations: [1, 2] })).toThrow(/one assessment per calibration question/)
  })
})
