import type { RouteRecordRaw } from 'vue-router'
import type { Role } from '@shared/types'

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable without signing in. */
    public?: boolean
    /** Roles allowed to open the page; absent: any signed-in user. */
    roles?: readonly Role[]
    /** Shown in the browser tab. */
    title?: string
  }
}

export const routes: RouteRecordRaw[] = [
  { path: '/', redirect: { name: 'studies' } },
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { public: true, title: 'Sign in' },
  },
  {
    path: '/studies',
    name: 'studies',
    component: () => import('@/views/StudiesView.vue'),
    meta: { title: 'Studies' },
  },
  {
    path: '/studies/:id(\\d+)',
    component: () => import('@/views/study/StudyLayout.vue'),
    props: (route) => ({ id: Number(route.params.id) }),
    meta: { title: 'Study' },
    children: [
      {
        path: '',
        name: 'study-overview',
        component: () => import('@/views/study/StudyOverviewView.vue'),
        meta: { title: 'Study overview' },
      },
    ],
  },
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@/views/admin/UsersView.vue'),
    meta: { roles: ['admin'], title: 'Users' },
  },
  {
    path: '/not-allowed',
    name: 'not-allowed',
    component: () => import('@/views/NotAllowedView.vue'),
    meta: { title: 'Not allowed' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { public: true, title: 'Page not found' },
  },
]
