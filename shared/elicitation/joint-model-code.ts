import type { Distribution } from '../stats/index'
import { inverseSpd } from '../stats/matrix'
import { MODEL_LANGUAGES, modelCode, num, readModelCode, safeName, type ModelLanguage } from './model-code'

/** One quantity of a linked set: its model symbol and its (final) marginal distribution. */
export type LinkedQuantity = { symbol: string; distribution: Distribution }

const vector = (xs: number[]): string => `[${xs.map(num).join(', ')}]`
const matrix = (rows: number[][]): string => `[${rows.map(vector).join(', ')}]`

/**
 * A Dirichlet prior on a simplex in each language: Stan Functions Reference, "Dirichlet distribution" (dirichlet(alpha) on
 * a simplex[K]); PyMC API reference, pymc.Dirichlet(name, a); JAGS 4.3.0 user manual ch. 9, ddirch(alpha[]) (constants
 * set as nodes, since the JAGS language has no vector literal); brms has no Dirichlet prior on category probabilities (it
 * models them by intercepts), so the Stan lines go in as stanvars.
 */
export function dirichletModelCode(alpha: number[], symbol: string, language: ModelLanguage): string {
  const v = safeName(symbol)
  const k = alpha.length
  const stan = `${v} ~ dirichlet(${vector(alpha)}');`
  switch (language) {
    case 'stan':
      return `${stan}  // declare simplex[${k}] ${v};`
    case 'pymc':
      return `${v} = pm.Dirichlet("${v}", a=${vector(alpha)})`
    case 'jags':
      return [...alpha.map((a, i) => `alpha_${v}[${i + 1}] <- ${num(a)}`), `${v}[1:${k}] ~ ddirch(alpha_${v}[1:${k}])`].join('\n')
    case 'brms':
      return (
        `# brms has no Dirichlet prior on category probabilities (it models them by intercepts); add the simplex as Stan code:\n` +
        `stanvars <- stanvar(scode = "simplex[${k}] ${v};", block = "parameters") + stanvar(scode = "${stan}", block = "model")`
      )
  }
}

const NUM = String.raw`-?\d+(?:\.\d+)?(?:e[-+]?\d+)?`

function jsonAfter(code: string, marker: RegExp): unknown {
  const m = marker.exec(code)
  if (!m) throw new Error(`cannot find ${marker} in: ${code}`)
  const start = m.index + m[0].length
  let depth = 0
  for (let i = start; i < code.length; i++) {
    if (code[i] === '[') depth++
    else if (code[i] === ']' && --depth === 0) return JSON.parse(code.slice(start, i + 1))
  }
  throw new Error(`unbalanced brackets after ${marker} in: ${code}`)
}

/** Indexed constants `name[i] <- x` or `name[i,j] <- x` of a JAGS block, as a vector or matrix. */
function jagsConstants(code: string, name: string): number[] | number[][] {
  const re = new RegExp(`\\b${name}\\[(\\d+)(?:,(\\d+))?\\] <- (${NUM})`, 'g')
  const vec: number[] = []
  const mat: number[][] = []
  let two = false
  for (const m of code.matchAll(re)) {
    const i = Number(m[1]) - 1
    if (m[2] !== undefined) {
      two = true
      ;(mat[i] ??= [])[Number(m[2]) - 1] = Number(m[3])
    } else vec[i] = Number(m[3])
  }
  if (two ? mat.length === 0 : vec.length === 0) throw new Error(`cannot read ${name}[…] in: ${code}`)
  return two ? mat : vec
}

