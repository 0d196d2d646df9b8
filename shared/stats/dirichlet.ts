import { cdf, mean, quantile, sd, supportOf, validateDistribution } from './distributions'
import { EngineInputError } from './errors'
import { lgamma } from './special'
import type { DirichletAnalysis, DirichletFit, DirichletPrior, DirichletSweepPoint, Distribution, MultinomialData, PosteriorSummary } from './types'

/**
 * Priorsmith's own rules of thumb for a composition (conventions of this tool, not published tests): the experts' means
 * should add up to 1 within 0.05, and the certainty each share implies on its own (its beta concentration) should not
 * differ by more than 3 times between shares, or one Dirichlet cannot match them all.
 */
export const COMPOSITION_CONVENTION = { meanSumTolerance: 0.05, certaintyRatio: 3 } as const

const MISMATCH_PROBS = [0.05, 0.25, 0.5, 0.75, 0.95] as const

/** The beta marginal of share i of a Dirichlet(α): Beta(αᵢ, Σα − αᵢ) (Johnson, Kotz & Balakrishnan 2000, Continuous Multivariate Distributions vol. 1, ch. 49). */
export function dirichletMarginal(alpha: number[], i: number): Distribution {
  const total = alpha.reduce((s, a) => s + a, 0)
  return { family: 'beta', alpha: alpha[i], beta: total - alpha[i] }
}

/**
 * A Dirichlet from each share's elicited distribution: means proportional to the marginals' means, and the total
 * concentration α₀ that makes the Dirichlet's beta-marginal variances pᵢ(1 − pᵢ)/(α₀ + 1) closest to the elicited variances
 * by least squares in 1/(α₀ + 1) (closed form). Matching beta marginals by least squares follows the reconciliation idea
 * of Elfadaly & Garthwaite (2017, Statistics and Computing 27, "Eliciting Dirichlet and Gaussian copula prior
 * distributions for multinomial models", §3); this exact criterion is Priorsmith's convention (docs/methods/joint-priors.md).
 * With `residual`, a last "other" share gets the rest of the mean (1 − Σ means) and no judgement of its own.
 */
export function dirichletFromMarginals(marginals: Distribution[], options: { residual?: boolean } = {}): DirichletFit {
  if (!Array.isArray(marginals)) throw new EngineInputError('marginals', 'Give one distribution per share.')
  const residual = options.residual === true
  const minimum = residual ? 1 : 2
  if (marginals.length < minimum || marginals.length > 10)
    throw new EngineInputError('marginals', residual ? 'A composition with an "other" share needs 1 to 10 elicited shares.' : 'A composition needs 2 to 10 shares.')
  const means: number[] = []
  const variances: number[] = []
  marginals.forEach((d, i) => {
    const field = `marginals[${i}]`
    validateDistribution(d, field)
    const s = supportOf(d)
    if (s.lower < 0 || s.upper > 1) throw new EngineInputError(field, `Share ${i + 1} must be a proportion: its distribution has to stay between 0 and 1.`)
    const m = mean(d)
    const v = sd(d) ** 2
    if (!(m > 0 && m < 1 && v > 0)) throw new EngineInputError(field, `Share ${i + 1} must have a mean strictly between 0 and 1 and some uncertainty.`)
    means.push(m)
    variances.push(v)
  })
  const meanSum = means.reduce((s, m) => s + m, 0)
  if (residual && !(meanSum < 1)) throw new EngineInputError('marginals', `The shares' means add up to ${meanSum.toPrecision(3)}, which leaves nothing for the "other" share.`)
  const shares = residual ? [...means, 1 - meanSum] : means.map((m) => m / meanSum)
  // Least squares: minimise Σ (vᵢ − aᵢ c)² over c = 1/(α₀ + 1), aᵢ = pᵢ(1 − pᵢ), over the elicited shares only.
  let num = 0
  let den = 0
  means.forEach((_, i) => {
    const a = shares[i] * (1 - shares[i])
    num += a * variances[i]
    den += a * a
  })
  const c = num / den
  const totalConcentration = 1 / c - 1
  if (!(totalConcentration > 0 && Number.isFinite(totalConcentration)))
    throw new EngineInputError('marginals', 'The shares are more uncertain than any Dirichlet can be: their spreads are close to the largest a proportion can have.')
  const alpha = shares.map((p) => p * totalConcentration)
  const mismatch = marginals.map((d, i) => {
    const fitted = dirichletMarginal(alpha, i)
    return Math.max(...MISMATCH_PROBS.map((p) => Math.abs(cdf(fitted, quantile(d, p)) - p)))
  })
  const impliedConcentration = means.map((m, i) => (m * (1 - m)) / variances[i] - 1)
  const warnings: DirichletFit['warnings'] = []
  if (!residual && Math.abs(meanSum - 1) > COMPOSITION_CONVENTION.meanSumTolerance)
    warnings.push({
      code: 'mean-sum',
      message: `The shares' means add up to ${meanSum.toFixed(2)}, not 1. The Dirichlet scales them to add up to 1, so each share's middle moves.`,
    })
  const positive = impliedConcentration.filter((x) => x > 0)
  const ratio = positive.length === impliedConcentration.length ? Math.max(...positive) / Math.min(...positive) : Infinity
  if (ratio > COMPOSITION_CONVENTION.certaintyRatio)
    warnings.push({
      code: 'unequal-certainty',
      message:
        `The shares are held with very different certainty (the most certain is worth about ${Number.isFinite(ratio) ? ratio.toFixed(1) : 'many'} times as many observations as the least). ` +
        'A Dirichlet has one total concentration for all shares, so it is too sure about some shares and too vague about others: see how far each share moved. ' +
        'Priorsmith does not offer the generalised Dirichlet, which could match every share, because it is built share by share and its answer depends on the order the shares are listed in.',
    })
  return { family: 'dirichlet', alpha, mismatch, totalConcentration, meanSum, impliedConcentration, warnings }
}

