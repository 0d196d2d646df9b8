import {
  analyzePrior, bayesFactor, CONFLICT_LEVEL, decimalSum, EngineInputError, fractionalBayesFactors, mean as distMean, mixture,
  mixtureQuantile, POWER_SCALING_THRESHOLD, posteriorOf, powerScalingSensitivity, PRIOR_DRIVEN_CONVENTION, PRIOR_DRIVEN_RULE, priorPowerCurve, quantile,
  toUnivariate, widthSweep, type Analysis, type CandidatePrior, type FractionalBayesFactor, type PilotData, type Pool, type Posterior, type PowerScaledPoint,
  type PowerScalingSensitivity, type PriorDistribution, type Support,
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
  /** Fractional Bayes factor against the comparison prior with its training fraction b; null for the comparison prior itself. */
  fractionalBayesFactor: FractionalBayesFactor | null
  /** Power-scaling sensitivity of the posterior to the prior and to the likelihood, with its reading. */
  sensitivity: PowerScalingSensitivity | null
  /** Why the fractional Bayes factor or the sensitivity is missing, in words; empty when both are there. */
  diagnosticNotes: string[]
  decision: { probability: number; act: boolean } | null
  flags: string[]
}

/** Powers α of the α-curve: 0.5 to 2, evenly spaced on a log scale (docs/methods/sensitivity.md). */
export const ALPHA_CURVE_POWERS = [-4, -3, -2, -1, 0, 1, 2, 3, 4].map((k) => 2 ** (k / 4))

/** The caution that goes with both diagnostics wherever they are shown. */
export const DIAGNOSTICS_CAUTION =
  'The fractional Bayes factor and the power-scaling sensitivities are aids to judgement, not tests: they say how much a conclusion leans on the prior, not which prior is right. Regulatory guidance on the choice of priors still applies.'

/** A candidate as the sensitivity tools take it: its distribution, or the robust mixture it stands for. */
function candidatePrior(c: CandidateInput): CandidatePrior {
  return c.mixture ? { family: 'mixture', components: [...c.mixture.components], weights: [...c.mixture.weights] } : c.prior
}

/** Runs one diagnostic; an input error the engine raises becomes a note instead of stopping the whole analysis. */
function attempt<T>(notes: string[], what: string, run: () => T): T | null {
  try {
    return run()
  } catch (err) {
    if (err instanceof EngineInputError) {
      notes.push(`${what} could not be computed: ${err.message}`)
      return null
    }
    throw err
  }
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
/** Progress steps of evaluateCandidates: each candidate, the fractional Bayes factors (with a comparison prior), each candidate's sensitivity. */
export function candidateSteps(candidates: readonly CandidateInput[]): number {
  return 2 * candidates.length + (candidates.some((c) => c.kind === 'comparison') ? 1 : 0)
}

/**
 * Every candidate prior against the pilot data: posterior, evidence, ordinary and fractional Bayes factors against the
 * comparison prior (training fraction b, default m₀/n), power-scaling sensitivity, checks. `onStep` is called after
 * each step (a progress report; candidateSteps in all); it may throw to stop the computation.
 */
export function evaluateCandidates(candidates: CandidateInput[], data: PilotData, rule: DecisionRule | null, trainingFraction: number | null = null, onStep?: () => void): CandidateResult[] {
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
      fractionalBayesFactor: null, sensitivity: null, diagnosticNotes: [],
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
    addFractionalBayesFactors(candidates, results, data, trainingFraction)
    onStep?.()
  }
  results.forEach((r, i) => {
    r.sensitivity = attempt(r.diagnosticNotes, 'The power-scaling sensitivity', () => powerScalingSensitivity(candidatePrior(candidates[i]), data))
    onStep?.()
  })
  return results
}

/** Each candidate's fractional Bayes factor against the comparison prior (O'Hagan 1995), b = m₀/n unless the analyst set it. */
function addFractionalBayesFactors(candidates: CandidateInput[], results: CandidateResult[], data: PilotData, trainingFraction: number | null): void {
  const reference = candidatePrior(candidates.find((c) => c.kind === 'comparison')!)
  const others = candidates.map((c, i) => ({ prior: candidatePrior(c), result: results[i] })).filter((o) => o.result.kind !== 'comparison')
  const b = trainingFraction ?? undefined
  // All at once computes the comparison prior's part once; one by one only when some candidate cannot be computed.
  const together = attempt([], '', () => fractionalBayesFactors(others.map((o) => o.prior), reference, data, b))
  others.forEach((o, i) => {
    o.result.fractionalBayesFactor = together
      ? together[i]
      : attempt(o.result.diagnosticNotes, 'The fractional Bayes factor', () => fractionalBayesFactors([o.prior], reference, data, b)[0])
  })
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
  /**
   * logBF and logFractionalBF: ln of the ordinary and of the fractional Bayes factor (training fraction `trainingFraction`)
   * of the widened prior against the prior as it stands (k = 1); logFractionalBF is null when it cannot be computed
   * (`notes` says why).
   */
  points: { factor: number; logEvidence: number; logBF: number; logFractionalBF: number | null; posteriorMean: number; q025: number; q975: number }[]
  evidenceRatio: number
  /** The fractional Bayes factor's largest over smallest value across k = 0.5–2, the counterpart of evidenceRatio. */
  fractionalRatio: number | null
  /** Training fraction b of the fractional Bayes factor curve. */
  trainingFraction: number | null
  priorDriven: boolean
  rule: string
  /** Posterior mean and 90 % interval with the prior raised to each power α of ALPHA_CURVE_POWERS. */
  alphaCurve: PowerScaledPoint[] | null
  /** Why the fractional curve or the α-curve is missing, in words. */
  notes: string[]
}

