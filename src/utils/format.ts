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
