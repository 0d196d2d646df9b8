import {
  analyzePrior, bayesFactor, CONFLICT_LEVEL, decimalSum, EngineInputError, mean as distMean, mixture, mixtureQuantile, posteriorOf, PRIOR_DRIVEN_RULE, quantile,
  toUnivariate, widthSweep, type Analysis, type PilotData, type Pool, type Posterior, type PriorDistribution, type Support,
} from '../stats/index'
import { formatNumber } from '../format/numbers'

/** Width factors k of the sweep (0.25 to 8; docs/methods/width-sweep.md), evenly spaced on a log scale. */
export const SWEEP_FACTORS = [0.25, 0.35, 0.5, 0.71, 1, 1.41, 2, 2.83, 4, 5.66, 8]

export interface CandidateInput {
  key: string
  label: string
  kind: 'expert' | 'pooled' | 'consensus' | 'reconciled' | 'comparison' | 'mixture'
  prior: PriorDistribution
  /** Robust mixture only: the reconciled prior at weight 1 − w, a wide component at w. */
  mixture?: { components: [PriorDistribution, PriorDistribution]; weights: [number, number] }
}

export interface DecisionRule {
  direction: 'above' | 'below'
  threshold: number
  probability: number
}

export interface CandidateResult {
  key: string
  label: string
  kind: CandidateInput['kind']
  prior: PriorDistribution
  priorSummary: { mean: number; q025: number; q975: number }
  logEvidence: number
  method: Analysis['method']
  posterior: Analysis['posterior']
  priorPredictiveP: number
  /** ln of Box's p: finite when p underflows to 0 (a strong prior–data conflict). */
  logPriorPredictiveP: number
  priorEss: number | null
  bayesFactor: { logBF: number; twoLnBF: number; label: string } | null
  decision: { probability: number; act: boolean } | null
  flags: string[]
}

/** The robust mixture's name with the weight on its wide component: "Robust mixture (20 % on the wide component)". */
export const mixtureLabel = (weight: number) => `Robust mixture (${Math.round(weight * 100)} % on the wide component)`

/** Posterior P(θ above or below the threshold). */
function tailProbability(post: Posterior, rule: DecisionRule): number {
  const below = post.cdf(rule.threshold)
  return rule.direction === 'above' ? 1 - below : below
}

export interface RobustMixture {
  /** The mixture prior Σ wᵢ pᵢ. */
  prior: Pool
  /** The components' posteriors weighted by the posterior weights. */
  posterior: Posterior
  /** πᵢ = wᵢ mᵢ(x) / Σ wⱼ mⱼ(x), mᵢ the evidence of component i. */
  posteriorWeights: number[]
  logEvidence: number
  /** Each component's own analysis against the data. */
  analyses: Analysis[]
}

/** Mixture prior and its evidence-weighted posterior (mixture-of-conjugates result; Schmidli et al. 2014, Biometrics 70:1023–1032). */
export function robustMixture(components: readonly PriorDistribution[], weights: readonly number[], data: PilotData): RobustMixture {
  const prior = mixture(components.map(toUnivariate), weights)
  const analyses = components.map((p) => analyzePrior(p, data))
  const posts = components.map((p) => posteriorOf(p, data))
  const logs = analyses.map((a, i) => Math.log(prior.weights[i]) + a.logEvidence)
  const max = Math.max(...logs)
  const logEvidence = max + Math.log(logs.reduce((s, l) => s + Math.exp(l - max), 0))
  const pi = logs.map((l) => Math.exp(l - logEvidence))
  const mean = posts.reduce((s, p, i) => s + pi[i] * p.mean(), 0)
  const second = posts.reduce((s, p, i) => s + pi[i] * (p.sd() ** 2 + p.mean() ** 2), 0)
  const posterior: Posterior = {
    cdf: (x) => posts.reduce((s, p, i) => s + pi[i] * p.cdf(x), 0),
    quantile: (p) => mixtureQuantile(posts, pi, p),
    mean: () => mean,
    sd: () => Math.sqrt(Math.max(0, second - mean * mean)),
  }
  return { prior, posterior, posteriorWeights: pi, logEvidence, analyses }
}

function mixtureAnalysis(c: NonNullable<CandidateInput['mixture']>, data: PilotData) {
  const mix = robustMixture(c.components, c.weights, data)
  const post = mix.posterior
  const logPriorP = mix.analyses.map((a, i) => Math.log(c.weights[i]) + a.logPriorPredictiveP)
  const top = Math.max(...logPriorP)
  const logP = Math.min(0, top + Math.log(logPriorP.reduce((s, l) => s + Math.exp(l - top), 0)))
  return {
    analysis: {
      logEvidence: mix.logEvidence, method: 'quadrature' as const,
      posterior: { mean: post.mean(), sd: post.sd(), q025: post.quantile(0.025), q50: post.quantile(0.5), q975: post.quantile(0.975) },
      priorPredictiveP: Math.exp(logP),
      logPriorPredictiveP: logP,
      conflict: logP < Math.log(CONFLICT_LEVEL),
      priorEss: null,
    },
    post,
  }
}

function priorSummaryOf(c: CandidateInput) {
  if (c.mixture) {
    const prior = mixture(c.mixture.components.map(toUnivariate), c.mixture.weights)
    return { mean: prior.mean(), q025: prior.quantile(0.025), q975: prior.quantile(0.975) }
  }
  return { mean: distMean(c.prior), q025: quantile(c.prior, 0.025), q975: quantile(c.prior, 0.975) }
}

