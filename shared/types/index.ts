/** Roles a user account can hold. */
export const ROLES = ['admin', 'analyst', 'expert', 'reviewer'] as const
export type Role = (typeof ROLES)[number]

/** Roles a member can hold inside one study. */
export const STUDY_ROLES = ['analyst', 'expert', 'reviewer'] as const
export type StudyRole = (typeof STUDY_ROLES)[number]

export interface User {
  id: number
  email: string
  displayName: string
  role: Role
  disabled: boolean
  createdAt: string
  updatedAt: string
}

export type StudyStatus = 'framing' | 'eliciting' | 'reconciling' | 'recorded'

export interface StudySummary {
  id: number
  title: string
  context: string
  status: StudyStatus
  ownerId: number
  ownerName: string
  myRole: StudyRole | 'admin'
  quantityCount: number
  memberCount: number
  version: number
  createdAt: string
  updatedAt: string
}

/** Error body every API error uses: `{ error: { message, fields? } }`. */
export interface ApiErrorBody {
  error: { message: string; fields?: Record<string, string> }
}
