import type { PriorDistribution } from '@shared/stats'
import { answerText as sharedAnswerText, fmt, type ElicitedAnswer } from '@shared/record/format'
import type { RecordRound, RecordStatus } from '@/api/record'

export { actionLabel, describeDistribution, flagLabel, FLAG_LABELS, fmt, fmtProb, LANGUAGE_LABELS, subjectLabel, WEIGHTS_LABELS } from '@shared/record/format'
export { METHOD_LABELS } from '@shared/schemas/rounds'
export { POOL_METHOD_LABELS as POOL_LABELS } from '@shared/schemas/reconciliation'

export const RECORD_STATUS: Record<RecordStatus, { label: string; tag: 'info' | 'warning' | 'success'; meaning: string }> = {
  draft: { label: 'Draft', tag: 'info', meaning: 'assembled live from the study; it changes with the data until submitted' },
  in_review: { label: 'In review', tag: 'warning', meaning: 'frozen for review; a reviewer of the study signs it off or returns it' },
  signed_off: { label: 'Signed off', tag: 'success', meaning: 'immutable; its content hash identifies it' },
}

/** "3e-15": the size of a small difference, one significant digit. */
export function fmtTiny(x: number): string {
  if (x === 0) return '0'
  return x.toExponential(0).replace('e+', 'e')
}

/** How a returned draft is shown in place of "Draft". */
export const RETURNED_STATUS = { label: 'Returned with comments', tag: 'danger' as const, meaning: 'a draft again: a reviewer returned it with comments, which the analyst answers when submitting it again' }

/** A value with its unit: "3.389 L/s"; no unit, just the number. */
export function withUnit(x: number | null | undefined, unit: string, digits = 4): string {
  const text = fmt(x, digits)
  return unit && text !== '—' ? `${text} ${unit}` : text
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

/** "Expert 2 (Helen Okafor)" when names are shown, else "Expert 2". */
export function expertLabel(e: { code: string; name?: string | null }): string {
  return e.name ? `${e.code} (${e.name})` : e.code
}

/** An expert's answer as given, in one line (see the shared record format). */
export const answerText = (j: { method: RecordRound['method']; answer: ElicitedAnswer }): string => sharedAnswerText(j.method, j.answer)

const secondsFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit' })

/** "2 Dec 2026, 03:20:49": audit events often share a minute. */
export function formatDateTimeSeconds(value: string): string {
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : secondsFormat.format(date)
}
