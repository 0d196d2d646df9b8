import type { LinkAnswer, LinkAnswerSave, LinkAnswerVersion, LinkOrderBody, LinkPatchBody, LinkWriteBody, RoundLink } from '@shared/api/links'
import { api } from './client'

export type { LinkAnswer, LinkAnswerSave, LinkAnswerStatus, LinkAnswerVersion, LinkedQuantity, LinkPatchBody, LinkWriteBody, RoundLink } from '@shared/api/links'

export const linksApi = {
  get: (id: number) => api.get<RoundLink>(`/api/links/${id}`),
  create: (roundId: number, body: LinkWriteBody) => api.post<RoundLink>(`/api/rounds/${roundId}/links`, body),
  update: (id: number, body: LinkPatchBody) => api.patch<RoundLink>(`/api/links/${id}`, body),
  remove: (id: number) => api.delete(`/api/links/${id}`),
  reorder: (roundId: number, body: LinkOrderBody) => api.put<RoundLink[]>(`/api/rounds/${roundId}/links/order`, body),
  answers: (roundId: number) => api.get<LinkAnswer[]>(`/api/rounds/${roundId}/link-answers`),
  saveAnswer: (roundId: number, linkId: number, body: LinkAnswerSave) => api.put<LinkAnswer>(`/api/rounds/${roundId}/link-answers/${linkId}`, body),
  history: (answerId: number) => api.get<LinkAnswerVersion[]>(`/api/link-answers/${answerId}/history`),
}
