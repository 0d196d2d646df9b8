import type { ElicitationMethod } from '../schemas/rounds'
import type { Distribution, Point } from '../stats/types'
import type { LinkedQuantity, RoundLink } from './links'
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
  /** The study-wide anonymous label ("Expert 2"), the same on every screen and export. */
  label: string
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
  /** Pairs of the round's quantities that may move together, each asked as a conditional question, in order. */
  links: RoundLink[]
  /** Empty for experts. */
  panel: PanelMember[]
}

/** A quantity as the round form needs it (GET /api/studies/:id/quantities). */
export type StudyQuantity = Omit<Quantity, 'files' | 'createdAt' | 'updatedAt'>

/** Body of POST /api/studies/:id/rounds (dates as Date or ISO text; JSON turns a Date into ISO). */
export interface RoundWriteBody {
  title: string
  briefing?: string
  opensAt: Date | string
  closesAt: Date | string
  items: { quantityId: number; method: ElicitationMethod; edges?: number[]; chips?: number; askTails?: boolean }[]
  reminderHoursBefore?: number | null
  timeZone?: string
  calibrationPosition?: 'before' | 'after'
  feedbackEnabled?: boolean
  practiceQuestion?: string
  practiceUnit?: string
  practiceAnswer?: number
}

/** Body of PATCH /api/rounds/:id. */
export type RoundPatchBody = Partial<RoundWriteBody> & { version: number }

/** Body of POST /api/rounds/:id/invitations. */
export interface PanelInviteBody {
  email: string
  name: string
}

/** Where one expert's answer for one quantity stands. */
export type ProgressStatus = 'not started' | 'draft' | 'submitted'

/** How many experts have given a chance for one link, and how many submitted it (counts only, never values). */
export interface LinkProgress {
  linkId: number
  first: LinkedQuantity
  second: LinkedQuantity
  answered: number
  submitted: number
}

/** GET /api/rounds/:id/progress: who opened, who submitted, per quantity and per link. */
export interface RoundProgress {
  quantities: { id: number; name: string; symbol: string }[]
  links: LinkProgress[]
  experts: {
    panelId: number
    /** The expert's anonymous label in this study, the same on every screen and export. */
    label: string
    name: string
    email: string
    hasAccount: boolean
    invitation: PanelInvitation | null
    notifiedAt: string | null
    firstOpenedAt: string | null
    submittedAt: string | null
    quantities: { quantityId: number; status: ProgressStatus; updatedAt: string | null }[]
  }[]
}

/** A row of GET /api/my/rounds: a round the signed-in expert is on, across studies. */
export interface MyRound {
  id: number
  title: string
  status: RoundStatus
  opensAt: string
  closesAt: string
  studyId: number
  studyTitle: string
  submittedAt: string | null
}

/** The practice feedback the server computes (also stored as `practice.fit`). */
export interface PracticeFeedback {
  distribution: Distribution
  sse: number
  /** The expert's lowest and highest plausible values and median. */
  lower: number
  q50: number
  upper: number
  trueValue: number
  /** Share of the expert's probability at or below the true value (0.5 = the truth sat at their median). */
  truthProb: number
  insideQuartiles: boolean
  insideBounds: boolean
}

export interface Declaration {
  expertise: string
  interests: 'none' | 'described'
  interestsText: string
  seenPilotData: boolean
  savedAt: string
}

export interface PracticeDone {
  points: Point[]
  fit: PracticeFeedback | null
  completedAt: string
}

/** GET /api/rounds/:id/entry: the expert's declaration and practice before answering. */
export interface RoundEntry {
  declaration: Declaration | null
  practice: PracticeDone | null
  /** In a later round of the study: what the expert declared and practised last time, to confirm ("still true?"). */
  earlier: { roundNumber: number; roundTitle: string; declaration: Declaration; practice: PracticeDone | null } | null
  /** Names of the study's pilot data sets, so that the declaration can name them. */
  pilotData: string[]
  /** Calibration questions answered in an earlier round of the study (asked once per study). */
  calibrationAnsweredEarlier: number[]
  submittedAt: string | null
}

/** Answer of POST /api/rounds/:id/practice: the entry with the feedback on this try. */
export type PracticeResult = RoundEntry & { feedback: PracticeFeedback }
