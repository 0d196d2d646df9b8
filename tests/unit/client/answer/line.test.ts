// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import type { Support } from '@shared/stats'
import { fieldForTap, handleLimits, handleStep, lineDomain, lineTicks, snapValue } from '@/answer/line'
import { answerStatements } from '@/answer/statements'
import AnswerLine from '@/components/answer/AnswerLine.vue'

const positive: Support = { kind: 'positive' }
const proportion: Support = { kind: 'proportion' }

// Every value below is constructed for these tests.
describe('the number line: scale, ticks and steps', () => {
  it('shows the values with a tenth of their spread each side, widened to round ticks, inside the possible values', () => {
    expect(lineDomain({ lower: 4, upper: 25 }, positive)).toEqual([0, 30])
    expect(lineDomain({ lower: 4, upper: 25, median: 10 }, { kind: 'real' })).toEqual([0, 30])
    expect(lineDomain({ lower: 0.2, upper: 0.35 }, proportion)).toEqual([0.15, 0.4])
    expect(lineDomain({ lower: 0.02, upper: 0.98 }, proportion)).toEqual([0, 1])
    expect(lineDomain({ lower: 1000, upper: 1005 }, positive)).toEqual([998, 1006])
  })

  it('has no line before any value unless the quantity has two finite limits', () => {
    expect(lineDomain({}, positive)).toBeNull()
    expect(lineDomain({}, { kind: 'real' })).toBeNull()
    expect(lineDomain({}, proportion)).toEqual([0, 1])
    expect(lineDomain({}, { kind: 'bounded', lower: 10, upper: 60 })).toEqual([10, 60])
  })

  it('puts round ticks inside the line and moves a handle by about a hundredth of it', () => {
    expect(lineTicks(0, 30)).toEqual([0, 10, 20, 30])
    expect(lineTicks(0, 30, 10)).toEqual([0, 5, 10, 15, 20, 25, 30])
    expect(lineTicks(0.18, 0.38)).toEqual([0.2, 0.25, 0.3, 0.35])
    expect(handleStep(0, 30)).toBe(0.5)
    expect(handleStep(0.18, 0.38)).toBe(0.002)
  })
})

describe('the number line: where a handle may go', () => {
  const values = { lower: 4, upper: 25, median: 10, q1: 8 }

  it('keeps each handle one step inside its placed neighbours and the possible values', () => {
    expect(handleLimits('median', values, positive, 0.5)).toEqual([8.5, 24.5])
    expect(handleLimits('q1', values, positive, 0.5)).toEqual([4.5, 9.5])
    expect(handleLimits('q3', values, positive, 0.5)).toEqual([10.5, 24.5])
    expect(handleLimits('lower', values, positive, 0.5)).toEqual([0, 7.5])
    expect(handleLimits('upper', values, positive, 0.5)).toEqual([10.5, Infinity])
    expect(handleLimits('median', { lower: 0, upper: 1 }, proportion, 0.01)).toEqual([0.01, 0.99])
  })

  it('snaps a dragged value to the step grid and inside the limits, without float noise', () => {
    expect(snapValue(10.26, 0.5, [8.5, 24.5])).toBe(10.5)
    expect(snapValue(30, 0.5, [8.5, 24.5])).toBe(24.5)
    expect(snapValue(0.30000000004, 0.005, [0.01, 0.99])).toBe(0.3)
  })

  it('places a tap on the value asked whose order it respects: left or right bound, the quarter on its side', () => {
    expect(fieldForTap(3, ['lower', 'upper'], {}, [0, 10])).toBe('lower')
    expect(fieldForTap(7, ['lower', 'upper'], {}, [0, 10])).toBe('upper')
    expect(fieldForTap(20, ['lower', 'upper'], { lower: 4 }, [0, 30])).toBe('upper')
    expect(fieldForTap(2, ['lower', 'upper'], { upper: 25 }, [0, 30])).toBe('lower')
    expect(fieldForTap(7, ['q1', 'q3'], { lower: 4, upper: 25, median: 10 }, [0, 30])).toBe('q1')
    expect(fieldForTap(14, ['q1', 'q3'], { lower: 4, upper: 25, median: 10 }, [0, 30])).toBe('q3')
    expect(fieldForTap(14, ['q1', 'q3'], { lower: 4, upper: 25, median: 10, q3: 15 }, [0, 30])).toBeNull()
    expect(fieldForTap(27, ['median'], { lower: 4, upper: 25 }, [0, 30])).toBeNull()
  })
})

