import type { StudySummary } from '@shared/types'
import type { StudyBody } from '@shared/schemas/studies'
import type { StudyDetail, StudyMemberBody } from '@shared/api/studies'
import { api } from './client'

export type { QuantityStage, StudyDetail, StudyMember, StudyMemberBody } from '@shared/api/studies'

export const studiesApi = {
  list: () => api.get<StudySummary[]>('/api/studies'),
  create: (body: StudyBody) => api.post<StudySummary>('/api/studies', body),
  detail: (id: number) => api.get<StudyDetail>(`/api/studies/${id}`),
  update: (id: number, body: StudyBody & { version: number }) => api.patch<StudySummary>(`/api/studies/${id}`, body),
  addMember: (id: number, body: StudyMemberBody) => api.post<StudyDetail>(`/api/studies/${id}/members`, body),
  removeMember: (id: number, userId: number) => api.delete(`/api/studies/${id}/members/${userId}`),
}
