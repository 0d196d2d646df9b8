import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { analyzePrior, type PriorDistribution } from '@shared/stats'
import { SigmaMarginal } from '@shared/stats/sigma-marginal'
import { logNormPdf, lgamma } from '@shared/stats/special'
import { expectAbs, expectRel } from './checks'

type Fixture = {
  marginals: { n: number; scale: number; q: number; log_m: number }[]
  evidence: { prior: PriorDistribution; values: number[]; sigma_prior: PriorDistribution; log_ml: number; post_mean: number }[]
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

