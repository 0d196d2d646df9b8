import type { StudySummary } from '@shared/types'
import { api } from './client'

export const studiesApi = {
  list: () => api.get<StudySummary[]>('/api/studies'),
}
