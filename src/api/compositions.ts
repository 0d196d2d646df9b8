import type { CompositionBody } from '@shared/schemas/compositions'
import type { Composition, CompositionDirichlet } from '@shared/api/compositions'
import { api } from './client'

export type { Composition, CompositionDirichlet, CompositionShare } from '@shared/api/compositions'

export const compositionsApi = {
  list: (studyId: number) => api.get<Composition[]>(`/api/studies/${studyId}/compositions`),
  get: (id: number) => api.get<Composition>(`/api/compositions/${id}`),
  create: (studyId: number, body: CompositionBody) => api.post<Composition>(`/api/studies/${studyId}/compositions`, body),
  update: (id: number, body: CompositionBody & { version: number }) => api.patch<Composition>(`/api/compositions/${id}`, body),
  remove: (id: number) => api.delete(`/api/compositions/${id}`),
  dirichlet: (id: number) => api.get<CompositionDirichlet>(`/api/compositions/${id}/dirichlet`),
}
