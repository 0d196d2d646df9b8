import type { Role, StudyRole, StudyStatus } from '@shared/types'

const ROLE_LABELS: Record<Role, string> = {
  admin: 'Admin',
  analyst: 'Analyst',
  expert: 'Expert',
  reviewer: 'Reviewer',
}

export function roleLabel(role: Role | StudyRole): string {
  return ROLE_LABELS[role] ?? role
}

export const STUDY_STATUS: Record<StudyStatus, { label: string; tag: 'info' | 'warning' | 'primary' | 'success'; meaning: string }> = {
  framing: { label: 'Framing', tag: 'info', meaning: 'the uncertain quantities are being framed' },
  eliciting: { label: 'Eliciting', tag: 'warning', meaning: 'experts are answering elicitation rounds' },
  reconciling: { label: 'Reconciling', tag: 'primary', meaning: "the experts' judgements are being reconciled into priors" },
  recorded: { label: 'Recorded', tag: 'success', meaning: 'the prior record has been signed off' },
}

const dateFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' })

/** "2 Mar 2026"; the raw value when it is not a date. */
export function formatDate(value: string): string {
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : dateFormat.format(date)
}

/** "1 quantity", "3 quantities", "no quantities". */
export function countNoun(count: number, singular: string, plural = `${singular}s`): string {
  if (count === 0) return `no ${plural}`
  return `${count} ${count === 1 ? singular : plural}`
}
