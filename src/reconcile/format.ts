import type { Distribution, Family } from '@shared/stats'

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
  /** Spoken label for inputs. */
  label: string
  /** Must be above 0. */
  positive: boolean
}

/** Parameters of each family in the engine's parameterisation (gamma uses the rate; Student-t σ is the scale). */
export const FAMILY_PARAMS: Record<Family, ParamSpec[]> = {
  normal: [
    { key: 'mu', symbol: 'μ', label: 'mean μ', positive: false },
    { key: 'sigma', symbol: 'σ', label: 'standard deviation σ', positive: true },
  ],
  'student-t': [
    { key: 'mu', symbol: 'μ', label: 'location μ', positive: false },
    { key: 'sigma', symbol: 'σ', label: 'scale σ', positive: true },
    { key: 'df', symbol: 'ν', label: 'degrees of freedom ν', positive: true },
  ],
  lognormal: [
    { key: 'meanlog', symbol: 'μ_log', label: 'mean of ln X (meanlog)', positive: false },
    { key: 'sdlog', symbol: 'σ_log', label: 'sd of ln X (sdlog)', positive: true },
  ],
  gamma: [
    { key: 'shape', symbol: 'shape', label: 'shape', positive: true },
    { key: 'rate', symbol: 'rate', label: 'rate', positive: true },
  ],
  beta: [
    { key: 'alpha', symbol: 'α', label: 'α', positive: true },
    { key: 'beta', symbol: 'β', label: 'β', positive: true },
  ],
  'scaled-beta': [
    { key: 'alpha', symbol: 'α', label: 'α', positive: true },
    { key: 'beta', symbol: 'β', label: 'β', positive: true },
    { key: 'lower', symbol: 'L', label: 'lower bound L', positive: false },
    { key: 'upper', symbol: 'U', label: 'upper bound U', positive: false },
  ],
  uniform: [
    { key: 'lower', symbol: 'L', label: 'lower bound', positive: false },
    { key: 'upper', symbol: 'U', label: 'upper bound', positive: false },
  ],
}

/** A parameter value of a distribution by key. */
export function paramOf(d: Distribution, key: string): number {
  return (d as unknown as Record<string, number>)[key]
}

/** Values and parameters in tables: 4 significant digits, exponent only for extreme magnitudes. */
export function fmt(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined) return '—'
  if (!Number.isFinite(value)) return String(value)
  const abs = Math.abs(value)
  if (abs !== 0 && (abs >= 1e7 || abs < 1e-4)) return value.toExponential(2)
  if (abs >= 1000) return new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 }).format(value)
  return new Intl.NumberFormat('en-GB', { maximumSignificantDigits: digits }).format(value)
}

/** "μ = 10.28, σ = 3.753" (non-breaking around "=", so a narrow cell wraps only between parameters). */
export function paramsText(d: Distribution): string {
  return FAMILY_PARAMS[d.family].map((p) => `${p.symbol}\u00a0=\u00a0${fmt(paramOf(d, p.key))}`).join(', ')
}

/** Sum of squared CDF errors: small numbers, so 2 significant digits. */
export function fmtSse(value: number): string {
  if (!Number.isFinite(value)) return String(value)
  if (value === 0) return '0'
  if (value < 1e-4) return value.toExponential(1)
  return value.toPrecision(2)
}

/** Probabilities and weights as decimals in tables (0.333, 0.0042, 1.4e-6). */
export function fmtProb(value: number): string {
  if (!Number.isFinite(value)) return String(value)
  if (value === 0) return '0'
  if (value === 1) return '1'
  if (value < 1e-3) return value.toExponential(1)
  return value.toFixed(3)
}

/** A signed share ("+0.12", "−0.09"). */
export function fmtSigned(value: number): string {
  const s = Math.abs(value).toFixed(2)
  return value > 0.005 ? `+${s}` : value < -0.005 ? `−${s}` : s
}
