import { ref } from 'vue'
import { defineStore } from 'pinia'
import type { User } from '@shared/types'
import type { UserCreateBody, UserUpdateBody } from '@shared/schemas/users'
import { usersApi } from '@/api/users'

/** User accounts (admin only). */
export const useUsersStore = defineStore('users', () => {
  const items = ref<User[]>([])
  const loaded = ref(false)

  async function fetchAll(): Promise<User[]> {
    const list = await usersApi.list()
    items.value = list
    loaded.value = true
    return list
  }

  function put(user: User): void {
    const index = items.value.findIndex((u) => u.id === user.id)
    if (index === -1) items.value.push(user)
    else items.value.splice(index, 1, user)
  }

  async function create(body: UserCreateBody): Promise<User> {
    const user = await usersApi.create(body)
    put(user)
    return user
  }

  async function update(id: number, body: UserUpdateBody): Promise<User> {
    const user = await usersApi.update(id, body)
    put(user)
    return user
  }

  function setDisabled(id: number, disabled: boolean): Promise<User> {
    return update(id, { disabled })
  }

  function clear(): void {
    items.value = []
    loaded.value = false
  }

  return { items, loaded, fetchAll, create, update, setDisabled, clear }
})
