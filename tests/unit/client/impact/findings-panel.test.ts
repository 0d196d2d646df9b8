// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { ElIcon } from 'element-plus'
import { PRIOR_DRIVEN_RULE } from '@shared/stats'
import FindingsPanel from '@/components/impact/FindingsPanel.vue'
import type { ImpactCandidate, ImpactResult } from '@/api/impact'

const candidate = (over: Partial<ImpactCandidate>): ImpactCandidate => ({
  key: 'reconciled', label: 'Reconciled prior', kind: 'reconciled', prior: { family: 'uniform', lower: 0, upper: 10 },
  priorSummary: { mean: 5, q025: 0.25, q975: 9.75 }, logEvidence: -9.79, method: 'closed-form',
  posterior: { mean: 3.0, sd: 0.89, q025: 1.25, q50: 3, q975: 4.75 }, priorPredictiveP: 0.3, logPriorPredictiveP: Math.log(0.3), priorEss: null,
  bayesFactor: { logBF: Math.log(4), twoLnBF: 2.77, label: 'positive' }, fractionalBayesFactor: null, sensitivity: null, diagnosticNotes: [], decision: null, flags: [], ...over,
})

function result(candidates: ImpactCandidate[], priorDriven: boolean): ImpactResult {
  return {
    id: 1, cached: false, createdAt: '2026-01-05T10:00:00.000Z', quantityId: 3, datasetId: 4,
    dataset: { name: 'Pilot districts', version: 1, model: 'normal-known-sigma', summary: { rows: 5, n: 5, description: '5 values, mean 3.000' } },
    n: 5, candidates, decision: null, tipping: null, computeMs: 12,
    sweep: { factors: [0.5, 1, 2], points: [], evidenceRatio: priorDriven ? 3.9 : 1.2, priorDriven, rule: PRIOR_DRIVEN_RULE,
      fractionalRatio: null, trainingFraction: null, alphaCurve: null, notes: [] },
    findings: ['Widening the reconciled prior 4× moves the posterior mean from 3.00 to 3.00 (barely) and divides the evidence by about 4.00.'],
  }
}

const mountPanel = (r: ImpactResult) => mount(FindingsPanel, { props: { result: r, unit: 'L/s', symbol: 'flow' }, global: { components: { ElIcon } } })

describe('FindingsPanel', () => {
  it('lists plain-language findings beside the numbers, the server’s included', () => {
    const w = mountPanel(result([candidate({}), candidate({ key: 'comparison', label: 'Comparison prior', kind: 'comparison', bayesFactor: null })], false))
    const items = w.get('[data-testid="impact-findings"]').findAll('li').map((li) => li.text())
    expect(items[0]).toBe('Under the reconciled prior the posterior mean of flow is 3 L/s (95 % interval 1.25 to 4.75); the prior alone said 5 (0.25 to 9.75).')
    expect(items[1]).toContain('favour the reconciled prior over the comparison prior by a Bayes factor of 4 (positive)')
    expect(items.at(-1)).toContain('divides the evidence by about 4.00')
  })

  it('shows each caution with the candidates it applies to, and the prior-driven rule where that flag shows', () => {
    const w = mountPanel(result([
      candidate({ flags: ['prior-driven-bayes-factor'] }),
      candidate({ key: 'expert-1', label: 'Expert 1', kind: 'expert', flags: ['prior-dominates', 'prior-data-conflict'], priorEss: 44.4, priorPredictiveP: 0.001, logPriorPredictiveP: Math.log(0.001) }),
    ], true))
    const cautions = w.get('[data-testid="impact-cautions"]')
    expect(cautions.findAll('[data-testid="impact-caution"]').map((c) => c.attributes('data-flag'))).toEqual(['prior-dominates', 'prior-data-conflict', 'prior-driven-bayes-factor'])
    expect(cautions.get('[data-flag="prior-dominates"]').text()).toContain('The prior dominates the data — Expert 1.')
    // The product's rules of thumb are labelled as its own conventions, with their reasoning (docs/methods/).
    expect(cautions.get('[data-flag="prior-dominates"]').text()).toContain('Priorsmith’s rule of thumb, not a published test: the prior counts as that many observations')
    expect(cautions.get('[data-flag="prior-data-conflict"]').text()).toContain('the customary 5 % level, a convention')
    expect(cautions.get('[data-testid="prior-driven-rule"]').text()).toBe(PRIOR_DRIVEN_RULE)
    // The prior-driven flag names the fractional Bayes factor as the alternative.
    expect(cautions.get('[data-flag="prior-driven-bayes-factor"]').text()).toContain('The fractional Bayes factor in the table does not hang on the width: report it instead.')
  })

  it('always carries the note on review by a qualified statistician, also without flags', () => {
    const w = mountPanel(result([candidate({})], false))
    expect(w.find('[data-testid="impact-caution"]').exists()).toBe(false)
    expect(w.find('[data-testid="prior-driven-rule"]').exists()).toBe(false)
    expect(w.get('[data-testid="statistician-note"]').text()).toContain('reviewed under the applicable guidance')
    expect(w.get('[data-testid="statistician-note"]').text()).toContain('qualified statistician')
    // The fractional Bayes factor and the power-scaling sensitivities are aids to judgement, not tests.
    expect(w.get('[data-testid="diagnostics-caution"]').text()).toBe(
      'The fractional Bayes factor and the power-scaling sensitivities are aids to judgement, not tests: they say how much a conclusion leans on the prior, not which prior is right. Regulatory guidance on the choice of priors still applies.',
    )
  })
})
