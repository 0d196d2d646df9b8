import { formatNumber } from '@shared/format'
import type { Support } from '@/api/quantities'
import type { OutboxStatus } from '@/api/studyAdmin'
import type { QuantityStage, StudyDetail } from '@/api/studies'

export const SUPPORT_LABELS: Record<Support['kind'], { label: string; hint: string }> = {
  real: { label: 'Real line', hint: 'any value, negative or positive' },
  positive: { label: 'Positive', hint: 'values above zero, e.g. rates, durations, concentrations' },
  proportion: { label: 'Proportion', hint: 'between 0 and 1, e.g. a share of households' },
  bounded: { label: 'Bounded', hint: 'between a lower and an upper limit you set' },
}

/** "Positive (0, ∞)", "Bounded [2, 40]". */
export function supportText(support: Support): string {
  switch (support.kind) {
    case 'real':
      return 'Real line (−∞, ∞)'
    case 'positive':
      return 'Positive (0, ∞)'
    case 'proportion':
      return 'Proportion [0, 1]'
    case 'bounded':
      return `Bounded [${formatNumber(support.lower, 6)}, ${formatNumber(support.upper, 6)}]`
  }
}

export const QUANTITY_STAGES: readonly { key: QuantityStage; label: string; meaning: string }[] = [
  { key: 'framed', label: 'Framed', meaning: 'defined and ready to be asked' },
  { key: 'judged', label: 'Judged', meaning: 'experts have submitted judgements' },
  { key: 'reconciled', label: 'Reconciled', meaning: 'the judgements have been combined into one prior' },
  { key: 'in-record', label: 'In record', meaning: 'the prior is part of the prior record' },
]

export const ROUND_STATUS: Record<StudyDetail['rounds'][number]['status'], { label: string; tag: 'info' | 'warning' | 'primary' | 'success' }> = {
  draft: { label: 'Draft', tag: 'info' },
  open: { label: 'Open', tag: 'warning' },
  closed: { label: 'Closed', tag: 'primary' },
  reconciled: { label: 'Reconciled', tag: 'success' },
}

export const OUTBOX_STATUS: Record<OutboxStatus, { label: string; tag: 'info' | 'warning' | 'primary' | 'success' | 'danger' }> = {
  queued: { label: 'Queued', tag: 'warning' },
  sending: { label: 'Sending', tag: 'primary' },
  sent: { label: 'Sent', tag: 'success' },
  failed: { label: 'Failed', tag: 'danger' },
}

export const MAIL_KINDS: Record<string, string> = {
  invitation: 'Invitation',
  'round-notice': 'Round notice',
  reminder: 'Reminder',
  test: 'Test message',
}
