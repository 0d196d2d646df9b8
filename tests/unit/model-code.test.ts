import { describe, expect, it } from 'vitest'
import { checkModelLineQuantiles, modelCode, modelCodeWithCheck, readModelCode, MODEL_LANGUAGES, type ModelLanguage } from '../../shared/elicitation/model-code'
import { quantile, type Distribution } from '../../shared/stats/index'
import { expectRel } from './stats/checks'
import documented from './fixtures/model-code-checks.json'

// Fitted priors of FIT-* in tests/unit/stats/fixtures/checks.json (rounded) plus a uniform and a scaled beta: realistic,
// non-round parameters; the same list as fixtures/generate_model_code_checks.py.
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

/** The arguments of the call `fn(…)` in a generated line, in order (keyword names and quoted names dropped). */
function callArgs(code: string, fn: string): number[] {
  const start = code.indexOf(`${fn}(`)
  expect(start, `${fn}( in ${code}`).toBeGreaterThanOrEqual(0)
  const inner = code.slice(start + fn.length + 1, code.indexOf(')', start))
  return inner.split(',').map((a) => a.trim().replace(/^\w+\s*=\s*/, '')).filter((a) => !a.startsWith('"')).map(Number)
}

// Outside check: fixtures/model-code-checks.json, written by fixtures/generate_model_code_checks.py from the languages'
// own documentation (Stan Functions Reference; PyMC API reference; JAGS 4.3.0 user manual ch. 9; brms set_prior uses
// Stan's), with scipy computing the quantiles of what each documented call means.
describe('generated lines against the languages’ documented parameterisations, quantiles by scipy', () => {
  it('the fixture covers the priors of this file', () => {
    expect(documented.priors).toEqual(PRIORS)
    expect(documented.cases).toHaveLength(27)
  })
  for (const c of documented.cases) {
    it(`${c.language} ${c.prior.family}: ${c.function}(…) with the documented arguments; scipy’s quantiles equal the prior’s`, () => {
      const prior = c.prior as Distribution
      const code = modelCode(prior, 'theta', c.language as ModelLanguage)
      const args = callArgs(code, c.function.replace(/^pm\./, 'pm.'))
      expect(args).toHaveLength(c.args.length)
      args.forEach((a, i) => expectRel(a, c.args[i], 1e-10, `${c.language} argument ${i + 1}`))
      documented.meta.probs.forEach((p, i) => expectRel(quantile(prior, p), c.quantiles[i], 1e-9, `${c.language} q${p}`))
      if (prior.family === 'scaled-beta') expect(code).toContain(`${prior.lower} + ${prior.upper - prior.lower} * theta_raw`)
    })
  }
})

// Consistency check of Priorsmith's own reader (the product's "Check"), not an outside check: the lines it writes, read
// back by the same module, give the prior's quantiles.
describe('round trip through Priorsmith’s reader: each line gives the prior’s 5/50/95 % quantiles to 1e-6', () => {
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

  it('the check fails for a precision written where a standard deviation belongs, and for a scale given as a rate', () => {
    const prior: Distribution = { family: 'normal', mu: 10.28, sigma: 3.75 }
    const sdAsPrecision = checkModelLineQuantiles('theta ~ dnorm(10.28, 3.75)', 'jags', prior, quantile) // sd written as JAGS' second argument
    expect(sdAsPrecision.ok).toBe(false)
    expect(sdAsPrecision.maxRelativeDifference).toBeGreaterThan(0.1)
    expect(checkModelLineQuantiles(`theta ~ dnorm(10.28, ${1 / 3.75 ** 2})`, 'jags', prior, quantile).ok).toBe(true)
    const gamma: Distribution = { family: 'gamma', shape: 7.88, rate: 0.743 }
    expect(checkModelLineQuantiles(`theta = pm.Gamma("theta", alpha=7.88, beta=${1 / 0.743})`, 'pymc', gamma, quantile).ok).toBe(false)
  })
})
