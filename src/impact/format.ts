import type { PilotMapping } from '@shared/elicitation/pilot'
import { describeDistribution, formatNumber } from '@shared/format'
import type { Distribution, PriorDistribution } from '@shared/stats'
import type { CandidateFlag, CandidateKind } from '@/api/impact'

/** "[1.23, 4.56]". */
export function interval(lo: number, hi: number): string {
  return `[${formatNumber(lo)}, ${formatNumber(hi)}]`
}

/** Which columns a stored dataset read: "bursts / exposure_100km_years". */
export function mappingText(m: PilotMapping & { delimiter?: string }): string {
  switch (m.model) {
    case 'normal-known-sigma':
      return `“${m.valueColumn}”, σ = ${formatNumber(m.sigma)}`
    case 'normal':
      return `“${m.valueColumn}”, σ ~ ${describeDistribution(m.sigmaPrior)}`
    case 'binomial':
      return 'binaryColumn' in m ? `0/1 in “${m.binaryColumn}”` : `“${m.successesColumn}” of “${m.trialsColumn}”`
    case 'poisson':
      return `“${m.countColumn}” over “${m.exposureColumn}”`
  }
}

export const KIND_LABELS: Record<CandidateKind, string> = {
  expert: 'Expert',
  pooled: 'Pooled',
  consensus: 'Consensus',
  reconciled: 'Reconciled',
  comparison: 'Comparison',
  mixture: 'Robust mixture',
}

/** Each caution: a short name for tags, and what it means, for the cautions panel. */
export const FLAG_INFO: Record<CandidateFlag, { tag: string; title: string; meaning: string }> = {
  'prior-dominates': {
    tag: 'prior dominates',
    title: 'The prior dominates the data',
    meaning: 'Its prior effective sample size is larger than the pilot n: the prior carries more information than the data, so the posterior mostly repeats it. This is Priorsmith’s rule of thumb, not a published test: the prior counts as that many observations, so when it counts as more than the data the prior has the larger say.',
  },
  'prior-data-conflict': {
    tag: 'prior–data conflict',
    title: 'Prior–data conflict',
    meaning: 'Box’s prior predictive p-value is below 0.05 (the customary 5 % level, a convention rather than a law): data like the pilot data would be surprising if this prior were right. Check the prior and the data before using either.',
  },
  'prior-driven-bayes-factor': {
    tag: 'prior-driven BF',
    title: 'Prior-driven Bayes factor',
    meaning: 'The evidence for this prior changes with its width while the posterior does not; a Bayes factor built on it reflects how wide the prior was drawn. The fractional Bayes factor in the table does not hang on the width: report it instead.',
  },
}

export const FLAG_ORDER: CandidateFlag[] = ['prior-dominates', 'prior-data-conflict', 'prior-driven-bayes-factor']

/** Bayes factor as a plain number: "4", "1/12.3", "3.1e+5". */
export function bfText(logBF: number): string {
  const bf = Math.exp(logBF)
  if (!Number.isFinite(bf)) return logBF > 0 ? '> 1e300' : '< 1e-300'
  if (bf >= 1) return formatNumber(bf, 3)
  return `1/${formatNumber(1 / bf, 3)}`
}

/** Convenience for distributions typed as the fitted families only. */
export const isFitted = (d: PriorDistribution): d is Distribution => d.family !== 'half-normal'
