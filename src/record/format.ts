import type { PriorDistribution } from '@shared/stats'
import type { RecordCombination, RecordRound, RecordStatus } from '@/api/record'

export const RECORD_STATUS: Record<RecordStatus, { label: string; tag: 'info' | 'warning' | 'success'; meaning: string }> = {
  draft: { label: 'Draft', tag: 'info', meaning: 'assembled live from the study; it changes with the data until submitted' },
  in_review: { label: 'In review', tag: 'warning', meaning: 'frozen for review; a reviewer of the study signs it off or returns it' },
  signed_off: { label: 'Signed off', tag: 'success', meaning: 'immutable; its content hash identifies it' },
}

/** Numbers in the record: `digits` significant digits, exponent only for very large or very small values. */
export function fmt(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined) return '—'
  if (!Number.isFinite(x)) return String(x)
  const abs = Math.abs(x)
  if (abs !== 0 && (abs >= 1e6 || abs < 1e-3)) return x.toExponential(Math.max(0, digits - 2))
  return Number(x.toPrecision(digits)).toString()
}

/** A probability in a table: a decimal (0.048, 0.95), never a percentage. */
export function fmtProb(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '—'
  if (p !== 0 && p < 0.001) return p.toExponential(1)
  return Number(p.toPrecision(3)).toString()
}

/** "3e-15": the size of a small difference, one significant digit. */
export function fmtTiny(x: number): string {
  if (x === 0) return '0'
  return x.toExponential(0).replace('e+', 'e')
}

/** A value with its unit: "3.389 L/s"; no unit, just the number. */
export function withUnit(x: number | null | undefined, unit: string, digits = 4): string {
  const text = fmt(x, digits)
  return unit && text !== '—' ? `${text} ${unit}` : text
}

