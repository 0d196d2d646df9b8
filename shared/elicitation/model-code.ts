import type { Distribution } from '../stats/index'

export const MODEL_LANGUAGES = ['stan', 'pymc', 'jags', 'brms'] as const
export type ModelLanguage = (typeof MODEL_LANGUAGES)[number]

/** Enough digits that reading the numbers back reproduces the prior's quantiles to far better than 1e-6. */
export function num(x: number): string {
  return Number(x.toPrecision(15)).toString()
}

export const safeName = (symbol: string) => symbol.replace(/[^A-Za-z0-9_]/g, '_').replace(/^(?=\d)/, 'q_')

/**
 * Ready-to-paste prior lines in each language's own parameterisation:
 * Stan Functions Reference (normal: location, scale; student_t: ν, μ, σ; lognormal: μ, σ; gamma: shape α, inverse scale β; beta; uniform);
 * PyMC API reference (pm.Normal(mu, sigma), pm.StudentT(nu, mu, sigma), pm.LogNormal(mu, sigma), pm.Gamma(alpha, beta=rate), pm.Beta, pm.Uniform);
 * JAGS 4.3.0 user manual, ch. 9 (dnorm(μ, τ) and dlnorm(μ, τ) and dt(μ, τ, k) take a precision τ = 1/σ²; dgamma(r, λ) shape and rate; dbeta(a, b); dunif(a, b));
 * brms (set_prior strings are Stan statements, so Stan's parameterisation).
 */
export function modelCode(d: Distribution, symbol: string, language: ModelLanguage): string {
  const v = safeName(symbol)
  switch (language) {
    case 'stan':
      switch (d.family) {
        case 'normal': return `${v} ~ normal(${num(d.mu)}, ${num(d.sigma)});`
        case 'student-t': return `${v} ~ student_t(${num(d.df)}, ${num(d.mu)}, ${num(d.sigma)});`
        case 'lognormal': return `${v} ~ lognormal(${num(d.meanlog)}, ${num(d.sdlog)});`
        case 'gamma': return `${v} ~ gamma(${num(d.shape)}, ${num(d.rate)});`
        case 'beta': return `${v} ~ beta(${num(d.alpha)}, ${num(d.beta)});`
        case 'uniform': return `${v} ~ uniform(${num(d.lower)}, ${num(d.upper)});  // declare real<lower=${num(d.lower)}, upper=${num(d.upper)}> ${v};`
        case 'scaled-beta':
          return `${v}_raw ~ beta(${num(d.alpha)}, ${num(d.beta)});  // real<lower=0, upper=1> ${v}_raw; ${v} = ${num(d.lower)} + ${num(d.upper - d.lower)} * ${v}_raw;`
      }
      break
    case 'pymc':
      switch (d.family) {
        case 'normal': return `${v} = pm.Normal("${v}", mu=${num(d.mu)}, sigma=${num(d.sigma)})`
        case 'student-t': return `${v} = pm.StudentT("${v}", nu=${num(d.df)}, mu=${num(d.mu)}, sigma=${num(d.sigma)})`
        case 'lognormal': return `${v} = pm.LogNormal("${v}", mu=${num(d.meanlog)}, sigma=${num(d.sdlog)})`
        case 'gamma': return `${v} = pm.Gamma("${v}", alpha=${num(d.shape)}, beta=${num(d.rate)})`
        case 'beta': return `${v} = pm.Beta("${v}", alpha=${num(d.alpha)}, beta=${num(d.beta)})`
        case 'uniform': return `${v} = pm.Uniform("${v}", lower=${num(d.lower)}, upper=${num(d.upper)})`
        case 'scaled-beta':
          return `${v}_raw = pm.Beta("${v}_raw", alpha=${num(d.alpha)}, beta=${num(d.beta)}); ${v} = pm.Deterministic("${v}", ${num(d.lower)} + ${num(d.upper - d.lower)} * ${v}_raw)`
      }
      break
    case 'jags':
      switch (d.family) {
        case 'normal': return `${v} ~ dnorm(${num(d.mu)}, ${num(1 / (d.sigma * d.sigma))})  # precision = 1/sd^2`
        case 'student-t': return `${v} ~ dt(${num(d.mu)}, ${num(1 / (d.sigma * d.sigma))}, ${num(d.df)})  # precision = 1/scale^2`
        case 'lognormal': return `${v} ~ dlnorm(${num(d.meanlog)}, ${num(1 / (d.sdlog * d.sdlog))})  # precision of log(${v})`
        case 'gamma': return `${v} ~ dgamma(${num(d.shape)}, ${num(d.rate)})  # shape, rate`
        case 'beta': return `${v} ~ dbeta(${num(d.alpha)}, ${num(d.beta)})`
        case 'uniform': return `${v} ~ dunif(${num(d.lower)}, ${num(d.upper)})`
        case 'scaled-beta': return `${v}_raw ~ dbeta(${num(d.alpha)}, ${num(d.beta)}); ${v} <- ${num(d.lower)} + ${num(d.upper - d.lower)} * ${v}_raw`
      }
      break
    case 'brms':
      switch (d.family) {
        case 'normal': return `set_prior("normal(${num(d.mu)}, ${num(d.sigma)})", class = "b", coef = "${v}")`
        case 'student-t': return `set_prior("student_t(${num(d.df)}, ${num(d.mu)}, ${num(d.sigma)})", class = "b", coef = "${v}")`
        case 'lognormal': return `set_prior("lognormal(${num(d.meanlog)}, ${num(d.sdlog)})", class = "b", coef = "${v}", lb = 0)`
        case 'gamma': return `set_prior("gamma(${num(d.shape)}, ${num(d.rate)})", class = "b", coef = "${v}", lb = 0)`
        case 'beta': return `set_prior("beta(${num(d.alpha)}, ${num(d.beta)})", class = "b", coef = "${v}", lb = 0, ub = 1)`
        case 'uniform': return `set_prior("uniform(${num(d.lower)}, ${num(d.upper)})", class = "b", coef = "${v}", lb = ${num(d.lower)}, ub = ${num(d.upper)})`
        case 'scaled-beta':
          return `# brms has no scaled-beta prior for a coefficient: put the Stan lines in stanvars, or rescale ${v} to [0, 1] and use set_prior("beta(${num(d.alpha)}, ${num(d.beta)})", class = "b", coef = "${v}_scaled", lb = 0, ub = 1)`
      }
  }
  throw new Error(`no ${language} code for ${(d as Distribution).family}`)
}

