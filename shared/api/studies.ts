import type { SupportKind } from '../schemas/quantities'
import type { StudyRole, StudySummary } from '../types/index'
import type { RoundStatus } from './rounds'

/** Response shapes of the study routes, returned by the server's services and read by the client. */

export type { StudySummary } from '../types/index'

/** Where a quantity stands (GET /api/studies/:id). */
export type QuantityStage = 'framed' | 'judged' | 'reconciled' | 'in-record'

export interface StudyMember {
  userId: number
  displayName: string
  email: string
  studyRole: StudyRole
  addedAt: string
}

/** GET /api/studies/:id: the summary with members, each quantity's stage and the rounds. */
export interface StudyDetail extends StudySummary {
  members: StudyMember[]
  quantities: { id: number; name: string; symbol: string; unit: string; supportKind: SupportKind; stage: QuantityStage }[]
  rounds: { id: number; number: number; title: string; status: RoundStatus; opensAt: string; closesAt: string }[]
}

/** Body of POST /api/studies/:id/members. */
export interface StudyMemberBody {
  userId: number
  studyRole: StudyRole
}
