import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import {
  analyzePrior,
  boxCheckNormalNormal,
  normalInverseGamma,
  priorEffectiveSampleSize,
  type PilotData,
  type PriorDistribution,
} from '@shared/stats'
import { integrate, LogIntegral } from '@shared/stats/quadrature'
import { betaPQ, lbeta, lgamma, logNormPdf } from '@shared/stats/special'
import { check, expectAbs, expectRel } from './checks'

const stdlibNormalCdf = createRequire(import.meta.url)('@stdlib/stats-base-dists-normal-cdf') as (x: number, m: number, s: number) => number

const X = [2.2, 3.5, 2.8, 3.9, 2.6]
const known = (sigma: number, values = X): PilotData => ({ model: 'normal-known-sigma', sigma, values })

// Outside check: ML-normal-normal-* of fixtures/checks.json — Gelman et al. (2013) BDA3 §2.5; closed form evaluated with mpmath 1.3.0 at 40 digits,
// cross-checked against scipy's multivariate normal log-density of x ~ MVN(m₀1, σ²I + τ²11ᵀ).
describe('normal data, known σ, normal prior (BDA3 §2.5)', () => {
  for (const id of ['ML-normal-normal-1', 'ML-normal-normal-2']) {
    it(`${id}: log evidence with all constants, posterior mean and sd`, () => {
      const c = check(id)
      const a = analyzePrior({ family: 'normal', mu: c.inputs.prior.mean, sigma: c.inputs.prior.sd }, known(c.inputs.sigma, c.inputs.data))
      expect(a.method).toBe('closed-form')
      expectAbs(a.logEvidence, c.expected.log_ml, c.tolerance.abs_log)
      expectRel(a.posterior.mean, c.expected.post_mean, c.tolerance.rel)
      expectRel(a.posterior.sd, c.expected.post_sd, c.tolerance.rel)
      expectRel(a.posterior.q50, c.expected.post_mean, 1e-14)
    })
  }
})

// Outside check: ML-normal-uniform-* of fixtures/checks.json — closed form via normal CDFs (posterior = N(x̄, σ²/n) truncated to [a, b]); mpmath 1.3.0 at
// 40 digits; scipy quad and scipy.stats.truncnorm agree to 1e-15.
describe('normal data, known σ, uniform prior U(0, A) (truncated normal posterior)', () => {
  for (const id of ['ML-normal-uniform-A10', 'ML-normal-uniform-A4']) {
    it(`${id}: log evidence keeps Z; truncated-normal posterior`, () => {
      const c = check(id)
      const a = analyzePrior({ family: 'uniform', lower: c.inputs.prior.lower, upper: c.inputs.prior.upper }, known(c.inputs.sigma, c.inputs.data))
      expect(a.method).toBe('closed-form')
      expectAbs(a.logEvidence, c.expected.log_ml, c.tolerance.abs_log)
      expectRel(Math.exp(a.logEvidence), c.expected.ml, c.tolerance.rel)
      expectRel(a.posterior.mean, c.expected.post_mean, c.tolerance.rel)
      expectRel(a.posterior.sd, c.expected.post_sd, c.tolerance.rel)
    })
  }
})

// Outside check: ML-beta-binomial-* of fixtures/checks.json — C(n, y) B(a + y, b + n − y)/B(a, b) (BDA3 §2.4), mpmath 1.3.0; scipy betabinom.logpmf.
describe('beta–binomial (BDA3 §2.4)', () => {
  for (const id of ['ML-beta-binomial-y7-n20', 'ML-beta-binomial-y0-n10']) {
    it(`${id}: the count form of the evidence (with C(n, y)) and the posterior`, () => {
      const c = check(id)
      const a = analyzePrior({ family: 'beta', alpha: c.inputs.prior.a, beta: c.inputs.prior.b }, { model: 'binomial', successes: c.inputs.y, trials: c.inputs.n })
      expect(a.method).toBe('closed-form')
      expectAbs(a.logEvidence, c.expected.log_ml_count, c.tolerance.abs_log)
      expectRel(a.posterior.mean, c.expected.post_mean, 1e-12)
      expect(a.priorEss).toBe(c.inputs.prior.a + c.inputs.prior.b)
    })
  }

  it('the uniform prior on [0, 1] is Beta(1, 1): evidence 1/(n + 1), closed form', () => {
    const a = analyzePrior({ family: 'uniform', lower: 0, upper: 1 }, { model: 'binomial', successes: 0, trials: 10 })
    expect(a.method).toBe('closed-form')
    expectAbs(a.logEvidence, -Math.log(11), 1e-12)
  })
})

