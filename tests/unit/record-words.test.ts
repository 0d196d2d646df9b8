import { describe, expect, it } from 'vitest'
import { EXPERT_LABEL_PATTERN, expertLabel, labelExperts, labelWithName } from '../../shared/record/expert-labels'
import { actionLabel, answerText, compositionBayesFactorText, compositionDirichletText, compositionSweepText, jointCheckText, subjectLabel } from '../../shared/record/format'

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

describe('joint priors in words', () => {
  it('writes a composition’s Dirichlet, its check, its Bayes factor and its sweep', () => {
    const dirichlet = { alpha: [12.345678, 8.2, 20.5], totalConcentration: 41.045678, meanSum: 0.97 }
    expect(compositionDirichletText(dirichlet, null)).toBe(
      'Dirichlet(12.35, 8.2, 20.5): total concentration 41.05, worth about 41 observations of which share each falls in. The reconciled shares\' means add up to 97 % and are scaled to add up to 100 %.',
    )
    expect(compositionDirichletText(dirichlet, 'Other')).toMatch(/means add up to 97 %; the rest goes to Other\.$/)
    expect(jointCheckText({ ok: true, maxRelativeDifference: 1.2e-16 })).toBe('passed: the same parameters come out of the code (largest relative difference 1.2e-16)')
    expect(jointCheckText({ ok: false, maxRelativeDifference: 0.5 })).toMatch(/^FAILED/)
    expect(compositionBayesFactorText({ bayesFactor: { logBF: Math.log(20), label: 'strong', favours: 'prior' }, comparison: { alpha: [1, 1, 1] } })).toBe(
      'The counts favour the elicited Dirichlet over the comparison prior Dirichlet(1, 1, 1) by a Bayes factor of 20 (strong on the Kass–Raftery scale; log Bayes factor 2.996).',
    )
    expect(compositionBayesFactorText({ bayesFactor: { logBF: -Math.log(4), label: 'positive', favours: 'comparison' }, comparison: { alpha: [1, 1] } })).toMatch(
      /^The counts favour the comparison prior Dirichlet\(1, 1\) over the elicited Dirichlet by a Bayes factor of 4 \(positive/,
    )
    expect(compositionSweepText({ evidenceRatio: 5.5, priorDriven: true })).toMatch(/factor 5\.5 from half to twice the width; so a Bayes factor built on this Dirichlet reflects its width/)
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