/** Progress steps of sweepOf: each width, the fractional Bayes factor curve, the α-curve. */
export function sweepSteps(factors: readonly number[]): number {
  return factors.length + 2
}

/**
 * The width sweep of a prior (evidence and posterior against the spread factor k), the fractional Bayes factor of each
 * widened prior against the prior itself, and the posterior against the power α on the prior. `onStep` is called after
 * each width and after each curve (a progress report; sweepSteps in all); it may throw to stop the computation.
 */
export function sweepOf(prior: PriorDistribution, data: PilotData, support: Support, factors = SWEEP_FACTORS, trainingFraction: number | null = null, onStep?: () => void): SweepSummary {
  const s = widthSweep(prior, data, factors, support, onStep)
  const reference = s.points.find((p) => p.factor === 1)?.logEvidence ?? analyzePrior(prior, data, { skipPredictiveCheck: true }).logEvidence
  const notes: string[] = []
  const fractional = attempt(notes, 'The fractional Bayes factor curve', () => fractionalBayesFactors(s.points.map((p) => p.prior), prior, data, trainingFraction ?? undefined))
  onStep?.()
  const alphaCurve = attempt(notes, 'The posterior against the power on the prior', () => priorPowerCurve(prior, data, ALPHA_CURVE_POWERS))
  onStep?.()
  const inRange = fractional?.filter((_, i) => factors[i] >= PRIOR_DRIVEN_CONVENTION.fromFactor && factors[i] <= PRIOR_DRIVEN_CONVENTION.toFactor).map((f) => f.logBF) ?? []
  return {
    factors,
    points: s.points.map((p, i) => ({
      factor: p.factor, logEvidence: p.logEvidence, logBF: p.logEvidence - reference, logFractionalBF: fractional ? fractional[i].logBF : null, posteriorMean: p.posteriorMean, q025: p.q025, q975: p.q975,
    })),
    evidenceRatio: s.evidenceRatio,
    // The prior itself (k = 1, ln FBF = 0) belongs to the range whether or not the factors include it.
    fractionalRatio: fractional ? Math.exp(Math.max(0, ...inRange) - Math.min(0, ...inRange)) : null,
    trainingFraction: fractional ? fractional[0].b : null,
    priorDriven: s.priorDriven,
    rule: PRIOR_DRIVEN_RULE,
    alphaCurve,
    notes,
  }
}

/** A p-value from its logarithm in words: "= 0.012", or a power of ten when it is below 1e-6 (it may underflow to 0). */
export function formatSmallP(logP: number): string {
  const log10 = logP / Math.LN10
  if (log10 >= -6) return `= ${formatNumber(Math.exp(logP), 2)}`
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
    const fractional = base?.logFractionalBF != null && wide?.logFractionalBF != null ? Math.exp(wide.logFractionalBF - base.logFractionalBF) : null
    if (base && wide && fractional !== null) {
      const ratio = Math.exp(base.logEvidence - wide.logEvidence)
      const change = Math.abs(fractional - 1)
      out.push(
        `Over the same widening the fractional Bayes factor (training fraction b = ${formatNumber(sweep.trainingFraction!, 3)}) ` +
        (change < 0.1
          ? `stays level (it changes by ${change < 0.001 ? 'less than 0.1' : (change * 100).toFixed(1)} %), where the ordinary Bayes factor changes by a factor of about ${formatNumber(ratio >= 1 ? ratio : 1 / ratio, 3)}.`
          : `changes by a factor of ${formatNumber(fractional >= 1 ? fractional : 1 / fractional, 3)}, against about ${formatNumber(ratio >= 1 ? ratio : 1 / ratio, 3)} for the ordinary Bayes factor.`),
      )
    }
    if (sweep.priorDriven) {
      out.push(
        'A Bayes factor built on this prior reflects its width more than the data: the evidence changes more than 3× across widths 0.5–2× while the posterior hardly moves.' +
        (sweep.trainingFraction !== null ? ' The fractional Bayes factor, which does not hang on the width, is the alternative to report.' : ''),
      )
    }
    for (const note of sweep.notes) out.push(`Reconciled prior: ${note}`)
  }
  for (const r of results) {
    if (r.flags.includes('prior-dominates')) out.push(`${r.label}: the prior carries more information than the pilot data (prior effective sample size ${formatNumber(r.priorEss!, 3)} against n = ${formatNumber(n, 3)}).`)
    if (r.flags.includes('prior-data-conflict')) out.push(`${r.label}: the pilot data sit in the tail of what this prior predicts (Box's prior predictive p ${formatSmallP(r.logPriorPredictiveP)}); prior and data conflict.`)
    const sens = r.sensitivity
    if (sens?.diagnosis === 'prior-data-conflict') {
      out.push(
        `${r.label}: the posterior moves when either the prior or the data is given more weight (power-scaling sensitivity ${formatNumber(sens.prior, 3)} to the prior ` +
        `and ${formatNumber(sens.likelihood, 3)} to the data, both at or above ${POWER_SCALING_THRESHOLD}): prior and data may be in conflict.`,
      )
    }
    if (sens?.diagnosis === 'weak-likelihood') {
      out.push(
        `${r.label}: the posterior moves when the prior is given more or less weight (sensitivity ${formatNumber(sens.prior, 3)}) but hardly when the data are ` +
        `(${formatNumber(sens.likelihood, 3)}, below ${POWER_SCALING_THRESHOLD}): the data say little here, so the prior carries the result.`,
      )
    }
    for (const note of r.diagnosticNotes) out.push(`${r.label}: ${note}`)
  }
  return out
}
