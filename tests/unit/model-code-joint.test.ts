import { describe, expect, it } from 'vitest'
import {
  checkDirichletCode,
  checkGaussianCopulaCode,
  checkMultivariateNormalCode,
  dirichletCodeWithCheck,
  dirichletModelCode,
  gaussianCopulaCode,
  linkedSetCodeWithCheck,
  multivariateNormalCode,
  readDirichletCode,
  readGaussianCopulaCode,
  readMultivariateNormalCode,
  type LinkedQuantity,
} from '../../shared/elicitation/joint-model-code'
import { MODEL_LANGUAGES } from '../../shared/elicitation/model-code'
import { copulaCorrelationFromConditional, dirichletFromMarginals, quantile } from '../../shared/stats/index'

// Constructed: a composition of three household-uptake shares (the Dirichlet the engine fits to Beta(20, 16), Beta(9, 20),
// Beta(5, 25)) and linked quantities with non-round parameters.
const alpha = dirichletFromMarginals([
  { family: 'beta', alpha: 20, beta: 16 },
  { family: 'beta', alpha: 9, beta: 20 },
  { family: 'beta', alpha: 5, beta: 25 },
]).alpha
const a = alpha.map((x) => Number(x.toPrecision(15)))

describe('Dirichlet prior code in each language’s documented form', () => {
  // Stan Functions Reference, "Dirichlet distribution": theta ~ dirichlet(alpha), theta a simplex, alpha a vector.
  it('Stan: dirichlet of a column vector on a simplex', () => {
    expect(dirichletModelCode(alpha, 'uptake share', 'stan')).toBe(`uptake_share ~ dirichlet([${a.join(', ')}]');  // declare simplex[3] uptake_share;`)
  })
  // PyMC API reference: pymc.Dirichlet(name, a).
  it('PyMC: pm.Dirichlet with a=', () => {
    expect(dirichletModelCode(alpha, 'uptake', 'pymc')).toBe(`uptake = pm.Dirichlet("uptake", a=[${a.join(', ')}])`)
  })
  // JAGS 4.3.0 user manual, ch. 9: ddirch(alpha[]); the model language has no vector literal, so constants are nodes.
  it('JAGS: ddirch of constant nodes', () => {
    expect(dirichletModelCode(alpha, 'uptake', 'jags').split('\n')).toEqual([
      `alpha_uptake[1] <- ${a[0]}`,
      `alpha_uptake[2] <- ${a[1]}`,
      `alpha_uptake[3] <- ${a[2]}`,
      'uptake[1:3] ~ ddirch(alpha_uptake[1:3])',
    ])
  })
  it('brms: the Stan lines as stanvars, saying why', () => {
    const code = dirichletModelCode(alpha, 'uptake', 'brms')
    expect(code).toMatch(/^# brms has no Dirichlet prior on category probabilities/)
    expect(code).toContain(`stanvar(scode = "simplex[3] uptake;", block = "parameters")`)
    expect(code).toContain(`stanvar(scode = "uptake ~ dirichlet([${a.join(', ')}]');", block = "model")`)
  })
  it('every language reads back to α, and a line with the shares in another order fails the check', () => {
    const rows = dirichletCodeWithCheck(alpha, 'uptake')
    expect(rows.map((r) => r.language)).toEqual([...MODEL_LANGUAGES])
    for (const r of rows) {
      expect(r.check.ok).toBe(true)
      expect(r.check.maxRelativeDifference).toBeLessThan(1e-12)
    }
    const swapped = `uptake ~ dirichlet([${a[1]}, ${a[0]}, ${a[2]}]');`
    expect(readDirichletCode(swapped, 'stan')).toEqual([a[1], a[0], a[2]])
    expect(checkDirichletCode(swapped, 'stan', alpha).ok).toBe(false)
    expect(checkDirichletCode(`uptake = pm.Dirichlet("uptake", a=[${a[0]}, ${a[1]}])`, 'pymc', alpha).ok).toBe(false)
  })
})

const rho = copulaCorrelationFromConditional(0.7)
const R2 = [
  [1, rho],
  [rho, 1],
]
const normalPair: LinkedQuantity[] = [
  { symbol: 'burst_rate', distribution: { family: 'normal', mu: 12.5, sigma: 3.25 } },
  { symbol: 'repair_time', distribution: { family: 'lognormal', meanlog: 1.75, sdlog: 0.4 } },
]

function multiply(A: number[][], B: number[][]): number[][] {
  return A.map((row) => B[0].map((_, j) => row.reduce((s, x, k) => s + x * B[k][j], 0)))
}

describe('normal and lognormal marginals: a multivariate normal (log scale for the lognormal)', () => {
  const cov12 = rho * 3.25 * 0.4
  it('Stan and PyMC state mean and covariance sᵢsⱼRᵢⱼ on (x, log y)', () => {
    const stan = multivariateNormalCode(normalPair, R2, 'pipes', 'stan')
    expect(stan).toContain('// pipes = (burst_rate, log(repair_time))')
    expect(stan).toContain('burst_rate = pipes[1]; repair_time = exp(pipes[2]);')
    const back = readMultivariateNormalCode(stan, 'stan')
    expect(back.mu).toEqual([12.5, 1.75])
    expect(back.cov[0][0]).toBeCloseTo(3.25 ** 2, 12)
    expect(back.cov[1][1]).toBeCloseTo(0.16, 12)
    expect(back.cov[0][1]).toBeCloseTo(cov12, 12)
    const pymc = multivariateNormalCode(normalPair, R2, 'pipes', 'pymc')
    expect(pymc.split('\n')[2]).toBe('repair_time = pm.Deterministic("repair_time", pm.math.exp(pipes[1]))')
    expect(readMultivariateNormalCode(pymc, 'pymc')).toEqual(back)
  })
  // JAGS 4.3.0 user manual, ch. 9: dmnorm(mu[], T[,]) with T the precision matrix, the inverse of the covariance.
  it('JAGS gets the precision matrix: Omega · Σ = I', () => {
    const code = multivariateNormalCode(normalPair, R2, 'pipes', 'jags')
    expect(code).toContain('pipes[1:2] ~ dmnorm(mu_pipes[1:2], Omega_pipes[1:2,1:2])')
    const omega = [1, 2].map((i) => [1, 2].map((j) => Number(new RegExp(`Omega_pipes\\[${i},${j}\\] <- (\\S+)`).exec(code)![1])))
    const sigma = [
      [3.25 ** 2, cov12],
      [cov12, 0.16],
    ]
    multiply(omega, sigma).forEach((row, i) => row.forEach((x, j) => expect(x).toBeCloseTo(i === j ? 1 : 0, 10)))
  })
  it('all four languages read back; a covariance with standard deviations on the diagonal fails', () => {
    const rows = linkedSetCodeWithCheck(normalPair, R2, 'pipes', quantile)
    expect(rows.map((r) => [r.language, r.form])).toEqual(MODEL_LANGUAGES.map((l) => [l, 'multivariate-normal']))
    for (const r of rows) expect(r.check?.ok).toBe(true)
    const sdsOnDiagonal = `pipes ~ multi_normal([12.5, 1.75]', [[3.25, ${cov12}], [${cov12}, 0.4]]);`
    const check = checkMultivariateNormalCode(sdsOnDiagonal, 'stan', normalPair, R2)
    expect(check.ok).toBe(false)
    expect(check.maxRelativeDifference).toBeGreaterThan(0.5)
  })
  it('JAGS says why when the quantities move in lockstep (singular covariance)', () => {
    const rows = linkedSetCodeWithCheck(normalPair, [[1, 1], [1, 1]], 'pipes', quantile)
    const jags = rows.find((r) => r.language === 'jags')!
    expect(jags.check).toBeNull()
    expect(jags.code).toMatch(/singular/)
    expect(rows.find((r) => r.language === 'stan')!.check?.ok).toBe(true)
  })
})

describe('any other marginals: the general Gaussian copula in Stan and PyMC, with its Jacobian', () => {
  const R3 = [
    [1, rho, 0.2],
    [rho, 1, -0.1],
    [0.2, -0.1, 1],
  ]
  const trio: LinkedQuantity[] = [
    { symbol: 'burst_rate', distribution: { family: 'gamma', shape: 7.88412052286, rate: 0.742966530653 } },
    { symbol: 'uptake', distribution: { family: 'beta', alpha: 2.121355756, beta: 4.35557891597 } },
    { symbol: 'repair_days', distribution: { family: 'scaled-beta', alpha: 5.17988790107, beta: 9.70940586908, lower: 0, upper: 30 } },
  ]
  // Stan Functions Reference: gamma_lpdf(y | alpha, beta) with beta the rate, beta_cdf, inv_Phi, multi_normal_lpdf.
  it('Stan: marginal densities (the Jacobian), z = Φ⁻¹(F(x)), and log φ_R(z) − Σ log φ(zᵢ)', () => {
    const code = gaussianCopulaCode(trio, R3, 'stan')
    expect(code).toContain('// parameters { real<lower=0> burst_rate; real<lower=0, upper=1> uptake; real<lower=0, upper=30> repair_days; }')
    expect(code).toContain('target += gamma_lpdf(burst_rate | 7.88412052286, 0.742966530653);')
    expect(code).toContain('z_copula[1] = inv_Phi(gamma_cdf(burst_rate | 7.88412052286, 0.742966530653));')
    expect(code).toContain('target += beta_lpdf((repair_days - 0) / 30 | 5.17988790107, 9.70940586908) - log(30);')
    expect(code).toContain('target += multi_normal_lpdf(z_copula | rep_vector(0, 3), R_copula) - std_normal_lpdf(z_copula);')
  })
  // PyMC API reference: pm.logcdf, pm.logp, pm.MvNormal.dist, pm.Potential; pytensor erfinv.
  it('PyMC: the marginals as random variables plus a potential for the copula density', () => {
    const code = gaussianCopulaCode(trio, R3, 'pymc')
    expect(code).toContain('burst_rate = pm.Gamma("burst_rate", alpha=7.88412052286, beta=0.742966530653)')
    expect(code).toContain('pt.exp(pm.logcdf(pm.Beta.dist(alpha=5.17988790107, beta=9.70940586908), repair_days_raw))')
    expect(code).toContain('z_copula = np.sqrt(2) * pt.erfinv(2 * u_copula - 1)')
  })
  it('both read back to the correlations and marginals; an altered correlation or marginal fails', () => {
    const rows = linkedSetCodeWithCheck(trio, R3, 'network', quantile)
    expect(rows.map((r) => [r.language, r.form])).toEqual([['stan', 'gaussian-copula'], ['pymc', 'gaussian-copula']])
    for (const r of rows) expect(r.check?.ok).toBe(true)
    const families = trio.map((q) => ({ symbol: q.symbol, family: q.distribution.family }))
    const stan = gaussianCopulaCode(trio, R3, 'stan')
    // The gamma's scale written where Stan wants the rate, and one correlation changed by 0.01.
    const scaleForRate = stan.replace('gamma_lpdf(burst_rate | 7.88412052286, 0.742966530653)', 'gamma_lpdf(burst_rate | 7.88412052286, 1.34595)')
    expect(readGaussianCopulaCode(scaleForRate, 'stan', families).marginals[0]).toEqual({ family: 'gamma', shape: 7.88412052286, rate: 1.34595 })
    expect(checkGaussianCopulaCode(scaleForRate, 'stan', trio, R3, quantile).ok).toBe(false)
    const pymc = gaussianCopulaCode(trio, R3, 'pymc')
    const shifted = pymc.replace('R_copula = np.array([[1, ', 'R_copula = np.array([[1, 0.01 + ')
    expect(checkGaussianCopulaCode(pymc, 'pymc', trio, R3, quantile).ok).toBe(true)
    expect(() => checkGaussianCopulaCode(shifted, 'pymc', trio, R3, quantile)).toThrow()
    const R3shifted = R3.map((row, i) => row.map((x, j) => (i + j === 1 ? x + 0.01 : x)))
    expect(checkGaussianCopulaCode(gaussianCopulaCode(trio, R3shifted, 'pymc'), 'pymc', trio, R3, quantile).maxRelativeDifference).toBeCloseTo(0.01, 10)
    expect(readGaussianCopulaCode(stan, 'stan', families).marginals[2]).toEqual(trio[2].distribution)
  })
})
