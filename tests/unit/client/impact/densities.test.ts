import { describe, expect, it } from 'vitest'
import { pdf, quantile } from '@shared/stats'
import { evaluateCandidates } from '@shared/elicitation/impact'
import { candidateLook, chartRange, densityFromCdf, grid, markerIndices, priorModel, ROLE_DASH } from '@/impact/densities'
import type { ImpactCandidate } from '@/api/impact'

const candidate = (kind: ImpactCandidate['kind'], prior: ImpactCandidate['prior']): ImpactCandidate => ({
  key: kind, label: kind, kind, prior, priorSummary: { mean: 0, q025: 0, q975: 0 }, logEvidence: 0, method: 'closed-form',
  posterior: { mean: 0, sd: 0, q025: 0, q50: 0, q975: 0 }, priorPredictiveP: 0.5, logPriorPredictiveP: Math.log(0.5), priorEss: null, bayesFactor: null,
  fractionalBayesFactor: null, sensitivity: null, diagnosticNotes: [], decision: null, flags: [],
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

  it('gives every candidate kind and the first five experts a colour and a marker of its own; priors dashed, posteriors solid', () => {
    const looks = [...(['reconciled', 'comparison', 'mixture', 'pooled', 'consensus'] as const).map((k) => candidateLook(k)), ...[0, 1, 2, 3, 4].map((i) => candidateLook('expert', i))]
    expect(new Set(looks.map((l) => l.color)).size).toBe(looks.length)
    expect(candidateLook('reconciled')).toEqual({ color: '#1f6f5c', marker: 'circle', width: 2.75 })
    expect(candidateLook('comparison')).toEqual({ color: '#5b6b7a', marker: 'rect', width: 2 })
    // Beside the five kinds, every expert's marker differs from the others' (the reconciled prior and the comparison prior keep theirs).
    const experts = [0, 1, 2, 3, 4].map((i) => candidateLook('expert', i).marker)
    expect(new Set(experts).size).toBe(5)
    expect(experts).not.toContain('circle')
    expect(ROLE_DASH).toEqual({ prior: [7, 4], posterior: [] })
  })

  it('puts markers every 30 grid points from the offset, only where the curve stands above 5 % of its peak', () => {
    const points = grid([0, 240]).map((x) => ({ x, y: x < 100 ? 0 : x < 200 ? 1 : 0.01 }))
    expect(markerIndices(points, 6)).toEqual([126, 156, 186])
    expect(markerIndices(points.map((p) => ({ ...p, y: 0 })), 6)).toEqual([])
  })
})
