import type { Point } from '@shared/stats'
import type { DeclarationBody } from '@shared/schemas/rounds'
import type {
  MyRound, PanelInviteBody, PracticeResult, Round, RoundEntry, RoundPatchBody, RoundProgress, RoundSummary, RoundWriteBody, StudyQuantity,
} from '@shared/api/rounds'
import { api } from './client'

export type {
  Declaration, MyRound, PanelInvitation, PanelInviteBody, PanelMember, PracticeDone, PracticeFeedback, PracticeResult, ProgressStatus, Round,
  RoundEntry, RoundItem, RoundPatchBody, RoundProgress, RoundQuantity, RoundStatus, RoundSummary, RoundWriteBody, StudyQuantity,
} from '@shared/api/rounds'

export const roundsApi = {
  list: (studyId: number) => api.get<RoundSummary[]>(`/api/studies/${studyId}/rounds`),
  studyQuantities: (studyId: number) => api.get<StudyQuantity[]>(`/api/studies/${studyId}/quantities`),
  create: (studyId: number, body: RoundWriteBody) => api.post<Round>(`/api/studies/${studyId}/rounds`, body),
  get: (id: number) => api.get<Round>(`/api/rounds/${id}`),
  update: (id: number, body: RoundPatchBody) => api.patch<Round>(`/api/rounds/${id}`, body),
  open: (id: number) => api.post<Round>(`/api/rounds/${id}/open`),
  close: (id: number) => api.post<Round>(`/api/rounds/${id}/close`),
  progress: (id: number) => api.get<RoundProgress>(`/api/rounds/${id}/progress`),
  invite: (id: number, body: PanelInviteBody) => api.post<Round>(`/api/rounds/${id}/invitations`, body),
  removeMember: (id: number, panelId: number) => api.delete<Round>(`/api/rounds/${id}/panel/${panelId}`),
  resend: (id: number, panelId: number) => api.post<Round>(`/api/rounds/${id}/panel/${panelId}/resend`),
  revoke: (id: number, panelId: number) => api.post<Round>(`/api/rounds/${id}/panel/${panelId}/revoke`),
  mine: () => api.get<MyRound[]>('/api/my/rounds'),
  entry: (id: number) => api.get<RoundEntry>(`/api/rounds/${id}/entry`),
  saveDeclaration: (id: number, body: DeclarationBody) => api.put<RoundEntry>(`/api/rounds/${id}/declaration`, body),
  confirmDeclaration: (id: number) => api.post<RoundEntry>(`/api/rounds/${id}/declaration/confirm`, {}),
  practice: (id: number, points: Point[]) =>
    api.post<PracticeResult>(`/api/rounds/${id}/practice`, { points }),
}