// Outside check: ML-gamma-poisson-* of fixtures/checks.json — negative-binomial marginal with exposures (BDA3 §2.6), mpmath 1.3.0; scipy quad / nbinom.
describe('gamma–Poisson with exposures (BDA3 §2.6)', () => {
  for (const id of ['ML-gamma-poisson-1', 'ML-gamma-poisson-2', 'ML-gamma-poisson-3']) {
    it(`${id}: evidence with the 1/y! and t^y terms; posterior Gamma(a + Σy, b + Σt)`, () => {
      const c = check(id)
      const a = analyzePrior(
        { family: 'gamma', shape: c.inputs.prior.shape, rate: c.inputs.prior.rate },
        { model: 'poisson', counts: c.inputs.counts, exposures: c.inputs.exposures },
      )
      expect(a.method).toBe('closed-form')
      expectAbs(a.logEvidence, c.expected.log_ml, c.tolerance.abs_log)
      expectRel(a.posterior.mean, c.expected.post_mean, 1e-12)
      expectRel(a.posterior.sd, Math.sqrt(c.expected.post.shape) / c.expected.post.rate, 1e-12)
    })
  }
})

// Outside check: ML-NIG-* of fixtures/checks.json — Murphy (2007) NIG section / BDA3 §3.3; mpmath 1.3.0; scipy multivariate_t and dblquad.
describe('normal data, unknown mean and variance, normal–inverse-gamma prior (BDA3 §3.3)', () => {
  for (const id of ['ML-NIG-1', 'ML-NIG-2']) {
    it(`${id}: posterior parameters and log evidence; the same evidence by quadrature over σ`, () => {
      const c = check(id)
      const r = normalInverseGamma(c.inputs.data, c.inputs.prior)
      const e = c.expected
      expectRel(r.kappaN, e.kappa_n, 1e-12)
      expectRel(r.mN, e.m_n, 1e-12)
      expectRel(r.alphaN, e.alpha_n, 1e-12)
      expectRel(r.betaN, e.beta_n, 1e-12)
      expectRel(r.posteriorMeanSigma2, e.post_mean_sigma2, 1e-12)
      expectRel(r.mu.sigma, e.post_mu_t_scale, 1e-12)
      expect(r.mu.df).toBe(e.post_mu_t_df)
      expectAbs(r.logEvidence, e.log_ml, c.tolerance.abs_log)
      // Consistency check, not an outside one (the outside value is log_ml above, mpmath; scipy's multivariate t agrees):
      // μ | σ integrated in closed form, then σ by the engine's own log-space quadrature on ln σ,
      // with p(σ) = 2σ · IG(σ²; α₀, β₀).
      const { m0, kappa0, alpha0, beta0 } = c.inputs.prior
      const n = X.length
      const xbar = X.reduce((s, v) => s + v, 0) / n
      const ss = X.reduce((s, v) => s + (v - xbar) ** 2, 0)
      const h = (u: number): number => {
        const s2 = Math.exp(2 * u)
        const logPriorSigma = Math.log(2) + 2 * u + alpha0 * Math.log(beta0) - lgamma(alpha0) - (alpha0 + 1) * Math.log(s2) - beta0 / s2
        const pred = Math.sqrt(s2 / kappa0 + s2 / n)
        const cond = -(n / 2) * Math.log(2 * Math.PI * s2) - ss / (2 * s2) + 0.5 * Math.log((2 * Math.PI * s2) / n) + logNormPdf((xbar - m0) / pred) - Math.log(pred)
        return logPriorSigma + cond
      }
      const li = new LogIntegral(h, [{ center: 0, scale: 0.5 }])
      expectRel(li.logValue, e.log_ml, 1e-12)
    })
  }
})

