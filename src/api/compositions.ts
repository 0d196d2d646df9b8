import type { CompositionBody, CompositionDatasetBody } from '@shared/schemas/compositions'
import type { Composition, CompositionAnalysis, CompositionDataset, CompositionDirichlet } from '@shared/api/compositions'
import { api } from './client'

export type { Composition, CompositionAnalysis, CompositionDataset, CompositionDirichlet, CompositionShare } from '@shared/api/compositions'

export const compositionsApi = {
  list: (studyId: number) => api.get<Composition[]>(`/api/studies/${studyId}/compositions`),
  get: (id: number) => api.get<Composition>(`/api/compositions/${id}`),
  create: (studyId: number, body: CompositionBody) => api.post<Composition>(`/api/studies/${studyId}/compositions`, body),
  update: (id: number, body: CompositionBody & { version: number }) => api.patch<Composition>(`/api/compositions/${id}`, body),
  remove: (id: number) => api.delete(`/api/compositions/${id}`),
  dirichlet: (id: number) => api.get<CompositionDirichlet>(`/api/compositions/${id}/dirichlet`),
  datasets: (id: number) => api.get<CompositionDataset[]>(`/api/compositions/${id}/datasets`),
  upload: (id: number, body: CompositionDatasetBody) => api.post<CompositionDataset>(`/api/compositions/${id}/datasets`, body),
  latestImpact: (id: number) => api.get<{ analysis: CompositionAnalysis | null }>(`/api/compositions/${id}/impact`),
  runImpact: (id: number, datasetId: number) => api.post<CompositionAnalysis>(`/api/compositions/${id}/impact`, { datasetId }),
}
