import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { analyzePrior, type PriorDistribution } from '@shared/stats'
import { normalStats, sigmaMarginalFor } from '@shared/stats/evidence'
import { LogIntegral } from '@shared/stats/quadrature'
import { SigmaMarginal } from '@shared/stats/sigma-marginal'
import { lgamma, logGammaPQ, logNormCdf, logNormPdf } from '@shared/stats/special'
import { expectAbs, expectRel } from './checks'

type Fixture = {
  marginals: { n: number; scale: number; q: number; log_m: number }[]
  powered: { n: number; scale: number; power: number; q: number; log_m: number }[]
  evidence: { prior: PriorDistribution; values: number[]; sigma_prior: PriorDistribution; log_ml: number; post_mean: number }[]
  box_checks: { prior: PriorDistribution; values: number[]; sigma_prior: PriorDistribution; log_p: number }[]
}
const fixture = JSON.parse(readFileSync(new URL('./fixtures/sigma-marginal.json', import.meta.url), 'utf8')) as Fixture

/** The σ prior on v = ln σ (Jacobian included), as the engine hands it to SigmaMarginal. */
function onLogSigma(logPdf: (sigma: number) => number, centre: number, spread: number) {
  return {
    theta: Math.exp,
    logPrior: (v: number) => logPdf(Math.exp(v)) + v,
    hints: (sigma: number | null, width: number | null) => [{ center: centre, scale: spread }, ...(sigma !== null && width !== null ? [{ center: Math.log(sigma), scale: width / sigma }] : [])],
  }
}
const halfNormal = (s: number) => onLogSigma((x) => Math.LN2 + logNormPdf(x / s) - Math.log(s), Math.log(s), 0.7)

// Outside check: fixtures/sigma-marginal.json (generate_sigma_marginal.py): σ ~ half-normal(s) integrated out in closed form
// through the Bessel function K (Gradshteyn & Ryzhik 2007, 3.471.9), evaluated with mpmath 1.3 at 50 digits.
describe('likelihood of μ with σ integrated out over a half-normal prior (Gradshteyn & Ryzhik 3.471.9)', () => {
  for (const c of fixture.marginals) {
    it(`n = ${c.n}, s = ${c.scale}, q = ${c.q}: the table and the direct integral both match the Bessel form`, () => {
      const m = new SigmaMarginal(halfNormal(c.scale), c.n, 0.01, c.scale)
      expectAbs(m.direct(c.q), c.log_m, 1e-12 * Math.max(1, Math.abs(c.log_m)), 'direct')
      expectAbs(m.logM(c.q), c.log_m, 1e-11 * Math.max(1, Math.abs(c.log_m)), 'table')
    })
  }
})

// Outside check: the same Bessel form at n·a observations read at a·q, the likelihood raised to the power a that power
// scaling and the fractional Bayes factor integrate (fixtures/sigma-marginal.json, "powered").
describe('the likelihood raised to a power a: M for n·a observations at a·q (Gradshteyn & Ryzhik 3.471.9)', () => {
  for (const c of fixture.powered) {
    it(`n = ${c.n}, a = ${c.power.toPrecision(4)}, s = ${c.scale}, q = ${c.q}: the engine's shared table matches the Bessel form`, () => {
      const st = { n: c.n, mean: 0, ss: 0.01 }
      const m = sigmaMarginalFor(st, { family: 'half-normal', scale: c.scale }, c.power)
      expectAbs(m.logM(c.power * c.q), c.log_m, 1e-11 * Math.max(1, Math.abs(c.log_m)), 'table')
      expectAbs(m.direct(c.power * c.q), c.log_m, 1e-12 * Math.max(1, Math.abs(c.log_m)), 'direct')
    })
  }
})

// Outside check: the same fixture, the evidence ∫ p(μ) M(S + n(x̄ − μ)²) dμ and the posterior mean by mpmath.quad at 50 digits.
describe('normal data with unknown σ, non-normal priors on μ: evidence and posterior mean against mpmath', () => {
  for (const c of fixture.evidence) {
    it(`${c.prior.family} ${JSON.stringify(c.prior)}`, () => {
      const a = analyzePrior(c.prior, { model: 'normal', values: c.values, sigmaPrior: c.sigma_prior }, { skipPredictiveCheck: true })
      expectAbs(a.logEvidence, c.log_ml, 1e-10 * Math.max(1, Math.abs(c.log_ml)), 'log evidence')
      expectRel(a.posterior.mean, c.post_mean, 1e-9, 'posterior mean')
    })
  }
})

