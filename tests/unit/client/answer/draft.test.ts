import { describe, expect, it } from 'vitest'
import { draftFromAnswer, emptyDraft, percentText, probOf, readDraft, saveBody } from '@/answer/draft'
import { remainingPercent } from '@/answer/intervals'
import { calibrationProblems, calibrationStatus, linkStatus, quantityStatus, submitProblems } from '@/answer/status'

const intervals = { method: 'fixed-interval' as const, edges: [0, 0.1, 0.2, 0.3, 0.5, 1] }

describe('fixed-interval drafts', () => {
  it('reads percentages, shows what remains and saves probabilities, with nulls for blanks', () => {
    const draft = { ...emptyDraft(intervals), percents: ['10', '30', '', '20', ''] }
    const r = readDraft(intervals, draft, { kind: 'proportion' })
    expect(r.input.probs).toEqual([0.1, 0.3, null, 0.2, null])
    expect(remainingPercent(r.input.probs!)).toBe(40)
    expect(r.result.check.complete).toBe(false)
    expect(r.problems).toEqual({})
    expect(saveBody(intervals, r, draft, 2)).toEqual({ method: 'fixed-interval', edges: intervals.edges, probs: [0.1, 0.3, null, 0.2, null], rationale: '', chosenFamily: null, version: 2 })
  })

  it('names a bad row and a total over 100 %', () => {
    const r = readDraft(intervals, { ...emptyDraft(intervals), percents: ['abc', '130', '60', '50', ''] }, { kind: 'proportion' })
    expect(r.problems['prob.0']).toBe('Enter a percentage, such as 20')
    expect(r.problems['prob.1']).toBe('Enter a percentage from 0 to 100')
    expect(r.problems.probs).toBe('Your probabilities add up to 110.0 %, more than 100 %')
  })

  it('fits once the probabilities make 100 %', () => {
    const r = readDraft(intervals, { ...emptyDraft(intervals), percents: ['10', '30', '30', '20', '10'] }, { kind: 'proportion' })
    expect(r.result.check.complete).toBe(true)
    expect(r.result.fits.map((f) => f.distribution.family).sort()).toEqual(['beta', 'uniform'])
  })

  it('turns stored probabilities back into the percentages typed', () => {
    expect(percentText(0.333)).toBe('33.3')
    expect(percentText(probOf(33.3))).toBe('33.3')
    expect(draftFromAnswer(intervals, { edges: intervals.edges, probs: [0.1, 0.3, null, 0.2, null] }).percents).toEqual(['10', '30', '', '20', ''])
    expect(remainingPercent([0.1, 0.2, 0.7])).toBe(0)
  })
})

describe('item status', () => {
  it('is complete only with a fitted answer and a rationale of 20 characters', () => {
    expect(quantityStatus({ started: false, complete: false, fitted: false, rationale: '' })).toBe('not-started')
    expect(quantityStatus({ started: true, complete: true, fitted: true, rationale: 'short' })).toBe('in-progress')
    expect(quantityStatus({ started: true, complete: true, fitted: true, rationale: 'The pilot survey of 120 households.' })).toBe('complete')
    expect(quantityStatus({ started: true, complete: true, fitted: false, rationale: 'The pilot survey of 120 households.' })).toBe('in-progress')
  })

  it('sums up the calibration block and checks its values increase', () => {
    expect(calibrationStatus([{ saved: false, started: false }])).toBe('not-started')
    expect(calibrationStatus([{ saved: true, started: true }, { saved: false, started: true }])).toBe('in-progress')
    expect(calibrationStatus([{ saved: true, started: true }])).toBe('complete')
    expect(calibrationProblems({ q05: 40, q50: 30, q95: 90 })).toEqual({ q50: 'Your 50 % value must be above your 5 % value (40)' })
    expect(calibrationProblems({ q05: 10, q50: 30, q95: 30 })).toEqual({ q95: 'Your 95 % value must be above your 50 % value (30)' })
    expect(calibrationProblems({ q05: 10, q50: null, q95: 5 })).toEqual({ q95: 'Your 95 % value must be above your 5 % value (10)' })
  })

  it('sorts the submit’s field errors onto quantities, calibration questions and links', () => {
    expect(submitProblems({
      'quantity.3': 'flow: complete your answer', 'calibration.7': 'Calibration question 1: give your 5 %, 50 % and 95 % values',
      'link.12': 'Flow and Bursts: say how likely', other: 'x',
    })).toEqual({
      quantities: { 3: 'flow: complete your answer' },
      calibration: { 7: 'Calibration question 1: give your 5 %, 50 % and 95 % values' },
      links: { 12: 'Flow and Bursts: say how likely' },
      other: ['x'],
    })
  })

  it('counts a link complete once a chance is given, the reason being optional', () => {
    expect(linkStatus({ probability: null, rationale: '' })).toBe('not-started')
    expect(linkStatus({ probability: null, rationale: 'Frost' })).toBe('in-progress')
    expect(linkStatus({ probability: 0.7, rationale: '' })).toBe('complete')
  })
})