// Outside check: WIDTH-uniform of fixtures/checks.json — prior-width effect, closed form via normal CDFs at 40 digits; scipy quad cross-check.
describe('prior width, U(0, A) on a normal mean (WIDTH-uniform)', () => {
  it('evidence halves as A doubles while the posterior is unchanged', () => {
    const c = check('WIDTH-uniform')
    const results = Object.fromEntries(
      (c.inputs.A as number[]).map((A) => [A, analyzePrior({ family: 'uniform', lower: 0, upper: A }, known(c.inputs.sigma, c.inputs.data))]),
    )
    for (const [A, row] of Object.entries(c.expected.table as Record<string, any>)) {
      expectAbs(results[A].logEvidence, row.log_ml, 1e-10, `A=${A}`)
      expectRel(Number(A) * Math.exp(results[A].logEvidence), row.A_times_ml, c.tolerance.rel, `A·p(x), A=${A}`)
      expectRel(results[A].posterior.mean, row.post_mean, c.tolerance.rel)
      expectRel(results[A].posterior.sd, row.post_sd, c.tolerance.rel)
    }
    expectRel(Math.exp(results[10].logEvidence - results[40].logEvidence), c.expected.evidence_ratio_A10_over_A40, c.tolerance.rel)
    expectRel(2 * (results[10].logEvidence - results[40].logEvidence), c.expected.two_ln_BF_A10_vs_A40, c.tolerance.rel)
    expect(Math.abs(results[10].posterior.mean - results[40].posterior.mean)).toBeLessThan(1e-9)
  })
})

// Outside check: BOX-* of fixtures/checks.json — Box (1980) JRSS A 143:383–430; closed form at 40 digits (mpmath), scipy cross-check.
describe("Box's prior predictive check (Box 1980)", () => {
  for (const id of ['BOX-1', 'BOX-2']) {
    it(`${id}: the sample-mean p-value (API) and the full-data variant`, () => {
      const c = check(id)
      const prior = { family: 'normal' as const, mu: c.inputs.prior.mean, sigma: c.inputs.prior.sd }
      const a = analyzePrior(prior, known(c.inputs.sigma, c.inputs.data))
      expectRel(a.priorPredictiveP, c.expected.p_two_sided, c.tolerance.rel)
      const b = boxCheckNormalNormal(c.inputs.data, c.inputs.sigma, { mu: prior.mu, sigma: prior.sigma })
      expectRel(b.predictiveSd, c.expected.pred_sd_xbar, c.tolerance.rel)
      expectRel(b.z, c.expected.z, c.tolerance.rel)
      expectRel(b.pUpperTail, c.expected.p_upper_tail, c.tolerance.rel)
      expectRel(b.fullDataQ, c.expected.full_data_Q, c.tolerance.rel)
      expectRel(b.fullDataP, c.expected.full_data_p_chi2_n, c.tolerance.rel)
    })
  }

  it('uniform prior: the predictive of x̄ is symmetric, p = 2·P(X̄ ≥ x̄) from the closed-form convolution equals the quadrature route', () => {
    const closed = analyzePrior({ family: 'uniform', lower: 0, upper: 4 }, known(2))
    const viaT = analyzePrior({ family: 'uniform', lower: 0, upper: 4 }, known(2), { forceQuadrature: true })
    expectRel(closed.priorPredictiveP, viaT.priorPredictiveP, 1e-12)
    // P(U + E ≥ 3) for U ~ U(0, 4), E ~ N(0, 4/5), as ¼∫₀⁴ Φ((u − 3)/se) du with stdlib's Φ
    const se = 2 / Math.sqrt(5)
    const direct = integrate((u) => 0.25 * stdlibNormalCdf((u - 3) / se, 0, 1), [0, 3, 4]).value
    expectRel(closed.priorPredictiveP, 2 * direct, 1e-12)
  })

  it('asymmetric prior (lognormal on a normal mean): density-ordered p matches an independent scipy computation', () => {
    // scipy 1.17 (quad epsrel 1e-13, minimize_scalar, brentq xtol 1e-14): mode 1.60584, equal-density point 0.588218, p = 0.5969911891077961
    const a = analyzePrior({ family: 'lognormal', meanlog: 1, sdlog: 1 }, known(2))
    expectRel(a.priorPredictiveP, 0.5969911891077961, 1e-9)
  })

  it('counts: 2·min(P(T ≤ t), P(T ≥ t)) from the beta-binomial and negative binomial, equal to the quadrature route', () => {
    const bb = analyzePrior({ family: 'beta', alpha: 2, beta: 3 }, { model: 'binomial', successes: 7, trials: 20 })
    // scipy.stats.betabinom(20, 2, 3): 2·min(cdf(7), sf(6)) = 0.9723320158102776
    expectRel(bb.priorPredictiveP, 0.9723320158102776, 1e-12)
    const bbq = analyzePrior({ family: 'beta', alpha: 2, beta: 3 }, { model: 'binomial', successes: 7, trials: 20 }, { forceQuadrature: true })
    expectRel(bbq.priorPredictiveP, bb.priorPredictiveP, 1e-9)
    const gp = analyzePrior({ family: 'gamma', shape: 2, rate: 0.5 }, { model: 'poisson', counts: [2, 4, 3, 0, 5], exposures: [1, 1, 1, 1, 1] })
    // scipy.stats.nbinom(2, 0.5/5.5): 2·min(cdf(14), sf(13)) = 0.8683284938912266
    expectRel(gp.priorPredictiveP, 0.8683284938912266, 1e-12)
    const gpq = analyzePrior({ family: 'gamma', shape: 2, rate: 0.5 }, { model: 'poisson', counts: [2, 4, 3, 0, 5], exposures: [1, 1, 1, 1, 1] }, { forceQuadrature: true })
    expectRel(gpq.priorPredictiveP, gp.priorPredictiveP, 1e-9)
  })
})