/** The distribution in words with its parameters, as the .docx states it: "Normal(mean 3.2, sd 1.1)". */
export function describeDistribution(d: PriorDistribution | null | undefined): string {
  if (!d) return '—'
  switch (d.family) {
    case 'normal':
      return `Normal(mean ${fmt(d.mu, 6)}, sd ${fmt(d.sigma, 6)})`
    case 'student-t':
      return `Student-t(df ${fmt(d.df)}, location ${fmt(d.mu, 6)}, scale ${fmt(d.sigma, 6)})`
    case 'lognormal':
      return `Lognormal(meanlog ${fmt(d.meanlog, 6)}, sdlog ${fmt(d.sdlog, 6)})`
    case 'gamma':
      return `Gamma(shape ${fmt(d.shape, 6)}, rate ${fmt(d.rate, 6)})`
    case 'beta':
      return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)})`
    case 'scaled-beta':
      return `Beta(${fmt(d.alpha, 6)}, ${fmt(d.beta, 6)}) on [${fmt(d.lower)}, ${fmt(d.upper)}]`
    case 'uniform':
      return `Uniform(${fmt(d.lower, 6)}, ${fmt(d.upper, 6)})`
    case 'half-normal':
      return `Half-normal(scale ${fmt(d.scale, 6)})`
  }
}

/** Parameters of a distribution as name/value rows, in the record's canonical parameterisation. */
export function parameterRows(d: PriorDistribution): { name: string; value: number }[] {
  switch (d.family) {
    case 'normal':
      return [{ name: 'mean (μ)', value: d.mu }, { name: 'sd (σ)', value: d.sigma }]
    case 'student-t':
      return [{ name: 'location (μ)', value: d.mu }, { name: 'scale (σ)', value: d.sigma }, { name: 'degrees of freedom (ν)', value: d.df }]
    case 'lognormal':
      return [{ name: 'meanlog (mean of ln X)', value: d.meanlog }, { name: 'sdlog (sd of ln X)', value: d.sdlog }]
    case 'gamma':
      return [{ name: 'shape (α)', value: d.shape }, { name: 'rate (β)', value: d.rate }]
    case 'beta':
      return [{ name: 'α', value: d.alpha }, { name: 'β', value: d.beta }]
    case 'scaled-beta':
      return [{ name: 'α', value: d.alpha }, { name: 'β', value: d.beta }, { name: 'lower', value: d.lower }, { name: 'upper', value: d.upper }]
    case 'uniform':
      return [{ name: 'lower', value: d.lower }, { name: 'upper', value: d.upper }]
    case 'half-normal':
      return [{ name: 'scale', value: d.scale }]
  }
}

export const METHOD_LABELS: Record<RecordRound['method'], string> = {
  quantile: 'Quantile method',
  'fixed-interval': 'Fixed-interval method',
  'chip-grid': 'Chip grid',
}

export const POOL_LABELS: Record<RecordCombination['method'], string> = {
  linear: 'Linear opinion pool',
  logarithmic: 'Logarithmic opinion pool',
  consensus: 'Agreed consensus',
}

export const WEIGHTS_LABELS: Record<RecordCombination['weightsMode'], string> = {
  equal: 'Equal weights',
  performance: 'Performance weights (Cooke’s classical model)',
  custom: 'Weights set by the analyst',
}

export const LANGUAGE_LABELS: Record<string, string> = { stan: 'Stan', pymc: 'PyMC', jags: 'JAGS', brms: 'brms' }

/** Caution flags of a candidate prior, in words. */
export const FLAG_LABELS: Record<string, string> = {
  'prior-dominates': 'Prior dominates the data (prior ESS larger than n; Priorsmith’s rule of thumb)',
  'prior-data-conflict': 'Prior–data conflict (Box p < 0.05, the customary level)',
  'prior-driven-bayes-factor': 'Bayes factor driven by the prior’s width (Priorsmith’s rule of thumb)',
}

export const flagLabel = (flag: string): string => FLAG_LABELS[flag] ?? flag.replace(/-/g, ' ')

/** Audit actions of the change history in words ("record.sign-off" → "Record signed off"). */
const ACTION_LABELS: Record<string, string> = {
  'record.submit': 'Record submitted for review',
  'record.return': 'Record returned with comments',
  'record.sign-off': 'Record signed off',
  'record.comment': 'Comment on the record',
  'record.names': 'Expert names shown or hidden',
  'record.new-version': 'New record version started',
}

export function actionLabel(action: string): string {
  if (ACTION_LABELS[action]) return ACTION_LABELS[action]
  const [subject, verb] = action.split('.')
  const text = [subject, verb].filter(Boolean).join(' ').replace(/[-_]/g, ' ')
  return text.charAt(0).toUpperCase() + text.slice(1)
}

/** "E2 (Helen Okafor)" when names are shown, else "E2". */
export function expertLabel(e: { code: string; name?: string | null }): string {
  return e.name ? `${e.code} (${e.name})` : e.code
}

/** An expert's raw answer in one line: the elicited points with their cumulative probabilities, or the intervals. */
export function answerText(j: { method: RecordRound['method']; answer: RecordJudgementAnswer }): string {
  const a = j.answer ?? {}
  if (a.points && a.points.length) {
    const pts = a.points.map((p) => `${fmt(p.value, 5)} at ${fmtProb(p.prob)}`).join('; ')
    const bounds = a.lower !== undefined && a.lower !== null && a.upper !== undefined && a.upper !== null ? `; bounds ${fmt(a.lower, 5)} to ${fmt(a.upper, 5)}` : ''
    return pts + bounds
  }
  if (a.edges && a.edges.length > 1) {
    const values = j.method === 'chip-grid' ? a.chips : a.probs
    return a.edges.slice(0, -1).map((e, i) => {
      const v = values?.[i]
      const shown = v === null || v === undefined ? '—' : j.method === 'chip-grid' ? `${v} chips` : fmtProb(v)
      return `[${fmt(e, 5)}, ${fmt(a.edges![i + 1], 5)}): ${shown}`
    }).join('; ')
  }
  return '—'
}

type RecordJudgementAnswer = {
  lower?: number | null
  upper?: number | null
  points?: { value: number; prob: number }[]
  edges?: number[]
  probs?: (number | null)[]
  chips?: number[]
}

const secondsFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit' })

/** "2 Dec 2026, 03:20:49": audit events often share a minute. */
export function formatDateTimeSeconds(value: string): string {
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : secondsFormat.format(date)
}
