import { describe, expect, it } from 'vitest'
import { bayesFactor, EngineInputError } from '@shared/stats'
import { check, expectRel } from './checks'

// Source: BF-scales of fixtures/checks.json — Kass & Raftery (1995) JASA 90:773–795, §3.2; Jeffreys (1961) Theory of Probability,
// 3rd ed., Appendix B; half-open intervals [lower, upper).
describe('Bayes factor labels (Kass & Raftery 1995; Jeffreys 1961)', () => {
  const c = check('BF-scales')
  const bfs = c.inputs.BF as number[]

  it('2 ln BF and log10 BF', () => {
    bfs.forEach((bf, i) => {
      const r = bayesFactor(Math.log(bf), 0)
      expectRel(r.twoLnBF, c.expected.two_ln_BF[i], c.tolerance.rel)
      expectRel(r.log10BF, c.expected.log10_BF[i], c.tolerance.rel)
      expectRel(Math.exp(r.logBF), bf, 1e-14)
    })
  })

  it('Kass–Raftery and Jeffreys categories; BF < 1 is labelled on 1/BF as favouring B', () => {
    const labels = bfs.map((bf) => bayesFactor(Math.log(bf), 0))
    expect(labels.slice(0, 4).map((r) => r.label)).toEqual(c.expected.kass_raftery.slice(0, 4))
    expect(labels.slice(0, 4).map((r) => r.jeffreys)).toEqual(c.expected.jeffreys_1961.slice(0, 4))
    const tenth = labels[4]
    expect(tenth.favours).toBe('B')
    expect(tenth.category).toBe(c.expected.kass_raftery_for_1_over_0_1)
    expect(tenth.label).toBe('positive (favours B)')
    expect(tenth.jeffreys).toBe('strong')
  })

  it('boundaries belong to the upper interval: 2 ln BF = 2, 6, 10 and BF = 1', () => {
    expect(bayesFactor(1, 0).label).toBe('positive')
    expect(bayesFactor(3, 0).label).toBe('strong')
    expect(bayesFactor(5, 0).label).toBe('very strong')
    expect(bayesFactor(0.999, 0).label).toBe('not worth more than a bare mention')
    expect(bayesFactor(-10, -10)).toMatchObject({ logBF: 0, favours: 'A', label: 'not worth more than a bare mention' })
    expect(bayesFactor(-12, -9).label).toBe('strong (favours B)')
  })

  // Constructed: every boundary of both scales, on both sides, for either model favoured. Intervals are [lower, upper): the
  // lower end is closed, so a value on a boundary takes the upper category; just below it (by more than the 1e-12 that
  // absorbs rounding) the lower one.
  it('Kass–Raftery and Jeffreys boundaries are closed below and open above, for A and for B', () => {
    const krBoundaries: [number, string, string][] = [[2, 'not worth more than a bare mention', 'positive'], [6, 'positive', 'strong'], [10, 'strong', 'very strong']]
    for (const [twoLn, below, at] of krBoundaries) {
      expect(bayesFactor(twoLn / 2, 0).category, `2 ln BF = ${twoLn}`).toBe(at)
      expect(bayesFactor(-twoLn / 2, 0).label, `2 ln BF = −${twoLn}`).toBe(`${at} (favours B)`)
      expect(bayesFactor(twoLn / 2 - 1e-9, 0).category, `2 ln BF just below ${twoLn}`).toBe(below)
      expect(bayesFactor(-(twoLn / 2 - 1e-9), 0).label).toBe(`${below} (favours B)`)
    }
    const jBoundaries: [number, string, string][] = [[0.5, 'barely worth mentioning', 'substantial'], [1, 'substantial', 'strong'], [1.5, 'strong', 'very strong'], [2, 'very strong', 'decisive']]
    for (const [log10, below, at] of jBoundaries) {
      expect(bayesFactor(log10 * Math.LN10, 0).jeffreys, `log10 BF = ${log10}`).toBe(at)
      expect(bayesFactor(-log10 * Math.LN10, 0).jeffreys, `log10 BF = −${log10}`).toBe(at)
      expect(bayesFactor((log10 - 1e-9) * Math.LN10, 0).jeffreys, `log10 BF just below ${log10}`).toBe(below)
    }
  })

  it('rejects non-finite evidence', () => {
    expect(() => bayesFactor(Number.NaN, 0)).toThrow(EngineInputError)
    expect(() => bayesFactor(0, -Infinity)).toThrow(EngineInputError)
  })
})
