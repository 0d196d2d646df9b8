import { api } from './client'

export interface AppConfig {
  /** Whether the local mail fake runs (admins then get a Mailbox page). */
  devMailbox: boolean
}

export const configApi = {
  get: () => api.get<AppConfig>('/api/config'),
}
