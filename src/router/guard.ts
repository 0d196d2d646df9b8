import type { RouteLocationNormalized, RouteLocationRaw } from 'vue-router'
import { useAuthStore } from '@/stores/auth'

/** Accepts only same-site paths as a post-sign-in target (no `//host` or absolute URLs). */
export function safeRedirect(value: unknown): string | null {
  if (typeof value !== 'string') return null
  if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null
  if (value === '/sign-in' || value.startsWith('/sign-in?')) return null
  return value
}

/**
 * Global before-guard: public pages are open; others need a session (else /sign-in?redirect=…),
 * and `meta.roles` limits a page to some roles (else /not-allowed).
 */
export async function authGuard(to: RouteLocationNormalized): Promise<true | RouteLocationRaw> {
  const auth = useAuthStore()
  await auth.ensureChecked()

  if (to.name === 'sign-in' && auth.user) {
    return safeRedirect(to.query.redirect) ?? { name: 'studies' }
  }
  if (to.meta.public) return true
  if (!auth.user) {
    return { name: 'sign-in', query: { redirect: to.fullPath } }
  }
  if (!auth.hasRole(to.meta.roles)) {
    return { name: 'not-allowed', query: { from: to.fullPath } }
  }
  return true
}