// Outside check: ESS-conjugate of fixtures/checks.json — Morita, Thall & Müller (2008) Biometrics 64:595–602, standard conjugate cases.
describe('prior effective sample size (ESS-conjugate)', () => {
  it('beta a + b, normal σ²/τ², gamma rate b; null without a standard definition', () => {
    const c = check('ESS-conjugate')
    const beta = analyzePrior({ family: 'beta', alpha: c.inputs.beta.a, beta: c.inputs.beta.b }, { model: 'binomial', successes: 3, trials: 10 })
    expectRel(beta.priorEss!, c.expected.beta, c.tolerance.rel)
    const normal = analyzePrior({ family: 'normal', mu: 3, sigma: c.inputs.normal.prior_sd }, known(c.inputs.normal.sigma))
    expectRel(normal.priorEss!, c.expected.normal, c.tolerance.rel)
    const gamma = analyzePrior({ family: 'gamma', shape: c.inputs.gamma_poisson.shape, rate: c.inputs.gamma_poisson.rate }, { model: 'poisson', counts: [1], exposures: [1] })
    expectRel(gamma.priorEss!, c.expected.gamma_poisson, c.tolerance.rel)
    expect(priorEffectiveSampleSize({ family: 'student-t', mu: 0, sigma: 1, df: 3 }, known(2))).toBeNull()
    expect(analyzePrior({ family: 'lognormal', meanlog: 1, sdlog: 0.5 }, { model: 'poisson', counts: [1], exposures: [1] }).priorEss).toBeNull()
  })
})

// Outside check: QUAD-* and DBLQUAD-* of fixtures/checks.json — 40-digit mpmath quad (1-D); for the 2-D cases μ integrated in closed form then a 40-digit quad
// over σ; scipy quad/dblquad (epsrel ≤ 1e-10) agree to 2e-15. Method: adaptive G10–K21 after Piessens et al. (1983) QUADPACK.
describe('non-conjugate evidence by adaptive Gauss–Kronrod quadrature (QUAD-*, DBLQUAD-*)', () => {
  it('QUAD-poisson-lognormal: Poisson counts, lognormal prior on the rate', () => {
    const c = check('QUAD-poisson-lognormal')
    const a = analyzePrior(
      { family: 'lognormal', meanlog: c.inputs.prior.meanlog, sdlog: c.inputs.prior.sdlog },
      { model: 'poisson', counts: c.inputs.counts, exposures: c.inputs.counts.map(() => c.inputs.exposure) },
    )
    expect(a.method).toBe('quadrature')
    expectRel(Math.exp(a.logEvidence), c.expected.ml, c.tolerance.rel)
    expectRel(a.logEvidence, c.expected.log_ml, c.tolerance.rel)
  })

  it('QUAD-normal-tprior: normal data, t₃(0, 5) prior on the mean; posterior mean', () => {
    const c = check('QUAD-normal-tprior')
    const a = analyzePrior({ family: 'student-t', mu: c.inputs.prior.location, sigma: c.inputs.prior.scale, df: c.inputs.prior.df }, known(c.inputs.sigma, c.inputs.data))
    expectRel(Math.exp(a.logEvidence), c.expected.ml, c.tolerance.rel)
    expectRel(a.posterior.mean, c.expected.post_mean, c.tolerance.rel)
  })

  for (const id of ['DBLQUAD-halfnormal', 'DBLQUAD-gamma']) {
    it(`${id}: unknown μ and σ, independent priors, prior on σ (not σ²)`, () => {
      const c = check(id)
      const sp = c.inputs.sigma_prior
      const sigmaPrior: PriorDistribution = sp.family === 'half_normal' ? { family: 'half-normal', scale: sp.scale } : { family: 'gamma', shape: sp.shape, rate: sp.rate }
      const a = analyzePrior({ family: 'normal', mu: c.inputs.mu_prior.mean, sigma: c.inputs.mu_prior.sd }, { model: 'normal', values: c.inputs.data, sigmaPrior })
      expect(a.method).toBe('quadrature')
      expectRel(Math.exp(a.logEvidence), c.expected.ml, c.tolerance.rel)
      expectRel(a.logEvidence, c.expected.log_ml, 1e-12)
    })
  }
})

