import type { Family, PriorDistribution } from '@shared/stats'

/** Names and parameters of the engine's distribution families, as the screens show them. */
export const FAMILY_LABELS: Record<Family, string> = {
  normal: 'Normal',
  'student-t': 'Student-t',
  lognormal: 'Lognormal',
  gamma: 'Gamma',
  beta: 'Beta',
  'scaled-beta': 'Scaled beta',
  uniform: 'Uniform',
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
