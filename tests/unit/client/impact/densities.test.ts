import { describe, expect, it } from 'vitest'
import { pdf, quantile } from '@shared/stats'
import { evaluateCandidates } from '@shared/elicitation/impact'
import { chartRange, curveStyle, densityFromCdf, grid, priorModel } from '@/impact/densities'
import type { ImpactCandidate } from '@/api/impact'

const candidate = (kind: ImpactCandidate['kind'], prior: ImpactCandidate['prior']): ImpactCandidate => ({
  key: kind, label: kind, kind, prior, priorSummary: { mean: 0, q025: 0, q975: 0 }, logEvidence: 0, method: 'closed-form',
  posterior: { mean: 0, sd: 0, q025: 0, q50: 0, q975: 0 }, priorPredictiveP: 0.5, logPriorPredictiveP: Math.log(0.5), priorEss: null, bayesFactor: null, decision: null, flags: [],
})
const flow = { model: 'normal-known-sigma' as const, sigma: 2, values: [2.2, 3.5, 2.8, 3.9, 2.6] }

describe('densities drawn in the browser', () => {
  it('recovers a density from its CDF by central differences', () => {
    const d = { family: 'normal' as const, mu: 3, sigma: 0.9 }
    const xs = grid([0, 6], 300)
    const points = densityFromCdf((x) => {
      const z = (x - 3) / 0.9
      return 0.5 * (1 + Math.tanh(z * 0.7978845608 * (1 + 0.044715 * z * z)))
    }, xs)
    const mid = points[150]
    expect(mid.x).toBeCloseTo(3, 10)
    expect(mid.y!).toBeCloseTo(pdf(d, 3), 2)
    expect(points.every((p) => p.y !== null && p.y >= 0)).toBe(true)
  })

  it('gives the conjugate posterior under a normal prior: N(3.0, σ²/n) pulled slightly toward the prior mean', () => {
    const m = priorModel(candidate('reconciled', { family: 'normal', mu: 0, sigma: 10 }), flow)
    // Posterior precision 1/100 + 5/4; mean (0/100 + 15/4) / (1/100 + 5/4) = 2.97619…
    expect(m.posterior.mean()).toBeCloseTo(3.75 / 1.26, 10)
    expect(m.pdf(0)).toBeCloseTo(pdf({ family: 'normal', mu: 0, sigma: 10 }, 0), 12)
  })

  it('weights the robust mixture by weight and evidence and keeps the wide comparison prior out of the x range', () => {
    const rec = candidate('reconciled', { family: 'normal', mu: 3, sigma: 0.5 })
    const mix = priorModel(candidate('mixture', rec.prior), flow, { mixtureWeight: 0.2, mixtureWide: { family: 'normal', mu: 3, sigma: 50 } })
    expect(mix.pdf(3)).toBeCloseTo(0.8 * pdf(rec.prior, 3) + 0.2 * pdf({ family: 'normal', mu: 3, sigma: 50 }, 3), 12)
    const ref = candidate('comparison', { family: 'uniform', lower: -100, upper: 100 })
    const [lo, hi] = chartRange([{ kind: 'reconciled', model: priorModel(rec, flow) }, { kind: 'comparison', model: priorModel(ref, flow) }])
    // The comparison prior's posterior (≈ N(3.0, 0.894²)) sets the range, not that prior's own ±100.
    expect(lo).toBeCloseTo(3 - 3.0902 * (2 / Math.sqrt(5)) - 0.04 * (hi - lo), 1)
    expect(hi).toBeLessThan(6.5)
    expect(lo).toBeLessThan(quantile(rec.prior, 0.005))
    expect(chartRange([{ kind: 'reconciled', model: priorModel(rec, flow) }], { kind: 'positive' })[0]).toBeGreaterThanOrEqual(0)
  })

  it('draws the robust mixture with the same prior and posterior quantiles as the server summary, to one tolerance', () => {
    const rec = { family: 'normal' as const, mu: 1.5, sigma: 0.4 }
    const wide = { family: 'normal' as const, mu: 1.5, sigma: 40 }
    const [server] = evaluateCandidates([{ key: 'mix', label: 'Mixture', kind: 'mixture', prior: rec, mixture: { components: [rec, wide], weights: [0.7, 0.3] } }], flow, null)
    const drawn = priorModel(candidate('mixture', rec), flow, { mixtureWeight: 0.3, mixtureWide: wide })
    for (const [p, key] of [[0.025, 'q025'], [0.5, 'q50'], [0.975, 'q975']] as const) {
      expect(Math.abs(drawn.posterior.quantile(p) - server.posterior[key])).toBeLessThan(1e-13 * Math.max(1, Math.abs(server.posterior[key])))
    }
    expect(Math.abs(drawn.quantile(0.975) - server.priorSummary.q975)).toBeLessThan(1e-13 * Math.abs(server.priorSummary.q975))
    expect(drawn.posterior.sd()).toBeCloseTo(server.posterior.sd, 12)
    // Constructed check: the mixture posterior's CDF at its own median is one half.
    expect(drawn.posterior.cdf(server.posterior.q50)).toBeCloseTo(0.5, 12)
  })

  it('draws the reconciled prior amber and its posterior green, the pool ink dashed', () => {
    expect(curveStyle('reconciled', 'prior')).toMatchObject({ color: '#c9821a', dash: [] })
    expect(curveStyle('reconciled', 'posterior')).toMatchObject({ color: '#1f6f5c', dash: [] })
    expect(curveStyle('pooled', 'prior')).toMatchObject({ color: '#1d2733', dash: [6, 4] })
  })
})
