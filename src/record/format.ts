import type { PriorDistribution } from '@shared/stats'
import { answerText as sharedAnswerText, type ElicitedAnswer } from '@shared/record/format'
import type { RecordRound, RecordStatus } from '@/api/record'

export { actionLabel, flagLabel, FLAG_LABELS, LANGUAGE_LABELS, subjectLabel, WEIGHTS_LABELS } from '@shared/record/format'
export { METHOD_LABELS } from '@shared/schemas/rounds'
export { POOL_METHOD_LABELS as POOL_LABELS } from '@shared/schemas/reconciliation'

export const RECORD_STATUS: Record<RecordStatus, { label: string; tag: 'info' | 'warning' | 'success'; meaning: string }> = {
  draft: { label: 'Draft', tag: 'info', meaning: 'assembled live from the study; it changes with the data until submitted' },
  in_review: { label: 'In review', tag: 'warning', meaning: 'frozen for review; a reviewer of the study signs it off or returns it' },
  signed_off: { label: 'Signed off', tag: 'success', meaning: 'immutable; its content hash identifies it' },
}

/** How a returned draft is shown in place of "Draft". */
export const RETURNED_STATUS = { label: 'Returned with comments', tag: 'danger' as const, meaning: 'a draft again: a reviewer returned it with comments, which the analyst answers when submitting it again' }

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

/** An expert's answer as given, in one line (see the shared record format). */
export const answerText = (j: { method: RecordRound['method']; answer: ElicitedAnswer }): string => sharedAnswerText(j.method, j.answer)