describe('what the values say, in plain words', () => {
  const unit = 'bursts per 100 km per year'

  it('reads each value back as a sentence, from the expert’s own numbers', () => {
    expect(answerStatements({ lower: 4, upper: 25, median: 10, q1: 8, q3: 13 }, { unit, support: positive }).map((s) => s.text)).toEqual([
      'You would be very surprised if it were below 4 bursts per 100 km per year or above 25 bursts per 100 km per year.',
      'You think it is as likely to be below 10 bursts per 100 km per year as above.',
      '1 chance in 4 it is below 8 bursts per 100 km per year.',
      '1 chance in 4 it is above 13 bursts per 100 km per year.',
      'As likely to be between 8 and 13 bursts per 100 km per year as outside.',
    ])
  })

  it('writes shares in per cent, adds the 1-in-20 values, and leaves out a value with a problem', () => {
    const said = answerStatements({ lower: 0.1, p05: 0.15, median: 0.3, p95: 0.5, upper: 0.6 }, { unit: '', support: proportion }, { median: 'The median must be …' })
    expect(said.map((s) => s.text)).toEqual([
      'You would be very surprised if it were below 10 % or above 60 %.',
      '1 chance in 20 it is below 15 %.',
      '1 chance in 20 it is above 50 %.',
    ])
    expect(answerStatements({ upper: 25 }, { unit: '', support: positive }).map((s) => s.text)).toEqual(['You would be very surprised if it were above 25.'])
  })
})

describe('AnswerLine', () => {
  afterEach(() => {
    document.body.innerHTML = ''
  })

  const mountLine = (values: Record<string, number>, fields: string[], toPlace: string[], readOnly = false) =>
    mount(AnswerLine, {
      attachTo: document.body,
      props: { values, fields, toPlace, problems: {}, support: positive, unit: 'L/s', fit: null, readOnly } as never,
    })

  it('has no line before the range, and says how to get one', () => {
    const w = mountLine({}, ['lower', 'upper'], ['lower', 'upper'])
    expect(w.find('[data-testid="answer-line-empty"]').exists()).toBe(true)
    expect(w.findAll('[role="slider"]')).toHaveLength(0)
    w.unmount()
  })

  it('shows each given value as a named slider, in plain words', () => {
    const w = mountLine({ lower: 4, upper: 25, median: 10 }, ['lower', 'upper', 'median'], ['median'])
    const sliders = w.findAll('[role="slider"]')
    expect(sliders.map((s) => [s.attributes('aria-label'), s.attributes('aria-valuenow'), s.attributes('aria-valuetext')])).toEqual([
      ['Lowest plausible value', '4', '4 L/s'],
      ['Middle value: as likely below as above', '10', '10 L/s'],
      ['Highest plausible value', '25', '25 L/s'],
    ])
    expect(w.get('[data-testid="handle-median"]').attributes('aria-valuemin')).toBe('4.5')
    expect(w.get('[data-testid="handle-median"]').attributes('aria-valuemax')).toBe('24.5')
    expect(w.get('[data-testid="handle-upper"]').attributes('aria-valuemax')).toBeUndefined()
    w.unmount()
  })

  it('moves a handle with the arrow keys and Page Up / Page Down, never past its neighbours', async () => {
    const w = mountLine({ lower: 4, upper: 25, median: 10 }, ['lower', 'upper', 'median'], ['median'])
    const median = w.get('[data-testid="handle-median"]')
    await median.trigger('keydown', { key: 'ArrowRight' })
    await median.trigger('keydown', { key: 'ArrowLeft' })
    await median.trigger('keydown', { key: 'PageUp' })
    await median.trigger('keydown', { key: 'Home' })
    await median.trigger('keydown', { key: 'Tab' })
    expect(w.emitted('set')).toEqual([['median', 10.5], ['median', 9.5], ['median', 15], ['median', 4.5]])
    await w.setProps({ values: { lower: 4, upper: 25, median: 24.5 } } as never)
    await w.get('[data-testid="handle-median"]').trigger('keydown', { key: 'ArrowUp' })
    expect(w.emitted('set')).toHaveLength(4)
    w.unmount()
  })

  it('moves nothing when read only', async () => {
    const w = mountLine({ lower: 4, upper: 25, median: 10 }, ['lower', 'upper', 'median'], ['median'], true)
    await w.get('[data-testid="handle-median"]').trigger('keydown', { key: 'ArrowRight' })
    expect(w.get('[data-testid="handle-median"]').attributes('tabindex')).toBe('-1')
    expect(w.emitted('set')).toBeUndefined()
    w.unmount()
  })
})