function validateDirichlet(prior: DirichletPrior): number {
  if (!prior || prior.family !== 'dirichlet' || !Array.isArray(prior.alpha) || prior.alpha.length < 2)
    throw new EngineInputError('alpha', 'A Dirichlet prior needs at least two concentration parameters.')
  prior.alpha.forEach((a, i) => {
    if (typeof a !== 'number' || !(a > 0) || !Number.isFinite(a)) throw new EngineInputError('alpha', `Concentration ${i + 1} must be a positive number.`)
  })
  return prior.alpha.length
}

function validateCounts(data: MultinomialData, k: number): void {
  if (!data || data.model !== 'multinomial' || !Array.isArray(data.counts) || data.counts.length === 0)
    throw new EngineInputError('counts', 'The data contain no rows of counts.')
  data.counts.forEach((row, r) => {
    if (!Array.isArray(row) || row.length !== k) throw new EngineInputError('counts', `Row ${r + 1} must have one count per category (${k}).`)
    row.forEach((x, j) => {
      if (!Number.isInteger(x) || x < 0) throw new EngineInputError('counts', `Row ${r + 1}, category ${j + 1}: a count must be a whole number, 0 or more.`)
    })
  })
}

/** Posterior summary of share i of a Dirichlet(α): its Beta(αᵢ, Σα − αᵢ) marginal. */
function shareSummary(alpha: number[], i: number): PosteriorSummary {
  const d = dirichletMarginal(alpha, i)
  return { mean: mean(d), sd: sd(d), q025: quantile(d, 0.025), q50: quantile(d, 0.5), q975: quantile(d, 0.975) }
}

/**
 * Multinomial rows with a Dirichlet(α) prior: posterior Dirichlet(α + Σ rows) and the log evidence of the rows as recorded,
 * Σᵣ log(nᵣ! / Πₖ xᵣₖ!) + log B(α + X) − log B(α), the Dirichlet-multinomial with all constants (BDA3 §3.4; Mosimann 1962,
 * Biometrika 49); prior effective sample size Σα (Morita, Thall & Müller 2008, Biometrics 64, §3).
 */
export function dirichletMultinomialAnalysis(prior: DirichletPrior, data: MultinomialData): DirichletAnalysis {
  const k = validateDirichlet(prior)
  validateCounts(data, k)
  const totals = new Array<number>(k).fill(0)
  let coefficients = 0
  for (const row of data.counts) {
    const n = row.reduce((s, x) => s + x, 0)
    coefficients += lgamma(n + 1) - row.reduce((s, x) => s + lgamma(x + 1), 0)
    row.forEach((x, j) => (totals[j] += x))
  }
  const A = prior.alpha.reduce((s, a) => s + a, 0)
  const N = totals.reduce((s, x) => s + x, 0)
  const posteriorAlpha = prior.alpha.map((a, j) => a + totals[j])
  let logEvidence = coefficients + lgamma(A) - lgamma(A + N)
  prior.alpha.forEach((a, j) => (logEvidence += lgamma(a + totals[j]) - lgamma(a)))
  return {
    logEvidence,
    method: 'closed-form',
    posteriorAlpha,
    posterior: posteriorAlpha.map((_, j) => shareSummary(posteriorAlpha, j)),
    priorEss: A,
    observations: N,
  }
}

/**
 * The width sweep of a Dirichlet: total concentration divided by k² at each width factor k, means kept (the same rule as
 * the beta's in scaleSpread, so each share's spread grows about k times), with the log evidence and posterior means.
 */
export function dirichletWidthSweep(prior: DirichletPrior, data: MultinomialData, factors: number[]): DirichletSweepPoint[] {
  validateDirichlet(prior)
  if (!Array.isArray(factors) || factors.length === 0) throw new EngineInputError('factors', 'Give at least one width factor.')
  return factors.map((f) => {
    if (!(f > 0 && Number.isFinite(f))) throw new EngineInputError('factors', 'Each width factor must be a positive number.')
    const alpha = prior.alpha.map((a) => a / (f * f))
    const r = dirichletMultinomialAnalysis({ family: 'dirichlet', alpha }, data)
    return { factor: f, alpha, logEvidence: r.logEvidence, posteriorMeans: r.posterior.map((s) => s.mean) }
  })
}
