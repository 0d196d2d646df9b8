import { EngineInputError } from './errors'
import type { BayesFactorResult } from './types'

/** Kass & Raftery (1995), §3.2: categories of 2 ln BF, half-open intervals [lower, upper). */
export const KASS_RAFTERY_SCALE: readonly { from: number; label: string }[] = [
  { from: 0, label: 'not worth more than a bare mention' },
  { from: 2, label: 'positive' },
  { from: 6, label: 'strong' },
  { from: 10, label: 'very strong' },
]

/** Jeffreys (1961), Appendix B: grades of log10 BF, half-open intervals [lower, upper). */
export const JEFFREYS_SCALE: readonly { from: number; label: string }[] = [
  { from: 0, label: 'barely worth mentioning' },
  { from: 0.5, label: 'substantial' },
  { from: 1, label: 'strong' },
  { from: 1.5, label: 'very strong' },
  { from: 2, label: 'decisive' },
]

/** Category of a non-negative value on a scale of half-open intervals; a value within 1e-12 below a boundary counts as on it (absorbs rounding, e.g. log10(10) from natural logs). */
export function categorise(value: number, scale: readonly { from: number; label: string }[]): string {
  let label = scale[0].label
  for (const step of scale) if (value >= step.from - 1e-12 * Math.max(1, step.from)) label = step.label
  return label
}

/**
 * Bayes factor of model A against model B from their log evidences, with the Kass & Raftery (1995, §3.2) label on
 * 2 ln BF. For BF < 1 the scale is applied to 1/BF and the label ends in "(favours B)"; for BF ≥ 1 it is the bare category
 * (evidence for A, the numerator). Jeffreys' (1961) grade of |log10 BF| is given alongside.
 */
export function bayesFactor(logEvidenceA: number, logEvidenceB: number): BayesFactorResult {
  if (!Number.isFinite(logEvidenceA)) throw new EngineInputError('logEvidenceA', 'The log evidence of A must be a finite number.')
  if (!Number.isFinite(logEvidenceB)) throw new EngineInputError('logEvidenceB', 'The log evidence of B must be a finite number.')
  const logBF = logEvidenceA - logEvidenceB
  const twoLnBF = 2 * logBF
  const log10BF = logBF / Math.LN10
  const favours = logBF < 0 ? 'B' : 'A'
  const category = categorise(Math.abs(twoLnBF), KASS_RAFTERY_SCALE)
  return {
    logBF,
    twoLnBF,
    log10BF,
    label: favours === 'B' ? `${category} (favours B)` : category,
    category,
    favours,
    jeffreys: categorise(Math.abs(log10BF), JEFFREYS_SCALE),
  }
}
