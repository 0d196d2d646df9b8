import { describe, expect, it } from 'vitest'
import { EXPERT_LABEL_PATTERN, expertLabel, labelExperts, labelWithName } from '../../shared/record/expert-labels'
import { actionLabel, answerText, subjectLabel } from '../../shared/record/format'

describe('expert labels', () => {
  it('numbers the experts from 1 in joining order, never with letters', () => {
    expect([0, 1, 8, 9, 25, 26, 99].map(expertLabel)).toEqual(['Expert 1', 'Expert 2', 'Expert 9', 'Expert 10', 'Expert 26', 'Expert 27', 'Expert 100'])
    expect([0, 9, 26, 99].map(expertLabel).every((l) => EXPERT_LABEL_PATTERN.test(l))).toBe(true)
    expect(EXPERT_LABEL_PATTERN.test('Expert A')).toBe(false)
    expect(EXPERT_LABEL_PATTERN.test('Expert 0')).toBe(false)
    expect(() => expertLabel(-1)).toThrow(RangeError)
    expect(() => expertLabel(1.5)).toThrow(RangeError)
  })

  it('gives each expert the label of their first joining, whatever comes later', () => {
    const labels = labelExperts(['user:7', 'user:3', 'user:7', 'email:new@example.org', 'user:3'])
    expect([...labels]).toEqual([['user:7', 'Expert 1'], ['user:3', 'Expert 2'], ['email:new@example.org', 'Expert 3']])
  })

  it('adds the name only when the record shows names', () => {
    expect(labelWithName({ code: 'Expert 2', name: 'Helen Okafor' })).toBe('Expert 2 (Helen Okafor)')
    expect([labelWithName({ code: 'Expert 2' }), labelWithName({ code: 'Expert 2', name: null }), labelWithName({ code: 'Expert 2', name: '' })]).toEqual(['Expert 2', 'Expert 2', 'Expert 2'])
  })
})

describe('the record in words', () => {
  it('writes an answer as given: bounds and quantiles, interval probabilities, or chips', () => {
    expect(answerText('quantile', { lower: 0, upper: 10, points: [{ value: 2, prob: 0.25 }, { value: 4, prob: 0.5 }] })).toBe('plausible range 0 to 10; 2 at 0.25; 4 at 0.5')
    expect(answerText('fixed-interval', { edges: [0, 1, 2], probs: [0.3, null] })).toBe('[0, 1): 0.3; [1, 2): —')
    expect(answerText('chip-grid', { lower: 0, upper: 2, edges: [0, 1, 2], chips: [1, 4] })).toBe('plausible range 0 to 2; [0, 1): 1 chip; [1, 2): 4 chips')
    expect(answerText('quantile', null)).toBe('—')
  })

  it('names audit actions and subjects in words', () => {
    expect(actionLabel('record.leave-out')).toBe('Quantity left out of the record')
    expect(actionLabel('widget.polish-all')).toBe('Widget polish all')
    expect(subjectLabel('quantity:4', { quantities: { 4: 'Burst rate' } })).toBe('Burst rate')
    expect(subjectLabel('quantity:5', { quantities: { 4: 'Burst rate' } })).toBe('quantity no. 5')
    expect(subjectLabel('record:v2')).toBe('record version 2')
    expect(subjectLabel('study:9')).toBe('this study')
    expect(subjectLabel(null)).toBe('')
  })
})

describe('APP_TIME_ZONE', () => {
  it('takes an IANA zone, defaults to UTC, and refuses anything else with a clear message', async () => {
    const { loadConfig } = await import('../../server/config')
    expect(loadConfig({ APP_TIME_ZONE: 'Europe/Oslo' }).timeZone).toBe('Europe/Oslo')
    expect(loadConfig({}).timeZone).toBe('UTC')
    expect(() => loadConfig({ APP_TIME_ZONE: 'Kestrel/Valley' })).toThrow('APP_TIME_ZONE must be an IANA time zone such as Europe/Oslo or UTC, not "Kestrel/Valley"')
  })
})
