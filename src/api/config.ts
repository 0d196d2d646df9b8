import type { AppConfig } from '@shared/api/users'
import { api } from './client'

export type { AppConfig } from '@shared/api/users'

export const configApi = {
  get: () => api.get<AppConfig>('/api/config'),
}
