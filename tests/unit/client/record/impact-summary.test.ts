// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { DIAGNOSTICS_CAUTION } from '@shared/elicitation/impact'
import { DIAGNOSIS_WORDS } from '@shared/stats'
import ImpactSummary from '@/components/record/ImpactSummary.vue'
import type { RecordImpactCandidate as ImpactCandidate } from '@shared/api/records'
import type { RecordImpact } from '@/api/record'

// Constructed record content: the numbers are the record's own, shown as they are stored.
const candidate = (over: Partial<ImpactCandidate>): ImpactCandidate => ({
  label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'normal', mu: 3.7, sigma: 0.3 }, logEvidence: -12.3,
  posterior: { mean: 3.7, sd: 0.26, q025: 3.2, q50: 3.7, q975: 4.2 }, bayesFactor: { logBF: Math.log(12.5), twoLnBF: 2 * Math.log(12.5), label: 'positive' },
  priorPredictiveP: 0.8, priorEss: 25, flags: [], decision: null,
  fractionalBayesFactor: { logBF: Math.log(3.25), b: 0.125 }, sensitivity: { prior: 0.0648, likelihood: 0.0225, diagnosis: 'weak-likelihood' },
  ...over,
})

function impact(candidates: ImpactCandidate[], diagnosticsCaution: string | null): RecordImpact {
  return {
    dataset: { name: 'Pressure-management pilot, eight districts', version: 1, model: 'normal-known-sigma' }, n: 8, candidates,
    sweep: { evidenceRatio: 2.15, priorDriven: false, rule: 'rule', fractionalRatio: 1.04, trainingFraction: 0.125 },
    diagnosticsCaution, tipping: null, decision: null, findings: [],
  }
}

describe('record: impact summary', () => {
  it('shows the fractional Bayes factor with b, both sensitivities with the reading, the fractional sweep and the caution', () => {
    const w = mount(ImpactSummary, {
      props: {
        unit: 'L/s',
        impact: impact([
          candidate({}),
          candidate({ label: 'Comparison prior', kind: 'comparison', bayesFactor: null, fractionalBayesFactor: null, sensitivity: { prior: 0, likelihood: 0.08, diagnosis: 'likelihood-dominated' } }),
        ], DIAGNOSTICS_CAUTION),
      },
    })
    expect(w.findAll('[data-testid="record-fbf"]').map((c) => c.text())).toEqual(['3.25 (b = 0.125)', '—'])
    expect(w.findAll('[data-testid="record-sensitivity"]').map((c) => c.text())).toEqual(['0.065 / 0.023', '0 / 0.08'])
    expect(w.findAll('[data-testid="record-diagnosis"]').map((c) => c.text())).toEqual([DIAGNOSIS_WORDS['weak-likelihood'], DIAGNOSIS_WORDS['likelihood-dominated']])
    expect(w.get('[data-testid="impact-sweep"]').text()).toContain('The fractional Bayes factor (b = 0.125) changes by a factor of 1.04.')
    expect(w.get('[data-testid="record-diagnostics-caution"]').text()).toBe(DIAGNOSTICS_CAUTION)
  })

  it('leaves the columns and the caution out for an analysis stored before the diagnostics', () => {
    const old = candidate({})
    delete old.fractionalBayesFactor
    delete old.sensitivity
    const w = mount(ImpactSummary, { props: { unit: 'L/s', impact: { ...impact([old], null), sweep: { evidenceRatio: 2.15, priorDriven: false, rule: 'rule' } } } })
    expect(w.find('[data-testid="record-fbf"]').exists()).toBe(false)
    expect(w.find('[data-testid="record-diagnostics-caution"]').exists()).toBe(false)
    expect(w.get('[data-testid="impact-sweep"]').text()).not.toContain('fractional')
  })
})
