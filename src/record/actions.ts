import type { StudySummary } from '@shared/types'
import type { RecordStatus } from '@/api/record'

export type ViewerRole = StudySummary['myRole']

export interface RecordActions {
  /** "Show expert names" switch (analyst, draft). */
  showNames: boolean
  submit: boolean
  newVersion: boolean
  /** Return with comments and sign off: a reviewer member, record in review. */
  returnRecord: boolean
  signOff: boolean
  /** Per-section comments: analysts and reviewers, until signed off. */
  comment: boolean
  /** Send the final priors' density charts for the .docx (analyst, draft: they are fixed at submission). */
  sendCharts: boolean
}

/**
 * What the viewer may do with the version on screen. Admins act as analysts but never as reviewers (the server
 * lets only a reviewer member return or sign off). Writes go to the current version, so an older version is read-only.
 */
export function recordActions(role: ViewerRole, status: RecordStatus, isLatest: boolean): RecordActions {
  const analyst = role === 'analyst' || role === 'admin'
  const reviewer = role === 'reviewer'
  const current = isLatest
  return {
    showNames: current && analyst && status === 'draft',
    submit: current && analyst && status === 'draft',
    newVersion: current && analyst && status === 'signed_off',
    returnRecord: current && reviewer && status === 'in_review',
    signOff: current && reviewer && status === 'in_review',
    comment: current && (analyst || reviewer) && status !== 'signed_off',
    sendCharts: current && analyst && status === 'draft',
  }
}
