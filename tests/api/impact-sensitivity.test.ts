import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ALPHA_CURVE_POWERS, DIAGNOSTICS_CAUTION } from '../../shared/elicitation/impact'
import {
  fractionalBayesFactor, powerScalingSensitivity, priorPowerCurve, scaleSpread,
  type CandidatePrior, type PilotData, type PriorDistribution,
} from '../../shared/stats/index'
import { lgamma } from '../../shared/stats/special'
import { DEMO_PILOT } from '../../seeds/demo'
import { formatNumber } from '../../shared/format'
import { Client, signedIn, startApi, type ApiHarness } from '../support/api'
import { runImpact } from '../support/impact'

// The fractional Bayes factor and power-scaling sensitivity of every candidate on the demo pilot data (seeds/pilot/), the
// fractional curve of the width sweep and the α-curve of the reconciled prior. The engine's own values are checked against
// scipy in tests/unit/stats/sensitivity.test.ts; here the route must return them for the stored data and the analyst's b.

let h: ApiHarness
let analyst: Client
const quantity: Record<string, number> = {}
const dataset: Record<string, { id: number; data: PilotData }> = {}

type Candidate = {
  kind: string; label: string; prior: PriorDistribution
  fractionalBayesFactor: { logBF: number; b: number } | null
  sensitivity: { prior: number; likelihood: number; diagnosis: string } | null
  diagnosticNotes: string[]
}
const byKind = (body: { candidates: Candidate[] }, kind: string) => body.candidates.find((c) => c.kind === kind)!

async function reconcile(symbol: string, distribution: PriorDistribution): Promise<void> {
  const row = { method: 'linear', weights_mode: 'equal', family: distribution.family, distribution: JSON.stringify(distribution), status: 'reconciled', rationale: 'Test fixture.' }
  const updated = await h.db('reconciliations').where({ quantity_id: quantity[symbol] }).update(row)
  if (!updated) await h.db('reconciliations').insert({ quantity_id: quantity[symbol], ...row })
}

beforeAll(async () => {
  h = startApi()
  analyst = await signedIn(h, 'analyst@kestrel.example')
  const studyId = (await analyst.post('/api/studies', { title: 'sens: demo pilot data diagnostics', context: 'Fractional Bayes factors and power scaling on the demo pilot data.' }).expect(201)).body.id
  const supports: Record<string, string> = { burst_rate: 'positive', alert_uptake: 'proportion', night_flow_cut: 'real' }
  for (const p of DEMO_PILOT) {
    quantity[p.symbol] = (await analyst.post(`/api/studies/${studyId}/quantities`, {
      name: `sens ${p.symbol}`, symbol: p.symbol, unit: '', question: `What is ${p.symbol} for the Kestrel Valley network?`, support: { kind: supports[p.symbol] },
    }).expect(201)).body.id
    let req = analyst.agent.post(`/api/studies/${studyId}/datasets`).set('x-csrf-token', analyst.token)
    const fields: Record<string, unknown> = { quantityId: quantity[p.symbol], name: p.name, ...p.mapping, ...(p.mapping.model === 'binomial' ? { binomialLayout: 'binary' } : {}) }
    for (const [k, v] of Object.entries(fields)) req = req.field(k, String(v))
    const file = readFileSync(new URL(`../../seeds/pilot/${p.file}`, import.meta.url))
    const res = await req.attach('file', file, { filename: p.file, contentType: 'text/csv' })
    expect(res.status).toBe(201)
    dataset[p.symbol] = { id: res.body.id, data: res.body.data }
  }
})
afterAll(async () => {
  await h.close()
})

