// @vitest-environment happy-dom
import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises, mount } from '@vue/test-utils'
import { ElButton, ElForm, ElFormItem, ElIcon, ElInput } from 'element-plus'
import fc from 'fast-check'
import { checkAnswer } from '@shared/elicitation/answers'
import type { Support } from '@shared/stats'
import { emptyDraft, readDraft, type Draft } from '@/answer/draft'
import { QUANTILE_FIELDS, quantileInput, quantileProblems, quantileSteps, stepDone, stepPrompt, type QuantileValues } from '@/answer/quantile'
import QuantileForm from '@/components/answer/QuantileForm.vue'

const positive: Support = { kind: 'positive' }

describe('quantile method: steps and checks', () => {
  it('asks bounds, then the median, then the quartiles, and the tails only when asked', () => {
    expect(quantileSteps(false).map((s) => s.fields)).toEqual([['lower', 'upper'], ['median'], ['q1', 'q3']])
    expect(quantileSteps(true).map((s) => s.key)).toEqual(['bounds', 'median', 'quartiles', 'tails'])
  })

  it('puts the message on the value being typed and names the value it conflicts with', () => {
    expect(quantileProblems({ lower: 4, upper: 3 }, positive, false)).toEqual({ upper: 'The upper bound must be above your lower bound (4)' })
    expect(quantileProblems({ lower: 4, upper: 25, median: 30 }, positive, false)).toEqual({ median: 'The median must be below your upper bound (25)' })
    // The quartile is asked after the median, so it carries the message (the shared check keys it to the median).
    expect(quantileProblems({ lower: 4, upper: 25, median: 10, q1: 12 }, positive, false)).toEqual({ q1: 'The lower quartile must be below your median (10)' })
    expect(quantileProblems({ lower: 4, upper: 25, median: 10, q1: 8, q3: 9 }, positive, false)).toEqual({ q3: 'The upper quartile must be above your median (10)' })
    expect(quantileProblems({ lower: 4, upper: 25, median: 10, q1: 8, q3: 13, p05: 9 }, positive, true)).toEqual({ p05: 'The 5 % value must be below your lower quartile (8)' })
  })

  it('checks the quantity’s possible values: bounds may touch an end, answers may not', () => {
    expect(quantileProblems({ lower: -1 }, positive, false)).toEqual({ lower: 'The lower bound cannot be negative' })
    expect(quantileProblems({ lower: 0, upper: 5, median: 2 }, positive, false)).toEqual({})
    expect(quantileProblems({ lower: 0, upper: 1, median: 1 }, { kind: 'proportion' }, false)).toEqual({ median: 'The median must be between 0 and 1' })
    expect(quantileProblems({ lower: 2, upper: 12 }, { kind: 'bounded', lower: 0, upper: 10 }, false)).toEqual({ upper: 'The upper bound must be between 0 and 10' })
  })

  it('flags a problem exactly when the shared check (the server’s) does', () => {
    const value = fc.option(fc.integer({ min: -5, max: 30 }), { nil: undefined })
    fc.assert(
      fc.property(fc.record({ lower: value, upper: value, median: value, q1: value, q3: value, p05: value, p95: value }), fc.boolean(), (raw, tails) => {
        const values: QuantileValues = {}
        for (const f of QUANTILE_FIELDS) if (raw[f] !== undefined && (tails || (f !== 'p05' && f !== 'p95'))) values[f] = raw[f]
        const mine = Object.keys(quantileProblems(values, positive, tails)).length > 0
        const shared = Object.keys(checkAnswer({ method: 'quantile', askTails: tails }, quantileInput(values), positive).problems).length > 0
        expect(mine).toBe(shared)
      }),
      { numRuns: 400 },
    )
  })

  it('opens a step only when every value so far is given and consistent', () => {
    const steps = quantileSteps(false)
    const read = (values: Record<string, string>) => {
      const draft: Draft = { ...emptyDraft({ method: 'quantile' }), texts: { ...emptyDraft({ method: 'quantile' }).texts, ...values } }
      return readDraft({ method: 'quantile' }, draft, positive)
    }
    let r = read({ lower: '4' })
    expect(stepDone(0, steps, r.given, r.problems)).toBe(false)
    r = read({ lower: '4', upper: '3' })
    expect(stepDone(0, steps, r.given, r.problems)).toBe(false)
    r = read({ lower: '4', upper: '25' })
    expect(stepDone(0, steps, r.given, r.problems)).toBe(true)
    expect(stepDone(1, steps, r.given, r.problems)).toBe(false)
    r = read({ lower: '4', upper: '25', median: 'ten' })
    expect(r.problems.median).toBe('Enter a number, such as 12 or 0.35')
    expect(stepDone(1, steps, r.given, r.problems)).toBe(false)
    r = read({ lower: '4', upper: '25', median: '10', q1: '8', q3: '13' })
    expect(stepDone(2, steps, r.given, r.problems)).toBe(true)
    expect(r.result.check.complete).toBe(true)
    expect(r.result.fits[0].distribution.family).toBe('lognormal')
  })
})

