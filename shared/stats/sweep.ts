import { quantile, validateDistribution } from './distributions'
import { EngineInputError } from './errors'
import { analyzePrior } from './evidence'
import { supportBounds, validateSupport } from './points'
import { findRoot } from './quadrature'
import type { PilotData, PriorDistribution, SweepPoint, SweepResult, Support } from './types'

/**
 * Priorsmith's own convention for flagging a Bayes factor as prior-driven (not a published rule; reasoning in
 * docs/methods/width-sweep.md): the widths from half to double the drawn one, an evidence change of more than 3 times
 * (a Bayes factor of 3 is where Kass & Raftery's "positive" evidence begins), and a posterior mean steady within 0.1 of its sd.
 */
export const PRIOR_DRIVEN_CONVENTION = { fromFactor: 0.5, toFactor: 2, evidenceRatio: 3, meanShiftSds: 0.1 } as const

/** Plain-words statement of the prior-driven flag, for display beside the sweep; built from PRIOR_DRIVEN_CONVENTION. */
export const PRIOR_DRIVEN_RULE =
  `Priorsmith’s rule of thumb (a convention of this tool, not a published test): a Bayes factor is flagged as prior-driven ` +
  `when multiplying the prior’s spread by any factor between ${PRIOR_DRIVEN_CONVENTION.fromFactor} and ${PRIOR_DRIVEN_CONVENTION.toFactor} ` +
  `changes the evidence by more than ${PRIOR_DRIVEN_CONVENTION.evidenceRatio} times (largest divided by smallest) while the posterior mean stays within ` +
  `${PRIOR_DRIVEN_CONVENTION.meanShiftSds} posterior standard deviations of its value at the original width. The data then say nearly the same thing ` +
  'about the quantity at every width, so the Bayes factor mostly reflects how wide the prior was drawn. Why these numbers: halving or ' +
  'doubling a width is a change a reasonable analyst could have made, and a factor of 3 in evidence is about where a Bayes factor ' +
  'starts to count as positive evidence on the Kass–Raftery scale.'

function betaWithMedian(median: number, concentration: number): { alpha: number; beta: number } {
  const logit = (p: number): number => Math.log(p / (1 - p))
  const target = logit(median)
  const g = (r: number): number => {
    const alpha = concentration / (1 + Math.exp(-r))
    const beta = concentration / (1 + Math.exp(r))
    return logit(quantile({ family: 'beta', alpha, beta }, 0.5)) - target
  }
  let lo = target - 1
  let hi = target + 1
  for (let i = 0; i < 60 && g(lo) > 0; i++) lo -= 2 ** i
  for (let i = 0; i < 60 && g(hi) < 0; i++) hi += 2 ** i
  const r = findRoot(g, lo, hi, 1e-14)
  return { alpha: concentration / (1 + Math.exp(-r)), beta: concentration / (1 + Math.exp(r)) }
}

/**
 * The prior with its spread multiplied by k about its median: σ (normal), scale (t), sdlog (lognormal, median e^meanlog
 * kept), the coefficient of variation via shape/k² (gamma, median kept), the concentration α + β divided by k² (beta and
 * scaled beta, median kept), the half-width (uniform, centred; an end on the support's boundary is kept and only the other
 * end moves), the scale (half-normal). Uniform ends are clipped to the support.
 */
export function scaleSpread(prior: PriorDistribution, k: number, support?: Support): PriorDistribution {
  validateDistribution(prior, 'prior')
  if (!(k > 0 && Number.isFinite(k))) throw new EngineInputError('factor', 'The width factor must be a positive number.')
  switch (prior.family) {
    case 'normal':
    case 'student-t':
      return { ...prior, sigma: prior.sigma * k }
    case 'lognormal':
      return { ...prior, sdlog: prior.sdlog * k }
    case 'half-normal':
      return { ...prior, scale: prior.scale * k }
    case 'gamma': {
      const med = quantile(prior, 0.5)
      const shape = prior.shape / (k * k)
      return { family: 'gamma', shape, rate: quantile({ family: 'gamma', shape, rate: 1 }, 0.5) / med }
    }
    case 'beta':
    case 'scaled-beta': {
      const med = quantile({ family: 'beta', alpha: prior.alpha, beta: prior.beta }, 0.5)
      const { alpha, beta } = betaWithMedian(med, (prior.alpha + prior.beta) / (k * k))
      return { ...prior, alpha, beta }
    }
    case 'uniform': {
      if (support) validateSupport(support)
      const bounds = support ? supportBounds(support) : { lower: -Infinity, upper: Infinity }
      const width = (prior.upper - prior.lower) * k
      let lower: number
      let upper: number
      if (Number.isFinite(bounds.lower) && prior.lower === bounds.lower) {
        lower = prior.lower
        upper = prior.lower + width
      } else if (Number.isFinite(bounds.upper) && prior.upper === bounds.upper) {
        upper = prior.upper
        lower = prior.upper - width
      } else {
        const mid = (prior.lower + prior.upper) / 2
        lower = mid - width / 2
        upper = mid + width / 2
      }
      return { family: 'uniform', lower: Math.max(lower, bounds.lower), upper: Math.min(upper, bounds.upper) }
    }
  }
}

/**
 * Width sweep: evidence and posterior for the prior's spread × k (scaleSpread) for each factor. evidenceRatio is the
 * largest over the smallest evidence among the factors in [0.5, 2] together with k = 1; priorDriven follows
 * PRIOR_DRIVEN_RULE. `onStep` is called after each factor (a progress report; it may throw to stop the sweep).
 */
export function widthSweep(prior: PriorDistribution, data: PilotData, factors: number[], support?: Support, onStep?: () => void): SweepResult {
  if (!Array.isArray(factors) || factors.length === 0) throw new EngineInputError('factors', 'Give at least one width factor.')
  factors.forEach((k) => {
    if (!(k > 0 && Number.isFinite(k))) throw new EngineInputError('factors', 'Width factors must be positive numbers.')
  })
  const run = (k: number): { point: SweepPoint; sd: number } => {
    const scaled = scaleSpread(prior, k, support)
    const a = analyzePrior(scaled, data, { skipPredictiveCheck: true })
    const { mean, sd, q025, q975 } = a.posterior
    return { point: { factor: k, prior: scaled, logEvidence: a.logEvidence, posteriorMean: mean, q025, q975 }, sd }
  }
  const computed = factors.map((k) => {
    const c = run(k)
    onStep?.()
    return c
  })
  const reference = computed.find((c) => c.point.factor === 1) ?? run(1)
  const inRange = [...computed.filter((c) => c.point.factor >= PRIOR_DRIVEN_CONVENTION.fromFactor && c.point.factor <= PRIOR_DRIVEN_CONVENTION.toFactor), reference]
  const logs = inRange.map((c) => c.point.logEvidence)
  const evidenceRatio = Math.exp(Math.max(...logs) - Math.min(...logs))
  const refMean = reference.point.posteriorMean
  const steady = inRange.every((c) => Math.abs(c.point.posteriorMean - refMean) <= PRIOR_DRIVEN_CONVENTION.meanShiftSds * reference.sd)
  return {
    points: computed.map((c) => c.point),
    evidenceRatio,
    priorDriven: evidenceRatio > PRIOR_DRIVEN_CONVENTION.evidenceRatio && steady,
  }
}
