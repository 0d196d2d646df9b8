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
      // Study pages open to every member; the API decides what each study role may read or change.
      {
        path: 'quantities',
        name: 'study-quantities',
        component: () => import('@/views/study/StudyQuantitiesView.vue'),
        meta: { title: 'Quantities' },
      },
      {
        path: 'calibration',
        name: 'study-calibration',
        component: () => import('@/views/study/StudyCalibrationView.vue'),
        meta: { title: 'Calibration questions' },
      },
      {
        path: 'audit',
        name: 'study-audit',
        component: () => import('@/views/study/StudyAuditView.vue'),
        meta: { title: 'Audit trail' },
      },
      {
        path: 'outbox',
        name: 'study-outbox',
        component: () => import('@/views/study/StudyOutboxView.vue'),
        meta: { title: 'Outbox' },
      },
      {
        path: 'record',
        name: 'study-record',
        component: () => import('@/views/study/RecordView.vue'),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Prior record' },
      },
      {
        path: 'rounds',
        name: 'study-rounds',
        component: () => import('@/views/study/rounds/RoundsView.vue'),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Rounds' },
      },
      {
        path: 'rounds/new',
        name: 'study-rounds-new',
        component: () => import('@/views/study/rounds/RoundEditView.vue'),
        meta: { roles: ['admin', 'analyst'], title: 'Schedule a round' },
      },
      {
        path: 'rounds/:roundId(\\d+)',
        name: 'study-round',
        component: () => import('@/views/study/rounds/RoundView.vue'),
        props: (route) => ({ roundId: Number(route.params.roundId) }),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Round' },
      },
      {
        path: 'rounds/:roundId(\\d+)/edit',
        name: 'study-round-edit',
        component: () => import('@/views/study/rounds/RoundEditView.vue'),
        props: (route) => ({ roundId: Number(route.params.roundId) }),
        meta: { roles: ['admin', 'analyst'], title: 'Edit round' },
      },
      {
        path: 'pilot-data',
        name: 'study-pilot-data',
        component: () => import('@/views/study/PilotDataView.vue'),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Pilot data' },
      },
      {
        path: 'impact/:quantityId(\\d+)',
        name: 'study-impact',
        component: () => import('@/views/study/ImpactView.vue'),
        props: (route) => ({ quantityId: Number(route.params.quantityId) }),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Impact analysis' },
      },
      {
        path: 'reconcile/:quantityId(\\d+)',
        name: 'study-reconcile',
        component: () => import('@/views/study/ReconcileView.vue'),
        props: (route) => ({ quantityId: Number(route.params.quantityId) }),
        meta: { roles: ['admin', 'analyst', 'reviewer'], title: 'Reconcile' },
      },
    ],
  },
  {
    path: '/invite/:token',
    name: 'invite',
    component: () => import('@/views/InviteView.vue'),
    props: (route) => ({ token: String(route.params.token) }),
    meta: { public: true, title: 'Invitation' },
  },
  {
    path: '/answer/:roundId(\\d+)',
    name: 'answer',
    component: () => import('@/views/AnswerView.vue'),
    props: (route) => ({ roundId: Number(route.params.roundId) }),
    meta: { roles: ['expert'], title: 'Round' },
  },
  {
    path: '/dev/mailbox',
    name: 'dev-mailbox',
    component: () => import('@/views/dev/MailboxView.vue'),
    meta: { roles: ['admin'], title: 'Mailbox' },
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
