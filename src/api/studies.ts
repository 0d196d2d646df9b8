import type { StudyRole, StudySummary } from '@shared/types'
import type { StudyBody } from '@shared/schemas/studies'
import type { SupportKind } from '@shared/schemas/quantities'
import { api } from './client'

/** Where a quantity stands (GET /api/studies/:id). */
export type QuantityStage = 'framed' | 'judged' | 'reconciled' | 'in-record'

export interface StudyMember {
  userId: number
  displayName: string
  email: string
  studyRole: StudyRole
  addedAt: string
}

export interface StudyDetail extends StudySummary {
  members: StudyMember[]
  quantities: { id: number; name: string; symbol: string; unit: string; supportKind: SupportKind; stage: QuantityStage }[]
  rounds: { id: number; number: number; title: string; status: 'draft' | 'open' | 'closed' | 'reconciled'; opensAt: string; closesAt: string }[]
}

export const studiesApi = {
  list: () => api.get<StudySummary[]>('/api/studies'),
  create: (body: StudyBody) => api.post<StudySummary>('/api/studies', body),
  detail: (id: number) => api.get<StudyDetail>(`/api/studies/${id}`),
  update: (id: number, body: StudyBody & { version: number }) => api.patch<StudySummary>(`/api/studies/${id}`, body),
  addMember: (id: number, body: { userId: number; studyRole: StudyRole }) => api.post<StudyDetail>(`/api/studies/${id}/members`, body),
  removeMember: (id: number, userId: number) => api.delete(`/api/studies/${id}/members/${userId}`),
}