describe('fractional Bayes factor and power scaling on the demo burst logs (Poisson with exposure)', () => {
  const reconciled: PriorDistribution = { family: 'gamma', shape: 12, rate: 1 }
  const comparison: PriorDistribution = { family: 'gamma', shape: 1, rate: 0.1 }
  const wide: PriorDistribution = { family: 'gamma', shape: 1, rate: 0.05 }
  let body: Record<string, unknown> & { candidates: Candidate[] }

  beforeAll(async () => {
    await reconcile('burst_rate', reconciled)
    const res = await runImpact(analyst, quantity.burst_rate, {
      datasetId: dataset.burst_rate.id, comparison, mixtureWeight: 0.2, mixtureWide: wide,
    })
    expect(res.status).toBe(200)
    body = res.body
  })

  it('gives each candidate the fractional Bayes factor against the comparison prior with b = m₀/n = 1/8', () => {
    const data = dataset.burst_rate.data as Extract<PilotData, { model: 'poisson' }>
    expect(data.counts).toHaveLength(8)
    const rec = byKind(body, 'reconciled')
    expect(rec.fractionalBayesFactor!.b).toBe(1 / 8)
    // Closed form (O'Hagan 1995, §3, with the gamma–Poisson marginal of BDA3 §2.6): ln q(b) = ln m(x) − ln m_b(x), where
    // ln m_b = a ln r − ln Γ(a) + ln Γ(a + bY) − (a + bY) ln(r + bT) without the θ-free constants, which cancel.
    const Y = data.counts.reduce((s, c) => s + c, 0)
    const T = data.exposures.reduce((s, t) => s + t, 0)
    const lnMb = (p: { shape: number; rate: number }, b: number) => p.shape * Math.log(p.rate) - lgamma(p.shape) + lgamma(p.shape + b * Y) - (p.shape + b * Y) * Math.log(p.rate + b * T)
    const lnQ = (p: { shape: number; rate: number }) => lnMb(p, 1) - lnMb(p, 1 / 8)
    expect(rec.fractionalBayesFactor!.logBF).toBeCloseTo(lnQ({ shape: 12, rate: 1 }) - lnQ({ shape: 1, rate: 0.1 }), 9)
    // The robust mixture is compared as a mixture.
    const mix = byKind(body, 'mixture')
    const mixture: CandidatePrior = { family: 'mixture', components: [reconciled, wide], weights: [0.8, 0.2] }
    expect(mix.fractionalBayesFactor!.logBF).toBeCloseTo(fractionalBayesFactor(mixture, comparison, data).logBF, 9)
    expect(mix.fractionalBayesFactor!.b).toBe(1 / 8)
    expect(byKind(body, 'comparison').fractionalBayesFactor).toBeNull()
  })

  it('gives each candidate its prior and likelihood sensitivity with the diagnosis', () => {
    const data = dataset.burst_rate.data
    const priors: Record<string, CandidatePrior> = {
      reconciled, comparison, mixture: { family: 'mixture', components: [reconciled, wide], weights: [0.8, 0.2] },
    }
    for (const [kind, prior] of Object.entries(priors)) {
      const expected = powerScalingSensitivity(prior, data)
      const got = byKind(body, kind).sensitivity!
      expect(got.prior, kind).toBeCloseTo(expected.prior, 9)
      expect(got.likelihood, kind).toBeCloseTo(expected.likelihood, 9)
      expect(got.diagnosis, kind).toBe(expected.diagnosis)
      expect(byKind(body, kind).diagnosticNotes).toEqual([])
    }
    // A gamma(1, 0.1) prior is nearly flat over the data's range: the data drive the result.
    expect(byKind(body, 'comparison').sensitivity!.diagnosis).toBe('likelihood-dominated')
  })

  it('adds the fractional curve to the width sweep and the α-curve of the reconciled prior', () => {
    const data = dataset.burst_rate.data
    const sweep = body.sweep as {
      trainingFraction: number; fractionalRatio: number
      points: { factor: number; logFractionalBF: number }[]; alphaCurve: { alpha: number; mean: number; q05: number; q95: number }[]
    }
    expect(sweep.trainingFraction).toBe(1 / 8)
    expect(sweep.points.find((p) => p.factor === 1)!.logFractionalBF).toBe(0)
    const atOneEvidence = (sweep.points as unknown as { factor: number; logEvidence: number }[]).find((p) => p.factor === 1)!.logEvidence
    for (const p of sweep.points as unknown as { logEvidence: number; logBF: number }[]) expect(p.logBF).toBe(p.logEvidence - atOneEvidence)
    for (const p of sweep.points) {
      const widened = scaleSpread(reconciled, p.factor, { kind: 'positive' })
      expect(p.logFractionalBF, `k = ${p.factor}`).toBeCloseTo(fractionalBayesFactor(widened, reconciled, data).logBF, 9)
    }
    expect(sweep.alphaCurve.map((p) => p.alpha)).toEqual(ALPHA_CURVE_POWERS)
    expect(ALPHA_CURVE_POWERS[0]).toBe(0.5)
    expect(ALPHA_CURVE_POWERS.at(-1)).toBe(2)
    const expected = priorPowerCurve(reconciled, data, ALPHA_CURVE_POWERS)
    sweep.alphaCurve.forEach((p, i) => {
      expect(p.mean).toBeCloseTo(expected[i].mean, 9)
      expect(p.q05).toBeCloseTo(expected[i].q05, 9)
      expect(p.q95).toBeCloseTo(expected[i].q95, 9)
    })
    // At α = 1 the curve is the ordinary posterior, gamma(12 + Y, 1 + T) (BDA3 §2.6), with mean (12 + Y)/(1 + T).
    const atOne = sweep.alphaCurve.find((p) => p.alpha === 1)!
    const data_ = data as Extract<PilotData, { model: 'poisson' }>
    const Y = data_.counts.reduce((s, c) => s + c, 0)
    const T = data_.exposures.reduce((s, t) => s + t, 0)
    expect(atOne.mean).toBeCloseTo((12 + Y) / (1 + T), 9)
  })

  it('uses the analyst’s b, and a new b is a new analysis rather than the cached one', async () => {
    const res = await runImpact(analyst, quantity.burst_rate, {
      datasetId: dataset.burst_rate.id, comparison, mixtureWeight: 0.2, mixtureWide: wide, trainingFraction: 0.5,
    })
    expect(res.status).toBe(200)
    expect(res.body.cached).toBe(false)
    const rec = byKind(res.body, 'reconciled')
    expect(rec.fractionalBayesFactor!.b).toBe(0.5)
    expect(rec.fractionalBayesFactor!.logBF).toBeCloseTo(fractionalBayesFactor(reconciled, comparison, dataset.burst_rate.data, 0.5).logBF, 9)
    expect(rec.fractionalBayesFactor!.logBF).not.toBeCloseTo(byKind(body, 'reconciled').fractionalBayesFactor!.logBF, 3)
    expect(res.body.sweep.trainingFraction).toBe(0.5)
  })

  it('refuses a training fraction outside (0, 1) with a field error and stores nothing', async () => {
    const before = (await h.db('impact_analyses').where({ quantity_id: quantity.burst_rate })).length
    for (const b of [0, 1, 1.5, -0.2]) {
      const res = await runImpact(analyst, quantity.burst_rate, { datasetId: dataset.burst_rate.id, comparison, trainingFraction: b })
      expect(res.status, `b = ${b}`).toBe(400)
      expect(res.body.error.fields).toEqual({ trainingFraction: 'The training fraction b must be greater than 0 and less than 1' })
    }
    const text = await runImpact(analyst, quantity.burst_rate, { datasetId: dataset.burst_rate.id, comparison, trainingFraction: 'half' })
    expect(text.status).toBe(400)
    expect(text.body.error.fields).toEqual({ trainingFraction: 'The training fraction b must be a number' })
    expect((await h.db('impact_analyses').where({ quantity_id: quantity.burst_rate })).length).toBe(before)
  })
})

