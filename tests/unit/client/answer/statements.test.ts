import { describe, expect, it } from 'vitest'
import { feedbackStatements, impliedQuantiles } from '@/answer/statements'
import { chanceWords, fitQuality, quantityPhrase, rangeText, shapeWords, valueText } from '@/answer/format'

// Standard normal quantiles (common knowledge): z(0.75) = 0.67449, z(0.9) = 1.28155, z(0.95) = 1.64485.
const normal = { family: 'normal', mu: 10, sigma: 2 } as const

describe('plain statements read off the chosen distribution', () => {
  it('says a 1 in 4 chance below the lower quartile, 1 in 2 between the quartiles, 1 in 10 above the 90 % value, with the unit', () => {
    expect(feedbackStatements(normal, { name: 'Burst rate of old cast-iron mains', unit: 'bursts per 100 km per year', support: { kind: 'real' } })).toEqual([
      'You are saying there is a 1 in 4 chance that the burst rate of old cast-iron mains is below 8.65 bursts per 100 km per year.',
      'You are saying there is a 1 in 2 chance that it lies between 8.65 and 11.3 bursts per 100 km per year.',
      'You are saying there is a 1 in 10 chance that it is above 12.6 bursts per 100 km per year.',
    ])
  })

  it('writes a share in per cent with its unit in brackets, and reads without a unit when there is none', () => {
    const beta = { family: 'beta', alpha: 2, beta: 6 } as const
    const [first, second] = feedbackStatements(beta, { name: 'Leak-alert scheme uptake', unit: 'share of households', support: { kind: 'proportion' } })
    expect(first).toMatch(/^You are saying there is a 1 in 4 chance that the leak-alert scheme uptake is below \d+(\.\d)? % \(share of households\)\.$/)
    expect(second).toMatch(/between \d+(\.\d)? % and \d+(\.\d)? % \(share of households\)\.$/)
    expect(feedbackStatements(normal, { name: 'Flow', unit: '', support: { kind: 'real' } })[0]).toBe('You are saying there is a 1 in 4 chance that the flow is below 8.65.')
  })

  it('gives the implied 5 %, 50 % and 95 % values', () => {
    const q = impliedQuantiles(normal)
    expect(q.q05).toBeCloseTo(10 - 2 * 1.644853627, 6)
    expect(q.q50).toBe(10)
    expect(q.q95).toBeCloseTo(10 + 2 * 1.644853627, 6)
  })

  it('words the quantity, chances, values and ranges for prose', () => {
    expect(quantityPhrase('Burst rate of old cast-iron mains')).toBe('the burst rate of old cast-iron mains')
    expect(quantityPhrase('HbA1c level')).toBe('the HbA1c level')
    expect(quantityPhrase('The night flow')).toBe('the night flow')
    expect(chanceWords(0.25)).toBe('1 in 4')
    expect(chanceWords(0.1)).toBe('1 in 10')
    expect(chanceWords(0.5)).toBe('1 in 2')
    expect(chanceWords(0.3)).toBe('30 %')
    expect(valueText(1840, 'km')).toBe('1,840 km')
    expect(valueText(0.25, 'share of households', { kind: 'proportion' })).toBe('25 % (share of households)')
    expect(valueText(0.138, 'share of households', { kind: 'proportion' })).toBe('13.8 % (share of households)')
    expect(valueText(0.0042, '', { kind: 'proportion' })).toBe('0.42 %')
    expect(rangeText(0.2, 0.35, 'share of households', { kind: 'proportion' })).toBe('20 % and 35 % (share of households)')
    expect(rangeText(7.93, 12.9, 'L/s')).toBe('7.93 and 12.9 L/s')
  })

  it('calls a fit close below an SSE of 0.001 and keeps the number readable', () => {
    expect(fitQuality(0.000264)).toBe('close fit')
    expect(fitQuality(0.001)).toBe('rough fit')
  })

  it('names shapes in words, never by family', () => {
    expect(shapeWords({ family: 'normal', mu: 10, sigma: 2 })).toBe('symmetric')
    expect(shapeWords({ family: 'student-t', mu: 10, sigma: 2, df: 3 })).toBe('symmetric, with room for far-off values')
    expect(shapeWords({ family: 'lognormal', meanlog: 2, sdlog: 0.3 })).toBe('stretched towards high values')
    expect(shapeWords({ family: 'lognormal', meanlog: 2, sdlog: 1 })).toBe('strongly stretched towards high values, with room for far-off values')
    expect(shapeWords({ family: 'beta', alpha: 8, beta: 2 })).toBe('stretched towards low values')
    expect(shapeWords({ family: 'uniform', lower: 6, upper: 14 })).toBe('flat between two limits')
  })
})
