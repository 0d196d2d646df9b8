import { describe, expect, it } from 'vitest'
import { defaultLinkWording, linkMeaning } from '../../../shared/elicitation/links'

describe('the default conditional question', () => {
  it('names the two quantities inside the sentence, the condition on the first', () => {
    expect(defaultLinkWording('Mains burst rate', 'Repair time')).toBe(
      'Suppose mains burst rate turned out above your middle value. How likely is it that repair time is also above yours?')
  })

  it('keeps abbreviations and codes as written, and trims stray spaces', () => {
    expect(defaultLinkWording('KV-07 pressure', '  UK leakage share ')).toBe(
      'Suppose KV-07 pressure turned out above your middle value. How likely is it that UK leakage share is also above yours?')
    expect(defaultLinkWording('pH at the works', 'Night flow')).toBe(
      'Suppose pH at the works turned out above your middle value. How likely is it that night flow is also above yours?')
  })
})

describe('what an answer to the link’s question means', () => {
  const meaning = (p: number) => linkMeaning(p, 'Mains burst rate', 'Repair time')

  it('reads 50 % as unrelated, with a correlation of 0', () => {
    expect(meaning(0.5)).toEqual({
      direction: 'unrelated', strength: 'none', correlation: 0,
      text: 'The two are unrelated in your view: learning that mains burst rate is high tells you nothing about repair time.',
    })
  })

  it('reads a chance within 2 points of 50 % as almost unrelated', () => {
    expect(meaning(0.51)).toMatchObject({ direction: 'unrelated', strength: 'none' })
    expect(meaning(0.49).text).toBe('The two are almost unrelated in your view: learning that mains burst rate is high tells you next to nothing about repair time.')
  })

  it.each([
    [0.55, 'weak', 'slightly'], [0.7, 'moderate', 'clearly'], [0.8, 'strong', 'strongly'], [0.95, 'very strong', 'very strongly'],
  ] as const)('reads %s as moving together (%s)', (p, strength, word) => {
    const m = meaning(p)
    expect(m).toMatchObject({ direction: 'together', strength })
    expect(m.text).toBe(`In your view they tend to move together (${word}): when mains burst rate is high, repair time is more likely to be high too.`)
  })

  it.each([
    [0.45, 'weak', 'slightly'], [0.3, 'moderate', 'clearly'], [0.15, 'strong', 'strongly'], [0.05, 'very strong', 'very strongly'],
  ] as const)('reads %s as one high, the other low (%s)', (p, strength, word) => {
    const m = meaning(p)
    expect(m).toMatchObject({ direction: 'opposite', strength })
    expect(m.text).toBe(`In your view when one is high the other tends to be low (${word}): when mains burst rate is high, repair time is more likely to be low.`)
  })

  it('gives the Gaussian-copula correlation sin(π(p − 1/2)) as the secondary figure (Sheppard 1899 orthant relation)', () => {
    // Constructed check values: sin(π/4) = √2/2 for p = 3/4, sin(−π/3) = −√3/2 for p = 1/6.
    expect(meaning(0.75).correlation).toBeCloseTo(Math.SQRT2 / 2, 14)
    expect(meaning(1 / 6).correlation).toBeCloseTo(-Math.sqrt(3) / 2, 14)
    expect(meaning(0.6).correlation).toBeGreaterThan(0)
    expect(meaning(0.4).correlation).toBeCloseTo(-meaning(0.6).correlation, 15)
  })

  it('refuses a chance of 0 or 100 % (the copula would need a correlation of ±1)', () => {
    expect(() => meaning(0)).toThrow(/strictly between 0 and 1/)
    expect(() => meaning(1)).toThrow(/strictly between 0 and 1/)
  })
})
