import type { ElicitationMethod } from '../schemas/rounds'
import type { EvidenceFile, Quantity } from './quantities'

/** Response shapes of the round routes, returned by the server's mappers and read by the client. */

export type RoundStatus = 'draft' | 'open' | 'closed' | 'reconciled'

/** A row of GET /api/studies/:id/rounds. */
export interface RoundSummary {
  id: number
  number: number
  title: string
  status: RoundStatus
  opensAt: string
  closesAt: string
  panelSize: number
  submitted: number
  itemCount: number
}

/** A quantity as a round shows it: its evidence files without their upload time. */
export type RoundQuantity = Pick<Quantity, 'id' | 'name' | 'symbol' | 'unit' | 'question' | 'support' | 'assumptions' | 'evidenceNotes'> & {
  files: Omit<EvidenceFile, 'createdAt'>[]
}

export interface RoundItem {
  quantityId: number
  method: ElicitationMethod
  edges?: number[]
  chips?: number
  askTails: boolean
  quantity: RoundQuantity
}

export interface PanelInvitation {
  id: number
  invitedAt: string | null
  expiresAt: string | null
  acceptedAt: string | null
  expired: boolean
}

export interface PanelMember {
  id: number
  email: string
  name: string
  userId: number | null
  notifiedAt: string | null
  firstOpenedAt: string | null
  submittedAt: string | null
  invitation: PanelInvitation | null
}

export interface Round {
  id: number
  studyId: number
  number: number
  title: string
  briefing: string
  opensAt: string
  closesAt: string
  status: RoundStatus
  reminderHoursBefore: number | null
  reminderSentAt: string | null
  /** IANA zone in which the round's e-mails state its times. */
  timeZone: string
  calibrationPosition: 'before' | 'after'
  feedbackEnabled: boolean
  /** Whether the round asks the calibration questions. */
  askCalibration: boolean
  /** `answer` is left out for experts. */
  practice: { question: string; unit: string; answer?: number }
  openedAt: string | null
  closedAt: string | null
  version: number
  items: RoundItem[]
  /** Empty for experts. */
  panel: PanelMember[]
}