// Constructed check: for σ priors without a closed form, every piece of the table agrees with the direct quadrature at
// points that are not its nodes, over ten orders of magnitude of q.
describe('the table agrees with the direct σ integral wherever it is read', () => {
  const priors = {
    'gamma(2, 1)': onLogSigma((x) => 2 * Math.log(1) - lgamma(2) + Math.log(x) - x, Math.log(2), 0.7),
    'lognormal(0, 1)': onLogSigma((x) => logNormPdf(Math.log(x)) - Math.log(x), 0, 1),
    'half-normal(0.2)': halfNormal(0.2),
  }
  for (const [name, scale] of Object.entries(priors)) {
    for (const n of [1, 3, 40]) {
      it(`${name}, n = ${n}`, () => {
        const m = new SigmaMarginal(scale, n, n > 1 ? 0.37 : 0, 1)
        for (let i = 0; i <= 60; i++) {
          const q = (n > 1 ? 0.37 : 0) + 10 ** (-3 + i / 6) * 1.0123
          const direct = m.direct(q)
          expectAbs(m.logM(q), direct, 1e-11 * Math.max(1, Math.abs(direct)), `q = ${q}`)
        }
      })
    }
  }
})

// Constructed check: a table is built once per (n, S, σ prior) and then shared, so a sweep reads it without rebuilding.
describe('one table serves a whole width sweep', () => {
  it('the direct integral is not called again for a second prior on the same data', () => {
    const values = [4.1, 5.3, 3.7, 4.9, 5.05, 4.44]
    const sigmaPrior: PriorDistribution = { family: 'half-normal', scale: 3.3 }
    const calls = { n: 0 }
    const original = SigmaMarginal.prototype.direct
    SigmaMarginal.prototype.direct = function (q: number) {
      calls.n++
      return original.call(this, q)
    }
    try {
      analyzePrior({ family: 'student-t', mu: 4, sigma: 1, df: 4 }, { model: 'normal', values, sigmaPrior }, { skipPredictiveCheck: true })
      const first = calls.n
      analyzePrior({ family: 'student-t', mu: 4, sigma: 1.3, df: 4 }, { model: 'normal', values, sigmaPrior }, { skipPredictiveCheck: true })
      expect(first).toBeGreaterThan(0)
      expect(calls.n).toBe(first)
    } finally {
      SigmaMarginal.prototype.direct = original
    }
  })
})


// Constructed check: the table at a power a (non-whole n·a) against the defining integral ∫ π(σ) (2πσ²)^(−na/2) e^(−aq/2σ²) dσ,
// over twelve orders of magnitude of q (far beyond the widths any prior reaches): for a uniform(0, U) prior in closed form,
// ½ c^(−(m−1)/2) Γ((m−1)/2, c/U²)/U with m = na, c = aq/2 (x = c/σ² in Abramowitz & Stegun 1964, 6.5.3); for the others by a
// quadrature on ln σ of its own.
describe('the powered table agrees with the defining integral wherever it is read', () => {
  const priors: Record<string, PriorDistribution> = {
    'gamma(2, 1)': { family: 'gamma', shape: 2, rate: 1 },
    'lognormal(0, 1)': { family: 'lognormal', meanlog: 0, sdlog: 1 },
    'uniform(0, 20)': { family: 'uniform', lower: 0, upper: 20 },
  }
  const logPdf: Record<string, (sigma: number) => number> = {
    'gamma(2, 1)': (x) => Math.log(x) - x,
    'lognormal(0, 1)': (x) => logNormPdf(Math.log(x)) - Math.log(x),
  }
  const values = [4.1, 5.3, 3.7, 4.9, 5.05, 4.44]
  const st = normalStats(values)
  const defining = (name: string, a: number, q: number): number => {
    const m = st.n * a
    if (name === 'uniform(0, 20)') {
      const c = (a * q) / 2
      const s = (m - 1) / 2
      return -Math.log(20) - (m / 2) * Math.log(2 * Math.PI) - Math.LN2 - s * Math.log(c) + lgamma(s) + logGammaPQ(s, c / 400).logQ
    }
    return new LogIntegral(
      (v) => logPdf[name](Math.exp(v)) + v - m * v - (a * q) / (2 * Math.exp(2 * v)) - (m / 2) * Math.log(2 * Math.PI),
      [{ center: 0.5 * Math.log(q / st.n), scale: 0.3 }, { center: 1, scale: 1 }],
    ).logValue
  }
  for (const [name, sigmaPrior] of Object.entries(priors)) {
    for (const a of [1 / 3, 1 / 1.01, 1.01]) {
      it(`${name}, a = ${a.toPrecision(4)}`, () => {
        const m = sigmaMarginalFor(st, sigmaPrior, a)
        for (let i = 0; i <= 24; i++) {
          const q = st.ss * 10 ** (i / 2)
          const exact = defining(name, a, q)
          expectAbs(m.logM(a * q), exact, 1e-10 * Math.max(1, Math.abs(exact)), `q = ${q}`)
        }
      })
    }
  }
})