/** Priorsmith's reader of a generated Dirichlet line (same documented parameterisations as dirichletModelCode). */
export function readDirichletCode(code: string, language: ModelLanguage): number[] {
  if (language === 'pymc') return jsonAfter(code, /\ba=/) as number[]
  if (language === 'jags') return jagsConstants(code, String.raw`alpha_\w+`) as number[]
  return jsonAfter(code, /dirichlet\(/) as number[]
}

/** True when a multivariate normal states the Gaussian copula exactly: every marginal normal, or lognormal (normal on the log scale). */
export function isMultivariateNormal(quantities: LinkedQuantity[]): boolean {
  return quantities.every((q) => q.distribution.family === 'normal' || q.distribution.family === 'lognormal')
}

function normalScale(d: Distribution): { mu: number; sd: number; log: boolean } {
  if (d.family === 'normal') return { mu: d.mu, sd: d.sigma, log: false }
  if (d.family === 'lognormal') return { mu: d.meanlog, sd: d.sdlog, log: true }
  throw new Error(`a ${d.family} marginal has no multivariate-normal form`)
}

/** Mean vector and covariance Σᵢⱼ = sᵢ sⱼ Rᵢⱼ of the multivariate normal that normal / log-normal marginals with copula R make. */
export function multivariateNormalOf(quantities: LinkedQuantity[], R: number[][]): { mu: number[]; cov: number[][] } {
  const parts = quantities.map((q) => normalScale(q.distribution))
  return { mu: parts.map((p) => p.mu), cov: R.map((row, i) => row.map((r, j) => (i === j ? parts[i].sd ** 2 : r * parts[i].sd * parts[j].sd))) }
}

/**
 * A Gaussian copula whose marginals are all normal or lognormal is a multivariate normal of y (yᵢ = xᵢ, or log xᵢ for a
 * lognormal) with covariance sᵢ sⱼ Rᵢⱼ: Stan multi_normal(mu, Sigma); PyMC pm.MvNormal(mu, cov); JAGS dmnorm(mu, Omega)
 * with Omega the precision matrix Σ⁻¹ (JAGS 4.3.0 user manual, ch. 9); brms through stanvars.
 */
export function multivariateNormalCode(quantities: LinkedQuantity[], R: number[][], name: string, language: ModelLanguage): string {
  const y = safeName(name)
  const k = quantities.length
  const { mu, cov } = multivariateNormalOf(quantities, R)
  const parts = quantities.map((q) => ({ v: safeName(q.symbol), log: normalScale(q.distribution).log }))
  const meaning = `${y} = (${parts.map((p) => (p.log ? `log(${p.v})` : p.v)).join(', ')})`
  const stan = `${y} ~ multi_normal(${vector(mu)}', ${matrix(cov)});`
  const stanBack = parts.map((p, i) => `${p.v} = ${p.log ? `exp(${y}[${i + 1}])` : `${y}[${i + 1}]`};`).join(' ')
  switch (language) {
    case 'stan':
      return `// ${meaning}; declare vector[${k}] ${y}; then ${stanBack}\n${stan}`
    case 'pymc':
      return [
        `${y} = pm.MvNormal("${y}", mu=${vector(mu)}, cov=${matrix(cov)})  # ${meaning}`,
        ...parts.map((p, i) => `${p.v} = pm.Deterministic("${p.v}", ${p.log ? `pm.math.exp(${y}[${i}])` : `${y}[${i}]`})`),
      ].join('\n')
    case 'jags': {
      const omega = inverseSpd(cov)
      if (!omega) return `# JAGS's dmnorm needs an invertible covariance; these correlations make it singular (some quantities move in lockstep). Use the Stan or PyMC lines.`
      return [
        `# ${meaning}; Omega_${y} is the precision matrix (inverse covariance)`,
        ...mu.map((m, i) => `mu_${y}[${i + 1}] <- ${num(m)}`),
        ...omega.flatMap((row, i) => row.map((w, j) => `Omega_${y}[${i + 1},${j + 1}] <- ${num(w)}`)),
        `${y}[1:${k}] ~ dmnorm(mu_${y}[1:${k}], Omega_${y}[1:${k},1:${k}])`,
        ...parts.map((p, i) => `${p.v} <- ${p.log ? `exp(${y}[${i + 1}])` : `${y}[${i + 1}]`}`),
      ].join('\n')
    }
    case 'brms':
      return (
        `# ${meaning}; brms has no multivariate prior on coefficients, so the Stan lines go in as stanvars:\n` +
        `stanvars <- stanvar(scode = "vector[${k}] ${y};", block = "parameters") + stanvar(scode = "${stan}", block = "model")`
      )
  }
}

/** Priorsmith's reader of a generated multivariate-normal block: the mean vector and covariance it states. */
export function readMultivariateNormalCode(code: string, language: ModelLanguage): { mu: number[]; cov: number[][] } {
  if (language === 'pymc') return { mu: jsonAfter(code, /\bmu=/) as number[], cov: jsonAfter(code, /\bcov=/) as number[][] }
  if (language === 'jags') {
    const mu = jagsConstants(code, String.raw`mu_\w+`) as number[]
    const cov = inverseSpd(jagsConstants(code, String.raw`Omega_\w+`) as number[][])
    if (!cov) throw new Error('the precision matrix read back is not invertible')
    return { mu, cov }
  }
  const mu = jsonAfter(code, /multi_normal\(/) as number[]
  return { mu, cov: jsonAfter(code, /multi_normal\([^']*',\s*/) as number[][] }
}

type StanMarginal = { name: string; args: number[]; bounds: string; arg: (v: string) => string; jacobian: string }

function stanMarginal(d: Distribution): StanMarginal {
  const plain = { arg: (v: string) => v, jacobian: '' }
  switch (d.family) {
    case 'normal': return { name: 'normal', args: [d.mu, d.sigma], bounds: '', ...plain }
    case 'student-t': return { name: 'student_t', args: [d.df, d.mu, d.sigma], bounds: '', ...plain }
    case 'lognormal': return { name: 'lognormal', args: [d.meanlog, d.sdlog], bounds: '<lower=0>', ...plain }
    case 'gamma': return { name: 'gamma', args: [d.shape, d.rate], bounds: '<lower=0>', ...plain }
    case 'beta': return { name: 'beta', args: [d.alpha, d.beta], bounds: '<lower=0, upper=1>', ...plain }
    case 'uniform': return { name: 'uniform', args: [d.lower, d.upper], bounds: `<lower=${num(d.lower)}, upper=${num(d.upper)}>`, ...plain }
    case 'scaled-beta': {
      const w = d.upper - d.lower
      return {
        name: 'beta',
        args: [d.alpha, d.beta],
        bounds: `<lower=${num(d.lower)}, upper=${num(d.upper)}>`,
        arg: (v) => `(${v} - ${num(d.lower)}) / ${num(w)}`,
        jacobian: ` - log(${num(w)})`,
      }
    }
  }
}

function pymcDist(d: Distribution): string {
  switch (d.family) {
    case 'normal': return `pm.Normal.dist(mu=${num(d.mu)}, sigma=${num(d.sigma)})`
    case 'student-t': return `pm.StudentT.dist(nu=${num(d.df)}, mu=${num(d.mu)}, sigma=${num(d.sigma)})`
    case 'lognormal': return `pm.LogNormal.dist(mu=${num(d.meanlog)}, sigma=${num(d.sdlog)})`
    case 'gamma': return `pm.Gamma.dist(alpha=${num(d.shape)}, beta=${num(d.rate)})`
    case 'beta':
    case 'scaled-beta': return `pm.Beta.dist(alpha=${num(d.alpha)}, beta=${num(d.beta)})`
    case 'uniform': return `pm.Uniform.dist(lower=${num(d.lower)}, upper=${num(d.upper)})`
  }
}

export const COPULA_LANGUAGES = ['stan', 'pymc'] as const
export type CopulaLanguage = (typeof COPULA_LANGUAGES)[number]

/**
 * The general Gaussian copula with any marginals (Nelsen 2006, An Introduction to Copulas, §2.3): the joint density is
 * f(x) = c_R(F₁(x₁), …, F_K(x_K)) Πᵢ fᵢ(xᵢ) with c_R(u) = φ_R(z) / Πᵢ φ(zᵢ), zᵢ = Φ⁻¹(uᵢ). The parameters are the xᵢ
 * themselves, so the Jacobian of x → u is Πᵢ fᵢ(xᵢ), the marginal densities; the code adds log φ_R(z) − Σ log φ(zᵢ) on top of
 * them. Stan: the _lpdf and _cdf functions of the Stan Functions Reference, inv_Phi, multi_normal_lpdf, std_normal_lpdf;
 * PyMC: pm.logcdf, pt.erfinv (Φ⁻¹(u) = √2 erf⁻¹(2u − 1)), pm.logp of pm.MvNormal.dist, pm.Potential.
 */
export function gaussianCopulaCode(quantities: LinkedQuantity[], R: number[][], language: CopulaLanguage): string {
  const k = quantities.length
  if (language === 'stan') {
    const lines = quantities.map((q) => ({ v: safeName(q.symbol), m: stanMarginal(q.distribution) }))
    return [
      `// Gaussian copula: log density = Σ log f_i(x_i) (the Jacobian of x -> u) + log φ_R(z) − Σ log φ(z_i), z_i = Φ⁻¹(F_i(x_i))`,
      `// parameters { ${lines.map(({ v, m }) => `real${m.bounds} ${v};`).join(' ')} }`,
      `// model {`,
      `matrix[${k}, ${k}] R_copula = ${matrix(R)};`,
      `vector[${k}] z_copula;`,
      ...lines.flatMap(({ v, m }, i) => [
        `target += ${m.name}_lpdf(${m.arg(v)} | ${m.args.map(num).join(', ')})${m.jacobian};`,
        `z_copula[${i + 1}] = inv_Phi(${m.name}_cdf(${m.arg(v)} | ${m.args.map(num).join(', ')}));`,
      ]),
      `target += multi_normal_lpdf(z_copula | rep_vector(0, ${k}), R_copula) - std_normal_lpdf(z_copula);`,
      `// }`,
    ].join('\n')
  }
  const lines = quantities.map((q) => {
    const v = safeName(q.symbol)
    const raw = q.distribution.family === 'scaled-beta' ? `${v}_raw` : v
    return { line: modelCode(q.distribution, q.symbol, 'pymc'), cdf: `pt.exp(pm.logcdf(${pymcDist(q.distribution)}, ${raw}))` }
  })
  return [
    `# Gaussian copula: the marginals' own densities (the Jacobian of x -> u) plus log φ_R(z) − Σ log φ(z_i), z_i = Φ⁻¹(F_i(x_i))`,
    `# import numpy as np; import pymc as pm; import pytensor.tensor as pt — inside a pm.Model() block:`,
    ...lines.map((l) => l.line),
    `R_copula = np.array(${matrix(R)})`,
    `u_copula = pt.stack([${lines.map((l) => l.cdf).join(', ')}])`,
    `z_copula = np.sqrt(2) * pt.erfinv(2 * u_copula - 1)`,
    `pm.Potential("gaussian_copula", pm.logp(pm.MvNormal.dist(mu=np.zeros(${k}), cov=R_copula), z_copula) - pm.logp(pm.Normal.dist(0, 1), z_copula).sum())`,
  ].join('\n')
}

function stanMarginalBack(family: Distribution['family'], args: number[], bounds: { lower: number; upper: number } | null): Distribution {
  switch (family) {
    case 'normal': return { family, mu: args[0], sigma: args[1] }
    case 'student-t': return { family, df: args[0], mu: args[1], sigma: args[2] }
    case 'lognormal': return { family, meanlog: args[0], sdlog: args[1] }
    case 'gamma': return { family, shape: args[0], rate: args[1] }
    case 'beta': return { family, alpha: args[0], beta: args[1] }
    case 'uniform': return { family, lower: args[0], upper: args[1] }
    case 'scaled-beta':
      if (!bounds) throw new Error('cannot read the scaled beta’s range')
      return { family, alpha: args[0], beta: args[1], lower: bounds.lower, upper: bounds.upper }
  }
}

/** Priorsmith's reader of a generated Gaussian-copula block: the correlation matrix and each quantity's marginal. */
export function readGaussianCopulaCode(code: string, language: CopulaLanguage, quantities: { symbol: string; family: Distribution['family'] }[]) {
  const R = jsonAfter(code, language === 'stan' ? /R_copula = / : /R_copula = np\.array\(/) as number[][]
  const marginals = quantities.map(({ symbol, family }) => {
    const v = safeName(symbol)
    if (language === 'pymc') {
      const line = code.split('\n').find((l) => l.startsWith(`${v} = `) || l.startsWith(`${v}_raw = `))
      if (!line) throw new Error(`cannot find the line of ${v}`)
      return readModelCode(line, 'pymc', family)
    }
    const m = new RegExp(`target \\+= \\w+_lpdf\\((?:\\(${v} - (${NUM})\\) / (${NUM})|${v}) \\| ([^)]*)\\)`).exec(code)
    if (!m) throw new Error(`cannot find the density of ${v}`)
    const bounds = m[1] !== undefined ? { lower: Number(m[1]), upper: Number(m[1]) + Number(m[2]) } : null
    return stanMarginalBack(family, m[3].split(',').map(Number), bounds)
  })
  return { R, marginals }
}

export type JointCheck = { maxRelativeDifference: number; ok: boolean }

function worst(diffs: number[]): JointCheck {
  const w = diffs.some((x) => !Number.isFinite(x)) ? Infinity : Math.max(0, ...diffs)
  return { maxRelativeDifference: w, ok: w <= 1e-6 }
}

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(1, Math.abs(b))

/** The read-back check of a Dirichlet block: the α it states (readDirichletCode) must equal α to 1e-6 relative. */
export function checkDirichletCode(code: string, language: ModelLanguage, alpha: number[]): JointCheck {
  const back = readDirichletCode(code, language)
  return worst(back.length === alpha.length ? back.map((a, i) => rel(a, alpha[i])) : [Infinity])
}

/** Every language's Dirichlet lines with the read-back check of checkDirichletCode. */
export function dirichletCodeWithCheck(alpha: number[], symbol: string) {
  return MODEL_LANGUAGES.map((language) => {
    const code = dirichletModelCode(alpha, symbol, language)
    return { language, form: 'dirichlet' as const, code, check: checkDirichletCode(code, language, alpha) }
  })
}

/** The read-back check of a multivariate-normal block: its mean vector and covariance must equal the set's to 1e-6 relative. */
export function checkMultivariateNormalCode(code: string, language: ModelLanguage, quantities: LinkedQuantity[], R: number[][]): JointCheck {
  const want = multivariateNormalOf(quantities, R)
  const back = readMultivariateNormalCode(code, language)
  return worst([...want.mu.map((m, i) => rel(back.mu[i], m)), ...want.cov.flatMap((row, i) => row.map((c, j) => rel(back.cov[i]?.[j], c)))])
}

/**
 * The read-back check of a Gaussian-copula block: its correlations (absolute) and each marginal's 5/50/95 % quantiles
 * (relative) must equal the set's to 1e-6.
 */
export function checkGaussianCopulaCode(code: string, language: CopulaLanguage, quantities: LinkedQuantity[], R: number[][], quantileOf: (d: Distribution, p: number) => number): JointCheck {
  const back = readGaussianCopulaCode(code, language, quantities.map((q) => ({ symbol: q.symbol, family: q.distribution.family })))
  return worst([
    ...R.flatMap((row, i) => row.map((r, j) => Math.abs((back.R[i]?.[j] ?? NaN) - r))),
    ...quantities.flatMap((q, i) => [0.05, 0.5, 0.95].map((p) => rel(quantileOf(back.marginals[i], p), quantileOf(q.distribution, p)))),
  ])
}

/**
 * The joint prior of a linked set in each language with its read-back check: the multivariate normal (all four
 * languages) when every marginal is normal or lognormal, otherwise the general Gaussian copula (Stan and PyMC).
 */
export function linkedSetCodeWithCheck(quantities: LinkedQuantity[], R: number[][], name: string, quantileOf: (d: Distribution, p: number) => number) {
  if (isMultivariateNormal(quantities)) {
    return MODEL_LANGUAGES.map((language) => {
      const code = multivariateNormalCode(quantities, R, name, language)
      const unavailable = code.startsWith('#') && !code.includes('\n')
      return { language, form: 'multivariate-normal' as const, code, check: unavailable ? null : checkMultivariateNormalCode(code, language, quantities, R) }
    })
  }
  return COPULA_LANGUAGES.map((language) => {
    const code = gaussianCopulaCode(quantities, R, language)
    return { language, form: 'gaussian-copula' as const, code, check: checkGaussianCopulaCode(code, language, quantities, R, quantileOf) }
  })
}
