import { computed, ref } from 'vue'
import { defineStore } from 'pinia'
import type { Role, User } from '@shared/types'
import type { SignInBody } from '@shared/schemas/auth'
import { authApi } from '@/api/auth'
import { api, ApiError } from '@/api/client'
import { useStudiesStore } from './studies'
import { useUsersStore } from './users'

/** The signed-in user and the session's CSRF token. */
export const useAuthStore = defineStore('auth', () => {
  const user = ref<User | null>(null)
  const csrfToken = ref<string | null>(null)
  /** True once the session has been asked for (GET /api/auth/me answered or failed). */
  const checked = ref(false)

  const isSignedIn = computed(() => user.value !== null)
  const role = computed<Role | null>(() => user.value?.role ?? null)
  const isAdmin = computed(() => role.value === 'admin')

  /** Whether the signed-in user holds one of `roles` (no list: any signed-in user). */
  function hasRole(roles?: readonly Role[]): boolean {
    if (!user.value) return false
    return !roles || roles.length === 0 || roles.includes(user.value.role)
  }

  let pendingCsrf: Promise<string> | null = null
  function loadCsrf(): Promise<string> {
    pendingCsrf ??= authApi
      .csrf()
      .then((token) => {
        csrfToken.value = token
        return token
      })
      .finally(() => {
        pendingCsrf = null
      })
    return pendingCsrf
  }
  function ensureCsrf(): Promise<string> {
    return csrfToken.value !== null ? Promise.resolve(csrfToken.value) : loadCsrf()
  }
  function refreshCsrf(): Promise<string> {
    csrfToken.value = null
    return loadCsrf()
  }
  /** The token is bound to the session: after sign-in and sign-out fetch the new one. */
  async function renewCsrfAfterSessionChange(): Promise<void> {
    try {
      await refreshCsrf()
    } catch {
      csrfToken.value = null // fetched again before the next write
    }
  }

  api.setCsrfProvider({ get: ensureCsrf, refresh: refreshCsrf })

  /** GET /api/auth/me; a 401 means nobody is signed in. */
  async function fetchMe(): Promise<User | null> {
    try {
      user.value = await authApi.me()
    } catch (error) {
      if (!(error instanceof ApiError) || error.status !== 401) throw error
      user.value = null
    } finally {
      checked.value = true
    }
    return user.value
  }

  let pendingMe: Promise<User | null> | null = null
  /** Asks the server for the session once; later calls reuse the answer. */
  function ensureChecked(): Promise<User | null> {
    if (checked.value) return Promise.resolve(user.value)
    pendingMe ??= fetchMe()
      .catch(() => null) // server unreachable: treat as signed out, sign-in will report the problem
      .finally(() => {
        pendingMe = null
      })
    return pendingMe
  }

  async function signIn(body: SignInBody): Promise<User> {
    const signedIn = await authApi.signIn(body)
    clearDomainStores()
    user.value = signedIn
    checked.value = true
    await renewCsrfAfterSessionChange()
    return signedIn
  }

  /** Signs out on the server (a 401 there means the session had already ended) and forgets local state. */
  async function signOut(): Promise<void> {
    try {
      await authApi.signOut()
    } catch (error) {
      if (!(error instanceof ApiError) || error.status !== 401) {
        forgetSession()
        throw error
      }
    }
    forgetSession()
    await renewCsrfAfterSessionChange()
  }

  /** Local sign-out, e.g. when the server says the session expired. */
  function forgetSession(): void {
    user.value = null
    checked.value = true
    csrfToken.value = null
    clearDomainStores()
  }

  function clearDomainStores(): void {
    useStudiesStore().clear()
    useUsersStore().clear()
  }

  return {
    user,
    csrfToken,
    checked,
    isSignedIn,
    role,
    isAdmin,
    hasRole,
    ensureCsrf,
    refreshCsrf,
    fetchMe,
    ensureChecked,
    signIn,
    signOut,
    forgetSession,
  }
})
