import { describe, expect, it } from 'vitest'
import { practiceSchema } from '@shared/schemas/rounds'
import { checkStep, firstProblem, parseNumber, practicePoints, PRACTICE_STEPS } from '@/rounds/practice'

describe('practice question: the quantile method steps', () => {
  it('asks bounds first, then the median, then the quartiles', () => {
    expect(PRACTICE_STEPS.map((s) => s.key)).toEqual(['lower', 'upper', 'median', 'q1', 'q3'])
    expect(PRACTICE_STEPS.map((s) => s.testid)).toEqual(['practice-lower', 'practice-upper', 'practice-median', 'practice-q1', 'practice-q3'])
  })

  it('maps bounds to 5 % and 95 %, quartiles to 25 % and 75 %, the median to 50 %', () => {
    expect(Object.fromEntries(PRACTICE_STEPS.map((s) => [s.key, s.prob]))).toEqual({ lower: 0.05, upper: 0.95, median: 0.5, q1: 0.25, q3: 0.75 })
  })

  it('checks each value against the answers before it', () => {
    expect(checkStep('lower', null, {})).toBe('Enter a number')
    expect(checkStep('lower', -4, {})).toBeNull()
    expect(checkStep('upper', 900, { lower: 1000 })).toBe('The upper bound must be larger than your lower bound (1000)')
    expect(checkStep('upper', 1000, { lower: 1000 })).toBe('The upper bound must be larger than your lower bound (1000)')
    expect(checkStep('median', 1000, { lower: 1000, upper: 3000 })).toBe('The median must be larger than your lower bound (1000)')
    expect(checkStep('median', 3000, { lower: 1000, upper: 3000 })).toBe('The median must be smaller than your upper bound (3000)')
    expect(checkStep('median', 1500, { lower: 1000, upper: 3000 })).toBeNull()
    expect(checkStep('q1', 1600, { lower: 1000, upper: 3000, median: 1500 })).toBe('The lower quartile must be smaller than your median (1500)')
    expect(checkStep('q1', 900, { lower: 1000, upper: 3000, median: 1500 })).toBe('The lower quartile must be larger than your lower bound (1000)')
    expect(checkStep('q3', 1500, { lower: 1000, upper: 3000, median: 1500, q1: 1200 })).toBe('The upper quartile must be larger than your median (1500)')
    expect(checkStep('q3', 3100, { lower: 1000, upper: 3000, median: 1500, q1: 1200 })).toBe('The upper quartile must be smaller than your upper bound (3000)')
    expect(checkStep('q3', 2000, { lower: 1000, upper: 3000, median: 1500, q1: 1200 })).toBeNull()
  })

  it('finds the first answer an earlier change has broken', () => {
    expect(firstProblem({ lower: 1000, upper: 3000, median: 1500, q1: 1200, q3: 2000 })).toBeNull()
    // The lower bound was moved above the quartile given earlier.
    expect(firstProblem({ lower: 1300, upper: 3000, median: 1500, q1: 1200, q3: 2000 })).toEqual({
      index: 3,
      message: 'The lower quartile must be larger than your lower bound (1300)',
    })
  })

  it('turns the five answers into increasing CDF points the shared schema accepts', async () => {
    expect(practicePoints({ lower: 1000, upper: 3000, median: 1500 })).toBeNull()
    const points = practicePoints({ lower: 1000, upper: 3000, median: 1500, q1: 1200, q3: 2000 })
    expect(points).toEqual([
      { value: 1000, prob: 0.05 },
      { value: 1200, prob: 0.25 },
      { value: 1500, prob: 0.5 },
      { value: 2000, prob: 0.75 },
      { value: 3000, prob: 0.95 },
    ])
    await expect(practiceSchema.validate({ points })).resolves.toBeTruthy()
  })

  it('reads typed numbers, with spaces as thousands separators', () => {
    expect(parseNumber('1840')).toBe(1840)
    expect(parseNumber(' 1 840 ')).toBe(1840)
    expect(parseNumber('-2.5')).toBe(-2.5)
    expect(parseNumber('')).toBeNull()
    expect(parseNumber('12a')).toBeNull()
    expect(parseNumber('1,840')).toBeNull()
  })
})