// Consistency check of the engine against itself (its outside checks are the fixture cases above): closed form and
// quadrature must agree to 1e-8 relative wherever both exist.
describe('closed form against quadrature (agreement ≤ 1e-8 relative)', () => {
  const cases: { label: string; prior: PriorDistribution; data: PilotData }[] = [
    { label: 'normal prior, known σ', prior: { family: 'normal', mu: 0, sigma: 5 }, data: known(2) },
    { label: 'narrow normal prior in conflict with the data', prior: { family: 'normal', mu: 10, sigma: 0.3 }, data: known(2) },
    { label: 'uniform prior, known σ', prior: { family: 'uniform', lower: 0, upper: 4 }, data: known(2) },
    { label: 'beta prior, binomial', prior: { family: 'beta', alpha: 2, beta: 3 }, data: { model: 'binomial', successes: 7, trials: 20 } },
    { label: 'beta prior, binomial, y = 0', prior: { family: 'beta', alpha: 0.5, beta: 0.5 }, data: { model: 'binomial', successes: 0, trials: 30 } },
    { label: 'gamma prior, Poisson with exposure', prior: { family: 'gamma', shape: 3, rate: 1.5 }, data: { model: 'poisson', counts: [4, 7], exposures: [2, 3.5] } },
    { label: 'gamma prior, all-zero counts', prior: { family: 'gamma', shape: 0.5, rate: 0.1 }, data: { model: 'poisson', counts: [0, 0, 0], exposures: [1, 2, 3] } },
    {
      label: 'unknown σ: μ closed form per σ vs μ by quadrature per σ',
      prior: { family: 'normal', mu: 0, sigma: 10 },
      data: { model: 'normal', values: X, sigmaPrior: { family: 'gamma', shape: 2, rate: 1 } },
    },
  ]
  for (const { label, prior, data } of cases) {
    it(label, () => {
      const closed = analyzePrior(prior, data)
      const quad = analyzePrior(prior, data, { forceQuadrature: true })
      expect(quad.method).toBe('quadrature')
      expect(Math.abs(Math.expm1(quad.logEvidence - closed.logEvidence))).toBeLessThan(1e-8)
      for (const k of ['mean', 'sd', 'q025', 'q50', 'q975'] as const) expectRel(quad.posterior[k], closed.posterior[k], 1e-8, k)
    })
  }
})

