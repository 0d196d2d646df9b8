import { describe, expect, it } from 'vitest'
import { practiceSchema } from '@shared/schemas/rounds'
import { PLAUSIBLE_BOUND_PROB } from '@shared/elicitation/bounds'
import { checkStep, firstProblem, practicePoints, practicePrompt, PRACTICE_STEPS } from '@/rounds/practice'

describe('practice question: the quantile method steps', () => {
  it('asks bounds first, then the median, then the quartiles', () => {
    expect(PRACTICE_STEPS.map((s) => s.key)).toEqual(['lower', 'upper', 'median', 'q1', 'q3'])
    expect(PRACTICE_STEPS.map((s) => s.testid)).toEqual(['practice-lower', 'practice-upper', 'practice-median', 'practice-q1', 'practice-q3'])
  })

  it('reads the bounds as the real rounds do (1 chance in 100 beyond each), quartiles as 25 % and 75 %, the median as 50 %', () => {
    expect(PLAUSIBLE_BOUND_PROB).toBe(0.01)
    expect(Object.fromEntries(PRACTICE_STEPS.map((s) => [s.key, s.prob]))).toEqual({ lower: 0.01, upper: 0.99, median: 0.5, q1: 0.25, q3: 0.75 })
  })

  it('asks each step in plain words with the expert’s own numbers filled in', () => {
    const values = { lower: 1000, upper: 3000, median: 1500 }
    expect(practicePrompt('lower', {}, 'km')).toBe(
      'What is the lowest value you find plausible? You would be very surprised to learn that the true answer is below it (about 1 chance in 100).',
    )
    expect(practicePrompt('median', values, 'km')).toBe('Between 1,000 km and 3,000 km: which value is the true answer equally likely to be below or above?')
    expect(practicePrompt('q1', values, 'km')).toBe('Suppose you learn the true answer is below 1,500 km. Which value would it then be equally likely to fall above or below?')
    expect(practicePrompt('q3', values, '')).toBe('Suppose you learn the true answer is above 1,500. Which value would it then be equally likely to fall above or below?')
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
      { value: 1000, prob: 0.01 },
      { value: 1200, prob: 0.25 },
      { value: 1500, prob: 0.5 },
      { value: 2000, prob: 0.75 },
      { value: 3000, prob: 0.99 },
    ])
    await expect(practiceSchema.validate({ points })).resolves.toBeTruthy()
  })
})