describe('findings in plain words', () => {
  it('a wide uniform prior on the night-flow data: the fractional Bayes factor stays level and is named as the alternative', async () => {
    await reconcile('night_flow_cut', { family: 'uniform', lower: -40, upper: 40 })
    const res = await runImpact(analyst, quantity.night_flow_cut, { datasetId: dataset.night_flow_cut.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
    expect(res.status).toBe(200)
    const { sweep, findings } = res.body as { sweep: { evidenceRatio: number; fractionalRatio: number; priorDriven: boolean }; findings: string[] }
    // U(−40, 40) is far wider than the likelihood (σ/√n = 1.5/√8): widening divides the evidence by k, the fraction m/m_b stays.
    expect(sweep.evidenceRatio).toBeGreaterThan(3.99)
    expect(sweep.fractionalRatio).toBeLessThan(1.0001)
    expect(sweep.priorDriven).toBe(true)
    expect(findings).toContain('Over the same widening the fractional Bayes factor (training fraction b = 0.125) stays level (it changes by less than 0.1 %), where the ordinary Bayes factor changes by a factor of about 4.')
    expect(findings.find((f) => f.startsWith('A Bayes factor built on this prior reflects its width'))).toMatch(/The fractional Bayes factor, which does not hang on the width, is the alternative to report\.$/)
  })

  it('a narrow prior near the data reads as a weak likelihood, a strong prior far from it as a prior–data conflict', async () => {
    const data = dataset.night_flow_cut.data
    await reconcile('night_flow_cut', { family: 'normal', mu: 3.7, sigma: 0.3 })
    const near = await runImpact(analyst, quantity.night_flow_cut, { datasetId: dataset.night_flow_cut.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
    const weak = byKind(near.body, 'reconciled').sensitivity!
    expect(weak).toEqual(powerScalingSensitivity({ family: 'normal', mu: 3.7, sigma: 0.3 }, data))
    expect(weak.diagnosis).toBe('weak-likelihood')
    expect(near.body.findings).toContain(
      `Reconciled prior: the posterior moves when the prior is given more or less weight (sensitivity ${formatNumber(weak.prior, 3)}) but hardly when the data are (${formatNumber(weak.likelihood, 3)}, below 0.05): the data say little here, so the prior carries the result.`,
    )

    await reconcile('night_flow_cut', { family: 'normal', mu: 8, sigma: 0.5 })
    const far = await runImpact(analyst, quantity.night_flow_cut, { datasetId: dataset.night_flow_cut.id, comparison: { family: 'normal', mu: 0, sigma: 10 } })
    const conflict = byKind(far.body, 'reconciled').sensitivity!
    expect(conflict.diagnosis).toBe('prior-data-conflict')
    expect(far.body.findings.some((f: string) => f.startsWith('Reconciled prior: the posterior moves when either the prior or the data is given more weight') && f.endsWith('prior and data may be in conflict.'))).toBe(true)
  })

  it('the survey (binomial, 120 households) uses b = 1/120; the caution is exported for every screen', async () => {
    await reconcile('alert_uptake', { family: 'beta', alpha: 2, beta: 8 })
    const res = await runImpact(analyst, quantity.alert_uptake, { datasetId: dataset.alert_uptake.id, comparison: { family: 'uniform', lower: 0, upper: 1 } })
    expect(res.status).toBe(200)
    const rec = byKind(res.body, 'reconciled')
    expect(rec.fractionalBayesFactor!.b).toBe(1 / 120)
    expect(rec.fractionalBayesFactor!.logBF).toBeCloseTo(fractionalBayesFactor({ family: 'beta', alpha: 2, beta: 8 }, { family: 'uniform', lower: 0, upper: 1 }, dataset.alert_uptake.data).logBF, 9)
    expect(DIAGNOSTICS_CAUTION).toMatch(/aids to judgement, not tests.*Regulatory guidance on the choice of priors still applies\.$/)
  })
})
