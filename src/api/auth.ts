import type { User } from '@shared/types'
import type { SignInBody } from '@shared/schemas/auth'
import { api } from './client'

export const authApi = {
  me: () => api.get<User>('/api/auth/me'),
  signIn: (body: SignInBody) => api.post<User>('/api/auth/sign-in', body),
  signOut: () => api.post<void>('/api/auth/sign-out'),
  csrf: () => api.fetchCsrfToken(),
}
