import type { User } from '@shared/types'
import type { UserCreateBody, UserUpdateBody } from '@shared/schemas/users'
import { api } from './client'

export const usersApi = {
  list: () => api.get<User[]>('/api/users'),
  create: (body: UserCreateBody) => api.post<User>('/api/users', body),
  update: (id: number, body: UserUpdateBody) => api.patch<User>(`/api/users/${id}`, body),
}
