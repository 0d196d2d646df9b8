import { describe, expect, it } from 'vitest'
import { modelCode, modelCodeWithCheck, readModelCode, MODEL_LANGUAGES } from '../../shared/elicitation/model-code'
import { quantile, type Distribution } from '../../shared/stats/index'

// Fitted priors from REFERENCE.md §1.1 (FIT-*) plus a uniform and a scaled beta: realistic, non-round parameters.
const PRIORS: Distribution[] = [
  { family: 'normal', mu: 10.2820935324, sigma: 3.7529049541 },
  { family: 'student-t', mu: 10.2509832335, sigma: 3.30310727765, df: 3 },
  { family: 'lognormal', meanlog: 2.31356848612, sdlog: 0.360633185455 },
  { family: 'gamma', shape: 7.88412052286, rate: 0.742966530653 },
  { family: 'beta', alpha: 2.121355756, beta: 4.35557891597 },
  { family: 'scaled-beta', alpha: 5.17988790107, beta: 9.70940586908, lower: 0, upper: 30 },
  { family: 'uniform', lower: 0.5, upper: 12.25 },
]

describe('model code in each language’s own parameterisation', () => {
  // Stan Functions Reference, "Normal distribution": normal(y | mu, sigma) with sigma the scale (sd).
  it('Stan and brms take the standard deviation for the normal', () => {
    expect(modelCode(PRIORS[0], 'burst_rate', 'stan')).toBe('burst_rate ~ normal(10.2820935324, 3.7529049541);')
    expect(modelCode(PRIORS[0], 'burst_rate', 'brms')).toBe('set_prior("normal(10.2820935324, 3.7529049541)", class = "b", coef = "burst_rate")')
  })
  // JAGS 4.3.0 user manual (Plummer 2017), ch. 9 "Distributions": dnorm(mu, tau), tau the precision 1/sigma^2.
  it('JAGS takes the precision for the normal, the lognormal and the t', () => {
    expect(modelCode(PRIORS[0], 'x', 'jags')).toBe(`x ~ dnorm(10.2820935324, ${Number((1 / 3.7529049541 ** 2).toPrecision(15))})  # precision = 1/sd^2`)
    expect(readModelCode(modelCode(PRIORS[2], 'x', 'jags'), 'jags', 'lognormal')).toMatchObject({ meanlog: 2.31356848612 })
    expect((readModelCode(modelCode(PRIORS[1], 'x', 'jags'), 'jags', 'student-t') as { sigma: number }).sigma).toBeCloseTo(3.30310727765, 12)
  })
  // PyMC API reference, pymc.Gamma(alpha, beta): beta is the rate; JAGS dgamma(r, lambda): lambda is the rate; Stan gamma(alpha, beta): beta the inverse scale.
  it('every language gets the gamma’s rate, not its scale', () => {
    expect(modelCode(PRIORS[3], 'lam', 'pymc')).toBe('lam = pm.Gamma("lam", alpha=7.88412052286, beta=0.742966530653)')
    expect(modelCode(PRIORS[3], 'lam', 'jags')).toBe('lam ~ dgamma(7.88412052286, 0.742966530653)  # shape, rate')
    expect(modelCode(PRIORS[3], 'lam', 'stan')).toBe('lam ~ gamma(7.88412052286, 0.742966530653);')
  })
  // Stan Functions Reference, "Student-t distribution": student_t(nu, mu, sigma) — degrees of freedom first.
  it('Stan’s student_t puts the degrees of freedom first', () => {
    expect(modelCode(PRIORS[1], 'x', 'stan')).toBe('x ~ student_t(3, 10.2509832335, 3.30310727765);')
  })
  it('a scaled beta is a transformed beta on [0, 1]', () => {
    expect(modelCode(PRIORS[5], 'x', 'stan')).toBe('x_raw ~ beta(5.17988790107, 9.70940586908);  // real<lower=0, upper=1> x_raw; x = 0 + 30 * x_raw;')
    expect(modelCode(PRIORS[5], 'x', 'brms')).toMatch(/^# brms has no scaled-beta prior/)
  })
})

describe('round trip: each line read back as its language defines it gives the prior’s 5/50/95 % quantiles to 1e-6', () => {
  for (const d of PRIORS) {
    it(d.family, () => {
      const rows = modelCodeWithCheck(d, 'theta', quantile)
      expect(rows.map((r) => r.language)).toEqual([...MODEL_LANGUAGES])
      for (const r of rows) {
        if (r.check === null) continue
        expect(r.check.ok).toBe(true)
        expect(r.check.maxRelativeDifference).toBeLessThan(1e-9)
      }
    })
  }

  it('catches a precision written where a standard deviation belongs', () => {
    const wrong = 'theta ~ dnorm(10.28, 3.75)' // sd written as JAGS' second argument
    const back = readModelCode(wrong, 'jags', 'normal')
    const diff = Math.abs(quantile(back, 0.95) - quantile({ family: 'normal', mu: 10.28, sigma: 3.75 }, 0.95))
    expect(diff).toBeGreaterThan(1)
  })
})
