import { bayesFactor, dirichletMultinomialAnalysis, dirichletWidthSweep, type BayesFactorResult, type DirichletAnalysis, type MultinomialData } from '../stats/index'
import { PRIOR_DRIVEN_CONVENTION } from '../stats/sweep'
import { formatNumber } from '../format/numbers'
import { SWEEP_FACTORS } from './impact'

/** One Dirichlet evaluated on the pilot counts. */
export interface CompositionCandidate {
  label: string
  alpha: number[]
  analysis: DirichletAnalysis
}

export interface CompositionSweepPoint {
  factor: number
  totalConcentration: number
  logEvidence: number
  posteriorMeans: number[]
  /** Bayes factor of the Dirichlet at this width against the comparison prior, on the log scale. */
  logBFvsComparison: number
}

export interface CompositionImpact {
  shares: string[]
  /** Observations (Σ counts) and rows as recorded. */
  observations: number
  rows: number
  prior: CompositionCandidate
  comparison: CompositionCandidate
  /** The composition's Dirichlet against the comparison prior. */
  bayesFactor: BayesFactorResult
  sweep: {
    points: CompositionSweepPoint[]
    /** Largest ÷ smallest evidence across widths from PRIOR_DRIVEN_CONVENTION.fromFactor to toFactor. */
    evidenceRatio: number
    priorDriven: boolean
  }
  flags: ('prior-dominates' | 'prior-driven')[]
  findings: string[]
}

/** The flat Dirichlet(1, …, 1): every composition of the shares equally likely a priori. */
export const flatDirichlet = (k: number): number[] => new Array<number>(k).fill(1)

/**
 * What a composition's Dirichlet does with multinomial pilot counts: the closed-form posterior and log evidence
 * (dirichletMultinomialAnalysis) beside a comparison prior (the flat Dirichlet unless given), the Bayes factor between them,
 * and the width sweep in the total concentration (dirichletWidthSweep, SWEEP_FACTORS), flagged as prior-driven by
 * Priorsmith's convention (PRIOR_DRIVEN_CONVENTION: evidence changes more than 3 times from half to double width while
 * every share's posterior mean stays within 0.1 posterior sd). The prior dominates when Σα exceeds the observations.
 */
export function compositionImpact(shares: string[], alpha: number[], data: MultinomialData, comparisonAlpha: number[] = flatDirichlet(alpha.length)): CompositionImpact {
  const prior: CompositionCandidate = { label: 'Composition prior (Dirichlet)', alpha, analysis: dirichletMultinomialAnalysis({ family: 'dirichlet', alpha }, data) }
  const flat = comparisonAlpha.every((a) => a === 1)
  const comparison: CompositionCandidate = {
    label: flat ? 'Comparison prior: flat Dirichlet(1, …, 1)' : 'Comparison prior',
    alpha: comparisonAlpha,
    analysis: dirichletMultinomialAnalysis({ family: 'dirichlet', alpha: comparisonAlpha }, data),
  }
  const sweepPoints = dirichletWidthSweep({ family: 'dirichlet', alpha }, data, SWEEP_FACTORS).map((p) => ({
    factor: p.factor,
    totalConcentration: p.alpha.reduce((s, a) => s + a, 0),
    logEvidence: p.logEvidence,
    posteriorMeans: p.posteriorMeans,
    logBFvsComparison: p.logEvidence - comparison.analysis.logEvidence,
  }))
  const { fromFactor, toFactor, evidenceRatio: ratioLimit, meanShiftSds } = PRIOR_DRIVEN_CONVENTION
  const near = sweepPoints.filter((p) => p.factor >= fromFactor - 1e-9 && p.factor <= toFactor + 1e-9)
  const logs = near.map((p) => p.logEvidence)
  const evidenceRatio = Math.exp(Math.max(...logs) - Math.min(...logs))
  const steady = near.every((p) => p.posteriorMeans.every((m, j) => Math.abs(m - prior.analysis.posterior[j].mean) <= meanShiftSds * prior.analysis.posterior[j].sd))
  const priorDriven = evidenceRatio > ratioLimit && steady
  const flags: CompositionImpact['flags'] = []
  if (prior.analysis.priorEss > prior.analysis.observations) flags.push('prior-dominates')
  if (priorDriven) flags.push('prior-driven')
  const bf = bayesFactor(prior.analysis.logEvidence, comparison.analysis.logEvidence)
  const findings: string[] = [
    `Against the ${flat ? 'flat Dirichlet' : 'comparison prior'}, the data favour ${bf.favours === 'A' ? 'the composition prior' : 'the comparison prior'} by a Bayes factor of about ${formatNumber(Math.exp(Math.abs(bf.logBF)), 3)} (${bf.category}).`,
  ]
  if (flags.includes('prior-dominates'))
    findings.push(`The prior carries more information than the pilot data: its total concentration ${formatNumber(prior.analysis.priorEss, 3)} is worth more observations than the ${formatNumber(prior.analysis.observations, 3)} recorded.`)
  if (priorDriven)
    findings.push(`A Bayes factor built on this prior reflects its width more than the data: the evidence changes ${formatNumber(evidenceRatio, 3)}× across widths ${fromFactor}–${toFactor}× while every share's posterior mean hardly moves.`)
  return {
    shares, observations: prior.analysis.observations, rows: data.counts.length, prior, comparison, bayesFactor: bf,
    sweep: { points: sweepPoints, evidenceRatio, priorDriven }, flags, findings,
  }
}
