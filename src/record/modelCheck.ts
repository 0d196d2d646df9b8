import { readModelCode, type ModelLanguage } from '@shared/elicitation/model-code'
import { quantile, validateDistribution, type Distribution } from '@shared/stats'
import { describeDistribution, formatTiny } from '@shared/format'
import { LANGUAGE_LABELS } from './format'

/** Largest relative difference allowed between the read-back quantiles and the final prior's. */
export const MODEL_CHECK_TOLERANCE = 1e-6

export interface ModelCheckResult {
  ok: boolean
  /** Neither pass nor failure: the language has no such prior (brms and the scaled beta). */
  skipped: boolean
  text: string
  readBack: Distribution | null
  maxRelativeDifference: number | null
}

/**
 * Reads a model-code line back with Priorsmith's own reader (readModelCode), which applies the language's documented
 * parameterisation (the language itself is not run), and compares the 5/50/95 % quantiles of what it means with the
 * final prior's own quantiles, to 1e-6 relative. The parameterisations are checked against scipy in tests/unit/model-code.test.ts.
 */
export function checkModelLine(
  line: { language: ModelLanguage; code: string },
  prior: { distribution: Distribution; q05: number; q50: number; q95: number },
): ModelCheckResult {
  if (line.language === 'brms' && prior.distribution.family === 'scaled-beta') {
    return { ok: false, skipped: true, text: 'brms has no scaled-beta prior for a coefficient: use the Stan line', readBack: null, maxRelativeDifference: null }
  }
  let back: Distribution
  try {
    back = readModelCode(line.code, line.language, prior.distribution.family)
    validateDistribution(back)
  } catch (error) {
    const why = error instanceof Error ? error.message : String(error)
    return { ok: false, skipped: false, text: `Check failed: the line cannot be read as a ${prior.distribution.family} prior (${why})`, readBack: null, maxRelativeDifference: null }
  }
  const pairs: [number, number][] = [[0.05, prior.q05], [0.5, prior.q50], [0.95, prior.q95]]
  const diffs = pairs.map(([p, want]) => Math.abs(quantile(back, p) - want) / Math.max(1, Math.abs(want)))
  const worst = diffs.some((d) => !Number.isFinite(d)) ? Infinity : Math.max(...diffs)
  const described = describeDistribution(back)
  const lang = LANGUAGE_LABELS[line.language] ?? line.language
  const how = `read by Priorsmith (not by ${lang} itself) with ${lang}’s documented parameterisation`
  if (worst <= MODEL_CHECK_TOLERANCE) {
    return { ok: true, skipped: false, text: `${how[0].toUpperCase()}${how.slice(1)}: reads back as ${described}, quantiles agree to ${formatTiny(worst)}`, readBack: back, maxRelativeDifference: worst }
  }
  return {
    ok: false,
    skipped: false,
    text: `Check failed: ${how}: reads back as ${described}, quantiles differ by ${Number.isFinite(worst) ? formatTiny(worst) : 'an unbounded amount'} (more than 1e-6)`,
    readBack: back,
    maxRelativeDifference: worst,
  }
}
