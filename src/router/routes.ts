import type { RouteRecordRaw } from 'vue-router';
import type { Role } from '@shared/protocol/roles';
import type { AccessMeta } from './access';

declare module 'vue-router' {
  interface RouteMeta extends AccessMeta {
    /** Shown in the header and the browser tab. */
    title?: string;
  }
}

const MainLayout = () => import('@/layouts/MainLayout.vue');
const PlainLayout = () => import('@/layouts/PlainLayout.vue');
const RoleHomePage = () => import('@/pages/RoleHomePage.vue');

function roleHome(path: string, role: Role, title: string): RouteRecordRaw {
  return { path, name: `home-${role}`, component: RoleHomePage, props: { role }, meta: { roles: [role], title } };
}

/** Every screen of the app; who may open it is in `meta`. Any signed-in person unless marked. */
export const routes: RouteRecordRaw[] = [
  {
    path: '/',
    component: PlainLayout,
    children: [
      { path: 'sign-in', name: 'sign-in', component: () => import('@/pages/SignInPage.vue'), meta: { guestOnly: true, title: 'Sign in' } },
      { path: 'setup', name: 'setup', component: () => import('@/pages/SetupPage.vue'), meta: { guestOnly: true, title: 'Set up' } },
      { path: 'welcome/:token', name: 'welcome', component: () => import('@/pages/WelcomePage.vue'), meta: { public: true, title: 'Welcome' } },
      { path: 'forgot-password', name: 'forgot-password', component: () => import('@/pages/ForgotPasswordPage.vue'), meta: { guestOnly: true, title: 'Forgot password' } },
      { path: 'reset-password/:token', name: 'reset-password', component: () => import('@/pages/ResetPasswordPage.vue'), meta: { public: true, title: 'New password' } },
    ],
  },
  {
    path: '/',
    component: MainLayout,
    children: [
      // Never shown: the guard sends each person on to their own home.
      { path: '', name: 'landing', component: () => import('@/pages/NoRolePage.vue'), meta: { landing: true } },
      { path: 'schedule', name: 'schedule', component: () => import('@/pages/SchedulePage.vue'), meta: { title: 'Line set schedule' } },
      { path: 'admin/venue', name: 'admin-venue', component: () => import('@/pages/VenueSettingsPage.vue'), meta: { roles: ['admin'], title: 'Venue settings' } },
      { path: 'admin/people', name: 'admin-people', component: () => import('@/pages/AdminPeoplePage.vue'), meta: { roles: ['admin'], title: 'People' } },
      roleHome('rail', 'rail', 'Rail'),
      roleHome('bridge', 'loader', 'Loading bridge'),
      roleHome('deck', 'deck', 'Deck'),
      roleHome('watch', 'stage-manager', 'Watch'),
      {
        path: 'sessions/new',
        name: 'session-new',
        component: () => import('@/pages/SessionPlannerPage.vue'),
        meta: { roles: ['rail', 'admin'], title: 'New session' },
      },
      {
        path: 'sessions/:id(\\d+)',
        name: 'session',
        component: () => import('@/pages/LiveSessionPage.vue'),
        props: (route) => ({ id: Number(route.params.id) }),
        meta: { title: 'Loading session' },
      },
      { path: 'practice', name: 'practice', component: () => import('@/pages/PracticePage.vue'), meta: { title: 'Practice' } },
      {
        path: 'practice/:id(\\d+)',
        name: 'practice-record',
        component: () => import('@/pages/PracticeRecordPage.vue'),
        props: (route) => ({ id: Number(route.params.id) }),
        meta: { title: 'Practice debrief' },
      },
      { path: 'admin/mail', name: 'admin-mail', component: () => import('@/pages/AdminMailPage.vue'), meta: { roles: ['admin'], title: 'Mail' } },
      { path: 'admin/training', name: 'admin-training', component: () => import('@/pages/TrainingRecordPage.vue'), meta: { roles: ['admin'], title: 'Training record' } },
      { path: 'record', name: 'record', component: () => import('@/pages/RecordHistoryPage.vue'), meta: { title: 'Past sessions' } },
      { path: 'record/verify', name: 'record-verify', component: () => import('@/pages/VerifyRecordPage.vue'), meta: { title: 'Check a record' } },
      {
        path: 'record/sessions/:id(\\d+)',
        name: 'record-session',
        component: () => import('@/pages/SessionReportPage.vue'),
        props: (route) => ({ id: Number(route.params.id) }),
        meta: { title: 'Session report' },
      },
      {
        path: 'record/sessions/:id(\\d+)/replay',
        name: 'record-replay',
        component: () => import('@/pages/SessionReplayPage.vue'),
        props: (route) => ({ id: Number(route.params.id) }),
        meta: { title: 'Replay' },
      },
      {
        path: 'record/line-sets/:id(\\d+)',
        name: 'record-line-set',
        component: () => import('@/pages/LineSetRecordPage.vue'),
        props: (route) => ({ id: Number(route.params.id) }),
        meta: { title: 'Line set record' },
      },
      { path: 'no-role', name: 'no-role', component: () => import('@/pages/NoRolePage.vue'), meta: { title: 'No role yet' } },
    ],
  },
  {
    path: '/:pathMatch(.*)*',
    component: PlainLayout,
    children: [{ path: '', name: 'not-found', component: () => import('@/pages/NotFoundPage.vue'), meta: { public: true, title: 'Not found' } }],
  },
];