const NUM = String.raw`(-?\d+(?:\.\d+)?(?:e[-+]?\d+)?)`
function args(code: string, fn: string): number[] {
  const m = new RegExp(`${fn}\\(\\s*${NUM}(?:\\s*,\\s*${NUM})?(?:\\s*,\\s*${NUM})?`).exec(code)
  if (!m) throw new Error(`cannot read ${fn}(…) in: ${code}`)
  return m.slice(1).filter((x) => x !== undefined).map(Number)
}
function kwargs(code: string, names: string[]): number[] {
  return names.map((n) => {
    const m = new RegExp(`\\b${n}=${NUM}`).exec(code)
    if (!m) throw new Error(`cannot read ${n}= in: ${code}`)
    return Number(m[1])
  })
}
function scaledFrom(code: string, a: number, b: number): Distribution {
  const m = new RegExp(`${NUM} \\+ ${NUM} \\* `).exec(code)
  if (!m) throw new Error(`cannot read the scaling in: ${code}`)
  const lower = Number(m[1])
  return { family: 'scaled-beta', alpha: a, beta: b, lower, upper: lower + Number(m[2]) }
}

/**
 * Priorsmith's own reader of a generated line: applies the language's documented parameterisation (same sources as
 * modelCode; docs/methods/model-code.md) and returns the distribution the line means. It does not run the language.
 */
