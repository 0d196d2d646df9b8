import type { Distribution, Point } from '@shared/stats'
import type { DeclarationBody, ElicitationMethod } from '@shared/schemas/rounds'
import { api } from './client'
import type { Quantity } from './quantities'
import type { PanelInvitation, Round, RoundStatus, RoundSummary } from '@shared/api/rounds'

export type { PanelInvitation, PanelMember, Round, RoundItem, RoundQuantity, RoundStatus, RoundSummary } from '@shared/api/rounds'

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

export type RoundPatchBody = Partial<RoundWriteBody> & { version: number }

export type JudgementStatus = 'not started' | 'draft' | 'submitted'

export interface RoundProgress {
  quantities: { id: number; name: string; symbol: string }[]
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
    quantities: { quantityId: number; status: JudgementStatus; updatedAt: string | null }[]
  }[]
}

/** GET /api/my/rounds row. */
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

export interface RoundEntry {
  declaration: Declaration | null
  practice: PracticeDone | null
  /** In a later round of the study: what the expert declared and practised last time, to confirm ("still true?"). */
  earlier?: { roundNumber: number; roundTitle: string; declaration: Declaration; practice: PracticeDone | null } | null
  /** Names of the study's pilot data sets. */
  pilotData?: string[]
  /** Calibration questions answered in an earlier round of the study (asked once per study). */
  calibrationAnsweredEarlier?: number[]
  submittedAt: string | null
}

export const roundsApi = {
  list: (studyId: number) => api.get<RoundSummary[]>(`/api/studies/${studyId}/rounds`),
  studyQuantities: (studyId: number) => api.get<StudyQuantity[]>(`/api/studies/${studyId}/quantities`),
  create: (studyId: number, body: RoundWriteBody) => api.post<Round>(`/api/studies/${studyId}/rounds`, body),
  get: (id: number) => api.get<Round>(`/api/rounds/${id}`),
  update: (id: number, body: RoundPatchBody) => api.patch<Round>(`/api/rounds/${id}`, body),
  open: (id: number) => api.post<Round>(`/api/rounds/${id}/open`),
  close: (id: number) => api.post<Round>(`/api/rounds/${id}/close`),
  progress: (id: number) => api.get<RoundProgress>(`/api/rounds/${id}/progress`),
  invite: (id: number, body: { email: string; name: string }) => api.post<Round>(`/api/rounds/${id}/invitations`, body),
  removeMember: (id: number, panelId: number) => api.delete<Round>(`/api/rounds/${id}/panel/${panelId}`),
  resend: (id: number, panelId: number) => api.post<Round>(`/api/rounds/${id}/panel/${panelId}/resend`),
  revoke: (id: number, panelId: number) => api.post<Round>(`/api/rounds/${id}/panel/${panelId}/revoke`),
  mine: () => api.get<MyRound[]>('/api/my/rounds'),
  entry: (id: number) => api.get<RoundEntry>(`/api/rounds/${id}/entry`),
  saveDeclaration: (id: number, body: DeclarationBody) => api.put<RoundEntry>(`/api/rounds/${id}/declaration`, body),
  confirmDeclaration: (id: number) => api.post<RoundEntry>(`/api/rounds/${id}/declaration/confirm`, {}),
  practice: (id: number, points: Point[]) =>
    api.post<RoundEntry & { feedback: PracticeFeedback }>(`/api/rounds/${id}/practice`, { points }),
}