// Outside check: Box's prior predictive p of x̄ with σ unknown (fixtures/sigma-marginal.json, "box_checks": the kernel of
// x̄ − μ in its K₀ closed form, scipy quad for its CDF and the convolutions with the prior, the density-ordinate p of Box 1980
// for the skewed priors, twice the tail for the t prior).
describe("Box's check with σ unknown against scipy", () => {
  for (const c of fixture.box_checks) {
    it(`${JSON.stringify(c.prior)}, ${c.values.length} values: ln p ${c.log_p.toFixed(4)} to 1e-9`, () => {
      const a = analyzePrior(c.prior, { model: 'normal', values: c.values, sigmaPrior: c.sigma_prior })
      expectAbs(a.logPriorPredictiveP, c.log_p, 1e-9 * Math.max(1, Math.abs(c.log_p)), 'ln p')
    })
  }

  // Constructed check for σ priors without a closed kernel: twice the tail of x̄ under a t prior on μ equals the average over
  // the σ prior's own quadrature nodes of the tail given σ, each by its own quadrature over μ (the double integral taken
  // in the other order).
  for (const sigmaPrior of [{ family: 'gamma', shape: 2, rate: 1 }, { family: 'lognormal', meanlog: 0, sdlog: 1 }] as PriorDistribution[]) {
    it(`t prior on μ, σ ~ ${sigmaPrior.family}: ln p equals the node-by-node double integral`, () => {
      const values = [2.2, 3.5, 2.8, 3.9, 2.6]
      const prior: PriorDistribution = { family: 'student-t', mu: 5, sigma: 1, df: 5 }
      const n = values.length
      const xbar = values.reduce((s, v) => s + v, 0) / n
      const logSigmaPrior = sigmaPrior.family === 'gamma' ? (x: number) => Math.log(x) - x : (x: number) => logNormPdf(Math.log(x)) - Math.log(x)
      const sigmaNodes = new LogIntegral((v) => logSigmaPrior(Math.exp(v)) + v, [{ center: 0.5, scale: 0.7 }]).nodes()
      const total = sigmaNodes.reduce((s, nd) => s + nd.weight, 0)
      const tLog = (mu: number) => lgamma(3) - lgamma(2.5) - 0.5 * Math.log(5 * Math.PI) - 3 * Math.log1p((mu - 5) ** 2 / 5)
      let tail = 0
      for (const nd of sigmaNodes) {
        if (!(nd.weight > 1e-18 * total)) continue
        const se = Math.exp(nd.u) / Math.sqrt(n)
        const given = new LogIntegral((mu) => tLog(mu) + logNormCdf((xbar - mu) / se), [{ center: 5, scale: 1 }, { center: xbar, scale: se }]).logValue
        tail += (nd.weight / total) * Math.exp(given)
      }
      const a = analyzePrior(prior, { model: 'normal', values, sigmaPrior })
      expectAbs(a.logPriorPredictiveP, Math.log(2 * tail), 1e-9, 'ln p')
    })
  }
})