/** Sample size the prior's ESS is compared with. */
export function dataSize(data: PilotData): number {
  switch (data.model) {
    case 'normal-known-sigma':
    case 'normal':
      return data.values.length
    case 'binomial':
      return data.trials
    case 'poisson':
      return decimalSum(data.exposures)
  }
}

/**
 * Every candidate prior against the pilot data: posterior, evidence, Bayes factor against the comparison prior, checks.
 * `onStep` is called after each candidate (a progress report).
 */
export function evaluateCandidates(candidates: CandidateInput[], data: PilotData, rule: DecisionRule | null, onStep?: () => void): CandidateResult[] {
  const n = dataSize(data)
  const results: CandidateResult[] = candidates.map((c): CandidateResult => {
    const { analysis, post } = namedFor(c, () => (c.mixture ? mixtureAnalysis(c.mixture, data) : { analysis: analyzePrior(c.prior, data), post: posteriorOf(c.prior, data) }))
    const flags: string[] = []
    if (analysis.priorEss !== null && analysis.priorEss > n) flags.push('prior-dominates')
    if (analysis.conflict) flags.push('prior-data-conflict')
    const probability = rule ? tailProbability(post, rule) : null
    onStep?.()
    return {
      key: c.key, label: c.label, kind: c.kind, prior: c.prior, priorSummary: priorSummaryOf(c),
      logEvidence: analysis.logEvidence, method: analysis.method, posterior: analysis.posterior,
      priorPredictiveP: analysis.priorPredictiveP, logPriorPredictiveP: analysis.logPriorPredictiveP, priorEss: analysis.priorEss, bayesFactor: null,
      decision: rule && probability !== null ? { probability, act: probability > rule.probability } : null, flags,
    }
  })
  const comparison = results.find((r) => r.kind === 'comparison')
  if (comparison) {
    for (const r of results) {
      if (r === comparison) continue
      const bf = bayesFactor(r.logEvidence, comparison.logEvidence)
      r.bayesFactor = { logBF: bf.logBF, twoLnBF: bf.twoLnBF, label: bf.label }
    }
  }
  return results
}

/** Runs one candidate's computation; an input error names the candidate (its key as the field, its label in the message). */
function namedFor<T>(c: CandidateInput, run: () => T): T {
  try {
    return run()
  } catch (err) {
    if (err instanceof EngineInputError) throw new EngineInputError(c.key, `${c.label}: ${err.message}`)
    throw err
  }
}

export interface SweepSummary {
  factors: number[]
  points: { factor: number; logEvidence: number; posteriorMean: number; q025: number; q975: number }[]
  evidenceRatio: number
  priorDriven: boolean
  rule: string
}

export function sweepOf(prior: PriorDistribution, data: PilotData, support: Support, factors = SWEEP_FACTORS, onStep?: () => void): SweepSummary {
  const s = widthSweep(prior, data, factors, support, onStep)
  return {
    factors,
    points: s.points.map((p) => ({ factor: p.factor, logEvidence: p.logEvidence, posteriorMean: p.posteriorMean, q025: p.q025, q975: p.q975 })),
    evidenceRatio: s.evidenceRatio,
    priorDriven: s.priorDriven,
    rule: PRIOR_DRIVEN_RULE,
  }
}

/** A p-value from its logarithm in words: "= 0.012", or a power of ten when it is below 1e-6 (it may underflow to 0). */
export function formatSmallP(logP: number): string {
  const log10 = logP / Math.LN10
  if (log10 >= -6) return `= ${Math.exp(logP).toPrecision(2)}`
  return `is about 10^${Math.round(log10)}, practically zero`
}

/** Plain-language findings from the numbers: what the width does, and each caution that applies. */
export function findings(results: CandidateResult[], sweep: SweepSummary | null, n: number): string[] {
  const out: string[] = []
  if (sweep) {
    const at = (k: number) => sweep.points.find((p) => Math.abs(p.factor - k) < 1e-9)
    const base = at(1)
    const wide = at(4)
    if (base && wide) {
      const ratio = Math.exp(base.logEvidence - wide.logEvidence)
      const moved = Math.abs(wide.posteriorMean - base.posteriorMean)
      const relative = moved / Math.max(1e-12, (base.q975 - base.q025) / 3.92)
      out.push(
        `Widening the reconciled prior 4× moves the posterior mean from ${formatNumber(base.posteriorMean, 3)} to ${formatNumber(wide.posteriorMean, 3)}` +
        ` (${relative < 0.1 ? 'barely' : relative < 0.5 ? 'a little' : 'noticeably'}) and ${ratio >= 1 ? 'divides' : 'multiplies'} the evidence by about ${formatNumber(ratio >= 1 ? ratio : 1 / ratio, 3)}.`,
      )
    }
    if (sweep.priorDriven) out.push('A Bayes factor built on this prior reflects its width more than the data: the evidence changes more than 3× across widths 0.5–2× while the posterior hardly moves.')
  }
  for (const r of results) {
    if (r.flags.includes('prior-dominates')) out.push(`${r.label}: the prior carries more information than the pilot data (prior effective sample size ${formatNumber(r.priorEss!, 3)} against n = ${formatNumber(n, 3)}).`)
    if (r.flags.includes('prior-data-conflict')) out.push(`${r.label}: the pilot data sit in the tail of what this prior predicts (Box's prior predictive p ${formatSmallP(r.logPriorPredictiveP)}); prior and data conflict.`)
  }
  return out
}