describe('quantile method: questions in plain words', () => {
  const [bounds, median, quartiles] = quantileSteps(false)

  it('defines the bounds as the rounds, the practice question and the e-mails do', () => {
    expect(stepPrompt(bounds, {}, 'km', positive)).toBe(
      'Start with the range. Give a lower and an upper value such that you would be very surprised to see the true value fall below the lower one or above the upper one (about 1 chance in 100 each side).',
    )
  })

  it('fills in the expert’s own numbers once given', () => {
    const unit = 'bursts per 100 km per year'
    expect(stepPrompt(median, { lower: 4, upper: 25 }, unit, positive)).toBe(
      'Now the median: between 4 bursts per 100 km per year and 25 bursts per 100 km per year, which value is the true value equally likely to be below or above?',
    )
    expect(stepPrompt(quartiles, { lower: 4, upper: 25, median: 11 }, unit, positive)).toBe(
      'Suppose you learn the true value is below 11 bursts per 100 km per year. Which value would it then be equally likely to fall above or below? Then the same if you learn it is above 11 bursts per 100 km per year.',
    )
    expect(stepPrompt(quartiles, { median: 0.3 }, 'share of households', { kind: 'proportion' })).toContain('below 30 % (share of households)')
    expect(stepPrompt(quartiles, {}, unit, positive)).not.toContain('splits')
  })
})

describe('QuantileForm', () => {
  afterEach(() => {
    document.body.innerHTML = ''
  })

  function mountForm(values: Record<string, string>, revealed = 1, askTails = false) {
    const item = { method: 'quantile' as const, askTails }
    const base = emptyDraft(item)
    const draft: Draft = { ...base, revealed, texts: { ...base.texts, ...values } }
    return mount(QuantileForm, {
      attachTo: document.body,
      props: { item, unit: 'bursts per 100 km per year', support: positive, draft, reading: readDraft(item, draft, positive), readOnly: false },
      global: { components: { ElButton, ElForm, ElFormItem, ElIcon, ElInput }, stubs: { transition: false } },
    })
  }
  const shownIds = (w: ReturnType<typeof mountForm>) => ['q-lower', 'q-upper', 'q-median', 'q-q1', 'q-q3', 'q-p05', 'q-p95'].filter((id) => w.find(`[data-testid="${id}"]`).exists())

  it('shows the bounds first, with Next disabled until both are given and consistent', async () => {
    const w = mountForm({})
    expect(shownIds(w)).toEqual(['q-lower', 'q-upper'])
    expect(w.get('[data-testid="q-next"]').attributes('disabled')).toBeDefined()
    expect(w.find('[data-testid="overconfidence-note"]').exists()).toBe(false)
    const item = { method: 'quantile' as const }
    const draft = { ...emptyDraft(item), texts: { ...emptyDraft(item).texts, lower: '4', upper: '25' } }
    await w.setProps({ draft, reading: readDraft(item, draft, positive) })
    expect(w.get('[data-testid="q-next"]').attributes('disabled')).toBeUndefined()
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(w.emitted('reveal')).toHaveLength(1)
    w.unmount()
  })

  it('names the problem inline after a pause, and does not move on', async () => {
    const w = mountForm({ lower: '4', upper: '3' })
    expect(w.get('[data-testid="q-next"]').attributes('disabled')).toBeDefined()
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(w.emitted('reveal')).toBeUndefined()
    expect(w.get('[data-testid="q-problem"]').text()).toBe('The upper bound must be above your lower bound (4)')
    expect(w.get('#q-input-upper').attributes('aria-invalid')).toBe('true')
    w.unmount()
  })

  it('shows the quartile step with the overconfidence note, and the tails only when asked', () => {
    const w = mountForm({ lower: '4', upper: '25', median: '10' }, 3)
    expect(shownIds(w)).toEqual(['q-lower', 'q-upper', 'q-median', 'q-q1', 'q-q3'])
    expect(w.get('[data-testid="overconfidence-note"]').text()).toContain('Would that surprise you?')
    expect(w.find('[data-testid="q-next"]').exists()).toBe(false)
    w.unmount()
    const t = mountForm({ lower: '4', upper: '25', median: '10', q1: '8', q3: '13' }, 3, true)
    expect(t.get('[data-testid="q-next"]').text()).toContain('5 % and 95 % values')
    t.unmount()
  })

  it('moves on to the rationale when Enter is pressed in the last step', async () => {
    const w = mountForm({ lower: '4', upper: '25', median: '10', q1: '8', q3: '13' }, 3)
    await w.get('form').trigger('submit')
    await flushPromises()
    expect(w.emitted('done')).toHaveLength(1)
    w.unmount()
  })
})
