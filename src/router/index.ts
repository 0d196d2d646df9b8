import { createRouter, createWebHistory, type RouterHistory, type Router } from 'vue-router'
import { api } from '@/api/client'
import { useAuthStore } from '@/stores/auth'
import { authGuard } from './guard'
import { routes } from './routes'

export function createAppRouter(history: RouterHistory = createWebHistory()): Router {
  const router = createRouter({
    history,
    routes,
    scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
  })
  router.beforeEach(authGuard)
  router.afterEach((to) => {
    if (typeof document !== 'undefined') {
      document.title = to.meta.title ? `${to.meta.title} · Priorsmith` : 'Priorsmith'
    }
  })
  return router
}

/** When the session ends behind the app's back (401 on a data request), go to sign-in and come back. */
export function handleExpiredSession(router: Router): void {
  api.onUnauthorized = (_error, url) => {
    if (url.startsWith('/api/auth/')) return
    const auth = useAuthStore()
    if (!auth.user) return
    auth.forgetSession()
    const current = router.currentRoute.value
    if (!current.meta.public) void router.replace({ name: 'sign-in', query: { redirect: current.fullPath } })
  }
}
