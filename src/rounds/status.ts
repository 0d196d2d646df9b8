import { formatShortDateTime } from '@shared/format'
import type { PanelInvitation, PanelMember, RoundStatus } from '@/api/rounds'

type Tone = 'info' | 'warning' | 'primary' | 'success' | 'danger'

export const ROUND_STATUS: Record<RoundStatus, { label: string; tag: Tone; meaning: string }> = {
  draft: { label: 'Draft', tag: 'info', meaning: 'being prepared; experts have not been told yet' },
  open: { label: 'Open', tag: 'warning', meaning: 'experts are answering' },
  closed: { label: 'Closed', tag: 'primary', meaning: 'answering has ended' },
  reconciled: { label: 'Reconciled', tag: 'success', meaning: 'the judgements have been reconciled into priors' },
}

export interface MemberState {
  /** Machine-readable, for tests and styling. */
  key: 'account' | 'pending' | 'invited' | 'accepted' | 'expired' | 'no-link'
  label: string
  detail: string
  tone: Tone
}

/**
 * How far a panel member's invitation has got. Account holders get a plain notice; others a
 * single-use link that is pending (draft), sent, accepted, expired, or withdrawn.
 */
export function memberState(member: Pick<PanelMember, 'userId' | 'notifiedAt'> & { invitation: PanelInvitation | null }, roundStatus: RoundStatus): MemberState {
  const inv = member.invitation
  if (inv?.acceptedAt) {
    return { key: 'accepted', label: 'Accepted', detail: `Account created ${formatShortDateTime(inv.acceptedAt)}`, tone: 'success' }
  }
  if (member.userId && !inv) {
    return {
      key: 'account',
      label: 'Account holder',
      detail: member.notifiedAt ? 'Gets a notice with a link' : roundStatus === 'draft' ? 'Notice sent on opening' : 'No notice sent',
      tone: 'primary',
    }
  }
  if (inv?.expired) {
    return { key: 'expired', label: 'Link expired', detail: `Expired ${formatShortDateTime(inv.expiresAt)}; resend for a new link`, tone: 'danger' }
  }
  if (inv) {
    return { key: 'invited', label: 'Invited', detail: `Link expires ${formatShortDateTime(inv.expiresAt)}`, tone: 'warning' }
  }
  if (roundStatus === 'draft') {
    return { key: 'pending', label: 'To be invited', detail: 'Invitation sent on opening', tone: 'info' }
  }
  return { key: 'no-link', label: 'No valid link', detail: 'Link withdrawn; resend to invite again', tone: 'info' }
}
