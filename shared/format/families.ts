import type { Family, PriorDistribution } from '../stats/types'
import { formatNumber } from './numbers'

/** Names of the engine's distribution families as screens and documents write them (experts never see them). */
export const FAMILY_LABELS: Record<PriorDistribution['family'], string> = {
  normal: 'Normal',
  'student-t': 'Student-t',
  lognormal: 'Lognormal',
  gamma: 'Gamma',
  beta: 'Beta',
  'scaled-beta': 'Scaled beta',
  uniform: 'Uniform',
  'half-normal': 'Half-normal',
}

export interface ParamSpec {
  key: string
  /** Short symbol shown in tables ("μ", "σ"). */
  symbol: string
  /** Label for inputs. */
  label: string
  /** Must be above 0. */
  positive: boolean
}

/** Parameters in the engine's parameterisation (gamma uses the rate; Student-t σ is the scale). */
export const FAMILY_PARAMS: Record<Family, ParamSpec[]> = {
  normal: [
    { key: 'mu', symbol: 'μ', label: 'Mean μ', positive: false },
    { key: 'sigma', symbol: 'σ', label: 'SD σ', positive: true },
  ],
  'student-t': [
    { key: 'mu', symbol: 'μ', label: 'Location μ', positive: false },
    { key: 'sigma', symbol: 'σ', label: 'Scale σ', positive: true },
    { key: 'df', symbol: 'ν', label: 'Degrees of freedom ν', positive: true },
  ],
  lognormal: [
    { key: 'meanlog', symbol: 'μ_log', label: 'Mean of ln X', positive: false },
    { key: 'sdlog', symbol: 'σ_log', label: 'SD of ln X', positive: true },
  ],
  gamma: [
    { key: 'shape', symbol: 'shape', label: 'Shape', positive: true },
    { key: 'rate', symbol: 'rate', label: 'Rate', positive: true },
  ],
  beta: [
    { key: 'alpha', symbol: 'α', label: 'α', positive: true },
    { key: 'beta', symbol: 'β', label: 'β', positive: true },
  ],
  'scaled-beta': [
    { key: 'alpha', symbol: 'α', label: 'α', positive: true },
    { key: 'beta', symbol: 'β', label: 'β', positive: true },
    { key: 'lower', symbol: 'L', label: 'Lower bound', positive: false },
    { key: 'upper', symbol: 'U', label: 'Upper bound', positive: false },
  ],
  uniform: [
    { key: 'lower', symbol: 'L', label: 'Lower bound', positive: false },
    { key: 'upper', symbol: 'U', label: 'Upper bound', positive: false },
  ],
}

/** A parameter value of a distribution by key. */
export function paramOf(d: PriorDistribution, key: string): number {
  return (d as unknown as Record<string, number>)[key]
}

/** "μ = 10.28, σ = 3.753" (non-breaking around "=", so a narrow cell wraps only between parameters). */
export function paramsText(d: PriorDistribution): string {
  if (d.family === 'half-normal') return `scale\u00a0=\u00a0${formatNumber(d.scale)}`
  return FAMILY_PARAMS[d.family].map((p) => `${p.symbol}\u00a0=\u00a0${formatNumber(paramOf(d, p.key))}`).join(', ')
}

/** The distribution in words with its parameters: "Normal(mean 3.2, sd 1.1)"; "—" for none. */
export function describeDistribution(d: PriorDistribution | null | undefined): string {
  if (!d) return '—'
  const n = (x: number) => formatNumber(x, 6)
  switch (d.family) {
    case 'normal':
      return `Normal(mean ${n(d.mu)}, sd ${n(d.sigma)})`
    case 'student-t':
      return `Student-t(df ${formatNumber(d.df)}, location ${n(d.mu)}, scale ${n(d.sigma)})`
    case 'lognormal':
      return `Lognormal(meanlog ${n(d.meanlog)}, sdlog ${n(d.sdlog)})`
    case 'gamma':
      return `Gamma(shape ${n(d.shape)}, rate ${n(d.rate)})`
    case 'beta':
      return `Beta(${n(d.alpha)}, ${n(d.beta)})`
    case 'scaled-beta':
      return `Beta(${n(d.alpha)}, ${n(d.beta)}) on [${formatNumber(d.lower)}, ${formatNumber(d.upper)}]`
    case 'uniform':
      return `Uniform(${n(d.lower)}, ${n(d.upper)})`
    case 'half-normal':
      return `Half-normal(scale ${n(d.scale)})`
  }
}
