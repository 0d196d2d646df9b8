import type { Distribution } from '@shared/stats'
import { FAMILY_PARAMS, paramOf } from '@/utils/families'

export { FAMILY_LABELS, FAMILY_PARAMS, paramOf, type ParamSpec } from '@/utils/families'

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