describe('large samples do not underflow (log-space quadrature)', () => {
  const big = Array.from({ length: 10000 }, (_, i) => 3 + 2 * Math.sin(i * 1.7) + 0.5 * Math.cos(i * 0.37))

  it('10,000 normal observations: closed form and quadrature agree; evidence near −1.8e4 is finite', () => {
    const closed = analyzePrior({ family: 'normal', mu: 0, sigma: 5 }, known(2, big))
    const quad = analyzePrior({ family: 'normal', mu: 0, sigma: 5 }, known(2, big), { forceQuadrature: true })
    expect(closed.logEvidence).toBeLessThan(-1e4)
    expect(Math.abs(Math.expm1(quad.logEvidence - closed.logEvidence))).toBeLessThan(1e-8)
    expectRel(quad.posterior.mean, closed.posterior.mean, 1e-10)
    const t = analyzePrior({ family: 'student-t', mu: 0, sigma: 5, df: 3 }, known(2, big))
    expect(Number.isFinite(t.logEvidence)).toBe(true)
    expect(Math.abs(t.posterior.mean - closed.posterior.mean)).toBeLessThan(1e-3)
  })

  it('10,000 Bernoulli trials with a uniform prior on [0.2, 0.6]: matches C(n, y)·B(y+1, n−y+1)·(I_U − I_L)/(U − L)', () => {
    const n = 10000
    const y = 3712
    const a = analyzePrior({ family: 'uniform', lower: 0.2, upper: 0.6 }, { model: 'binomial', successes: y, trials: n })
    const mass = betaPQ(0.6, y + 1, n - y + 1).p - betaPQ(0.2, y + 1, n - y + 1).p
    const exact = lgamma(n + 1) - lgamma(y + 1) - lgamma(n - y + 1) + lbeta(y + 1, n - y + 1) + Math.log(mass) - Math.log(0.4)
    expectAbs(a.logEvidence, exact, 1e-8)
  })

  it('10,000 Poisson counts with a lognormal prior: equals the gamma closed form when the prior is the matching gamma', () => {
    const counts = Array.from({ length: 10000 }, (_, i) => (i * 7) % 5)
    const exposures = counts.map(() => 1)
    const g = analyzePrior({ family: 'gamma', shape: 4, rate: 2 }, { model: 'poisson', counts, exposures })
    const gq = analyzePrior({ family: 'gamma', shape: 4, rate: 2 }, { model: 'poisson', counts, exposures }, { forceQuadrature: true })
    expect(Math.abs(Math.expm1(gq.logEvidence - g.logEvidence))).toBeLessThan(1e-8)
    const ln = analyzePrior({ family: 'lognormal', meanlog: 0.7, sdlog: 0.5 }, { model: 'poisson', counts, exposures })
    expect(Number.isFinite(ln.logEvidence)).toBe(true)
    expectRel(ln.posterior.mean, 2, 1e-3)
  })
})

describe('posterior summaries by quadrature', () => {
  it('a t prior in conflict with the data (bimodal posterior): evidence equals a brute-force integral', () => {
    const prior: PriorDistribution = { family: 'student-t', mu: 30, sigma: 1, df: 2 }
    const data = known(4)
    const a = analyzePrior(prior, data)
    const n = X.length
    const xbar = 3
    const ss = X.reduce((s, v) => s + (v - xbar) ** 2, 0)
    const pts = Array.from({ length: 801 }, (_, i) => -200 + i * 0.5)
    const lik = (mu: number): number => Math.exp(-(n / 2) * Math.log(2 * Math.PI * 16) - (ss + n * (xbar - mu) ** 2) / 32)
    const tpdf = (mu: number): number => Math.exp(lgamma(1.5) - lgamma(1) - 0.5 * Math.log(2 * Math.PI) - 1.5 * Math.log1p((mu - 30) ** 2 / 2))
    const brute = integrate((mu) => lik(mu) * tpdf(mu), pts, { epsrel: 1e-13 }).value
    expectRel(Math.exp(a.logEvidence), brute, 1e-9)
  })

  it('unknown σ with a t prior on μ: posterior moments from σ nodes match the μ-marginal computed directly', () => {
    const prior: PriorDistribution = { family: 'student-t', mu: 0, sigma: 10, df: 3 }
    const sigmaPrior: PriorDistribution = { family: 'gamma', shape: 2, rate: 1 }
    const a = analyzePrior(prior, { model: 'normal', values: X, sigmaPrior }, { skipPredictiveCheck: true })
    const n = X.length
    const xbar = 3
    const ss = X.reduce((s, v) => s + (v - xbar) ** 2, 0)
    const inner = (mu: number): number =>
      new LogIntegral(
        (v) => {
          const s = Math.exp(v)
          return 2 * v - s - n * v - (ss + n * (xbar - mu) ** 2) / (2 * s * s) - (n / 2) * Math.log(2 * Math.PI)
        },
        [{ center: 0, scale: 0.3 }],
      ).logValue
    const tlog = (mu: number): number => lgamma(2) - lgamma(1.5) - 0.5 * Math.log(3 * Math.PI) - Math.log(10) - 2 * Math.log1p((mu / 10) ** 2 / 3)
    const outer = new LogIntegral((mu) => tlog(mu) + inner(mu), [{ center: 3, scale: 0.5 }])
    expectRel(a.logEvidence, outer.logValue, 1e-9)
    expectRel(a.posterior.mean, outer.expect((mu) => mu), 1e-8)
    expectRel(a.posterior.q975, outer.quantile(0.975), 1e-8)
  })
})
