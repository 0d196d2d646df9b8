import type { PilotMapping } from '@shared/elicitation/pilot'
import type { Distribution, PriorDistribution } from '@shared/stats'
import type { CandidateFlag, CandidateKind } from '@/api/impact'
import { FAMILY_LABELS, FAMILY_PARAMS, paramOf } from '@/utils/families'

export { FAMILY_LABELS, FAMILY_PARAMS, paramOf, type ParamSpec } from '@/utils/families'

/** Numbers in tables: 4 significant digits, exponent only for extreme magnitudes; '—' for none. */
export function fmt(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined) return '—'
  if (!Number.isFinite(value)) return value > 0 ? '∞' : value < 0 ? '−∞' : '—'
  const abs = Math.abs(value)
  if (abs !== 0 && (abs >= 1e7 || abs < 1e-4)) return value.toExponential(2).replace('-', '−')
  if (abs >= 1000) return new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 }).format(value).replace('-', '−')
  return new Intl.NumberFormat('en-GB', { maximumSignificantDigits: digits }).format(value).replace('-', '−')
}

/** Probabilities and p-values as decimals in tables (0.034, 0.0012 → 1.2e-3). */
/** Box's p from p and ln p: as fmtP, or "≈ 10^−1664" when p is below 1e-300 (it underflows to 0). */
export function fmtBoxP(p: number, logP: number): string {
  if (Number.isFinite(logP) && logP / Math.LN10 < -300) return `≈ 10^${Math.round(logP / Math.LN10)}`.replace('-', '−')
  return fmtP(p)
}

export function fmtP(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  if (value >= 0.995) return value >= 1 ? '1' : value.toFixed(3)
  if (value < 1e-3) return value.toExponential(1).replace('-', '−')
  return value.toFixed(3)
}

/** Probabilities in prose: "83 %", "< 1 %", "> 99 %". */
export function pct(value: number): string {
  if (value < 0.01) return '< 1 %'
  if (value > 0.99) return '> 99 %'
  return `${Math.round(value * 100)} %`
}

/** "[1.23, 4.56]". */
export function interval(lo: number, hi: number): string {
  return `[${fmt(lo)}, ${fmt(hi)}]`
}

/** "Gamma (shape = 1, rate = 0.01)". */
export function distributionText(d: PriorDistribution): string {
  if (d.family === 'half-normal') return `Half-normal (scale = ${fmt(d.scale)})`
  return `${FAMILY_LABELS[d.family]} (${FAMILY_PARAMS[d.family].map((p) => `${p.symbol} = ${fmt(paramOf(d, p.key))}`).join(', ')})`
}

/** Which columns a stored dataset read: "bursts / exposure_100km_years". */
export function mappingText(m: PilotMapping & { delimiter?: string }): string {
  switch (m.model) {
    case 'normal-known-sigma':
      return `“${m.valueColumn}”, σ = ${fmt(m.sigma)}`
    case 'normal':
      return `“${m.valueColumn}”, σ ~ ${distributionText(m.sigmaPrior)}`
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

/** Bayes factor as a plain number: "4.00", "1/12.3", "3.1e+05". */
export function bfText(logBF: number): string {
  const bf = Math.exp(logBF)
  if (!Number.isFinite(bf)) return logBF > 0 ? '> 1e300' : '< 1e-300'
  if (bf >= 1) return fmt(bf, 3)
  return `1/${fmt(1 / bf, 3)}`
}

/** The quantity's unit in a column header: " (L/s)". */
export const unitSuffix = (unit: string | undefined) => (unit ? ` (${unit})` : '')

/** Convenience for distributions typed as the fitted families only. */
export const isFitted = (d: PriorDistribution): d is Distribution => d.family !== 'half-normal'