export function readModelCode(code: string, language: ModelLanguage, family: Distribution['family']): Distribution {
  if (language === 'stan' || language === 'brms') {
    switch (family) {
      case 'normal': { const [mu, sigma] = args(code, 'normal'); return { family, mu, sigma } }
      case 'student-t': { const [df, mu, sigma] = args(code, 'student_t'); return { family, df, mu, sigma } }
      case 'lognormal': { const [meanlog, sdlog] = args(code, 'lognormal'); return { family, meanlog, sdlog } }
      case 'gamma': { const [shape, rate] = args(code, 'gamma'); return { family, shape, rate } }
      case 'beta': { const [alpha, beta] = args(code, 'beta'); return { family, alpha, beta } }
      case 'uniform': { const [lower, upper] = args(code, 'uniform'); return { family, lower, upper } }
      case 'scaled-beta': {
        if (language === 'brms') throw new Error('brms has no scaled-beta prior')
        const [a, b] = args(code, 'beta')
        return scaledFrom(code, a, b)
      }
    }
  }
  if (language === 'pymc') {
    switch (family) {
      case 'normal': { const [mu, sigma] = kwargs(code, ['mu', 'sigma']); return { family, mu, sigma } }
      case 'student-t': { const [df, mu, sigma] = kwargs(code, ['nu', 'mu', 'sigma']); return { family, df, mu, sigma } }
      case 'lognormal': { const [meanlog, sdlog] = kwargs(code, ['mu', 'sigma']); return { family, meanlog, sdlog } }
      case 'gamma': { const [shape, rate] = kwargs(code, ['alpha', 'beta']); return { family, shape, rate } }
      case 'beta': { const [alpha, beta] = kwargs(code, ['alpha', 'beta']); return { family, alpha, beta } }
      case 'uniform': { const [lower, upper] = kwargs(code, ['lower', 'upper']); return { family, lower, upper } }
      case 'scaled-beta': { const [a, b] = kwargs(code, ['alpha', 'beta']); return scaledFrom(code, a, b) }
    }
  }
  switch (family) {
    case 'normal': { const [mu, tau] = args(code, 'dnorm'); return { family, mu, sigma: 1 / Math.sqrt(tau) } }
    case 'student-t': { const [mu, tau, df] = args(code, 'dt'); return { family, mu, sigma: 1 / Math.sqrt(tau), df } }
    case 'lognormal': { const [meanlog, tau] = args(code, 'dlnorm'); return { family, meanlog, sdlog: 1 / Math.sqrt(tau) } }
    case 'gamma': { const [shape, rate] = args(code, 'dgamma'); return { family, shape, rate } }
    case 'beta': { const [alpha, beta] = args(code, 'dbeta'); return { family, alpha, beta } }
    case 'uniform': { const [lower, upper] = args(code, 'dunif'); return { family, lower, upper } }
    case 'scaled-beta': { const [a, b] = args(code, 'dbeta'); return scaledFrom(code, a, b) }
  }
}

/**
 * The read-back check of one line: Priorsmith's reader (readModelCode, the language's documented parameterisation; the
 * language itself is not run) gives a distribution whose 5/50/95 % quantiles must match the prior's to 1e-6 relative.
 */
export function checkModelLineQuantiles(code: string, language: ModelLanguage, d: Distribution, quantileOf: (d: Distribution, p: number) => number) {
  const back = readModelCode(code, language, d.family)
  const diffs = [0.05, 0.5, 0.95].map((p) => {
    const want = quantileOf(d, p)
    return Math.abs(quantileOf(back, p) - want) / Math.max(1, Math.abs(want))
  })
  const worst = diffs.some((x) => !Number.isFinite(x)) ? Infinity : Math.max(...diffs)
  return { maxRelativeDifference: worst, ok: worst <= 1e-6 }
}

/** Every language's line for a prior, with the read-back check of checkModelLineQuantiles. */
export function modelCodeWithCheck(d: Distribution, symbol: string, quantileOf: (d: Distribution, p: number) => number) {
  return MODEL_LANGUAGES.map((language) => {
    const code = modelCode(d, symbol, language)
    if (language === 'brms' && d.family === 'scaled-beta') return { language, code, check: null }
    return { language, code, check: checkModelLineQuantiles(code, language, d, quantileOf) }
  })
}
