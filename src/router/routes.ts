import type { RouteRecordRaw } from 'vue-router';

/** The route table. Every page is a lazy chunk; `meta` is typed in meta.d.ts. */
export const routes: RouteRecordRaw[] = [
  { path: '/', redirect: { name: 'studies' } },
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('../views/SignInView.vue'),
    meta: { title: 'Sign in', public: true },
  },
  {
    path: '/forgot-password',
    name: 'forgot-password',
    component: () => import('../views/ForgotPasswordView.vue'),
    meta: { title: 'Reset password', public: true },
  },
  {
    path: '/set-password',
    name: 'set-password',
    component: () => import('../views/SetPasswordView.vue'),
    meta: { title: 'Set password', public: true },
  },
  {
    path: '/studies',
    name: 'studies',
    component: () => import('../views/StudyListView.vue'),
    meta: { title: 'Studies', permission: 'study:read' },
  },
  {
    path: '/studies/:studyId(\\d+)',
    name: 'study',
    component: () => import('../views/StudyDetailView.vue'),
    props: (route) => ({ studyId: Number(route.params.studyId) }),
    meta: { title: 'Study', permission: 'study:read' },
  },
  {
    path: '/studies/:studyId(\\d+)/decoders',
    name: 'decoders',
    component: () => import('../views/DecodersView.vue'),
    props: (route) => ({ studyId: Number(route.params.studyId) }),
    meta: { title: 'Decoders', permission: 'decoder:read' },
  },
  {
    path: '/decoders/:decoderId(\\d+)',
    name: 'decoder',
    component: () => import('../views/DecoderDetailView.vue'),
    props: (route) => ({ decoderId: Number(route.params.decoderId) }),
    meta: { title: 'Decoder', permission: 'decoder:read' },
  },
  {
    path: '/sessions',
    name: 'sessions',
    component: () => import('../views/SessionListView.vue'),
    meta: { title: 'Sessions', permission: 'session:read' },
  },
  {
    path: '/sessions/:sessionId(\\d+)',
    name: 'session',
    component: () => import('../views/SessionConsoleView.vue'),
    props: (route) => ({ sessionId: Number(route.params.sessionId) }),
    meta: { title: 'Session console', permission: 'session:read' },
  },
  {
    path: '/sessions/:sessionId(\\d+)/review',
    name: 'session-review',
    component: () => import('../views/SessionReviewView.vue'),
    props: (route) => ({ sessionId: Number(route.params.sessionId) }),
    meta: { title: 'Gap review', permission: 'session:read' },
  },
  {
    // The participant's screen: no account, a one-time token bound to one session.
    path: '/display/:token',
    name: 'display',
    component: () => import('../views/ParticipantDisplayView.vue'),
    props: (route) => ({ token: String(route.params.token) }),
    meta: { title: 'Participant display', public: true },
  },
  {
    path: '/rigs',
    name: 'rigs',
    component: () => import('../views/AdminRigsView.vue'),
    meta: { title: 'Rigs', permission: 'rig:read' },
  },
  {
    path: '/admin/users',
    name: 'users',
    component: () => import('../views/AdminUsersView.vue'),
    meta: { title: 'Users', permission: 'user:manage' },
  },
  {
    path: '/admin/audit',
    name: 'audit',
    component: () => import('../views/AuditLogView.vue'),
    meta: { title: 'Audit log', permission: 'audit:read' },
  },
  {
    path: '/admin/outbox/:mailId(\\d+)?',
    name: 'outbox',
    component: () => import('../views/OutboxView.vue'),
    props: (route) => ({ mailId: route.params.mailId ? Number(route.params.mailId) : null }),
    meta: { title: 'Outbox', permission: 'outbox:read' },
  },
  {
    path: '/about',
    name: 'about',
    component: () => import('../views/AboutView.vue'),
    meta: { title: 'About', public: true },
  },
  {
    path: '/forbidden',
    name: 'forbidden',
    component: () => import('../views/ForbiddenView.vue'),
    meta: { title: 'Not allowed', public: true },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('../views/NotFoundView.vue'),
    meta: { title: 'Not found', public: true },
  },
];
