import { createRouter, createWebHistory, type RouteRecordRaw } from 'vue-router';
import type { Role } from '@/api/types';
import { useSessionStore } from '@/stores/session';
import { decideNavigation, rolesWith, titleOf } from './access';
import { isCodeLoadError, reloadForPage } from './stale-build';

declare module 'vue-router' {
  interface RouteMeta {
    /** Open without signing in. */
    public?: boolean;
    /** Roles that may open the route; left out means anyone signed in. */
    roles?: Role[];
    /** Shown in the browser tab. */
    title?: string;
  }
}

export const routes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { public: true, title: 'Sign in' },
  },
  { path: '/', name: 'home', component: () => import('@/views/HomeView.vue'), meta: { title: 'Home' } },
  {
    path: '/board',
    name: 'board',
    component: () => import('@/views/BoardView.vue'),
    meta: { roles: rolesWith('board:read'), title: 'Board' },
  },
  {
    path: '/jobs',
    name: 'jobs',
    component: () => import('@/views/JobsView.vue'),
    meta: { roles: rolesWith('jobs:read'), title: 'Jobs' },
  },
  {
    path: '/resources',
    name: 'resources',
    component: () => import('@/views/ResourcesView.vue'),
    meta: { roles: rolesWith('resources:read'), title: 'Resources' },
  },
  {
    path: '/firm',
    name: 'firm',
    component: () => import('@/views/FirmView.vue'),
    meta: { roles: rolesWith('firm:manage'), title: 'Firm' },
  },
  {
    path: '/my-work',
    name: 'my-work',
    component: () => import('@/views/MyWorkView.vue'),
    meta: { roles: rolesWith('my-work:read'), title: 'My work' },
  },
  {
    path: '/slots',
    name: 'slots',
    component: () => import('@/views/PartnerSlotsView.vue'),
    meta: { roles: rolesWith('slots:read'), title: 'Our slots' },
  },
  {
    path: '/jobs/new',
    name: 'job-new',
    component: () => import('@/views/JobFormView.vue'),
    meta: { roles: rolesWith('jobs:write'), title: 'New job' },
  },
  {
    path: '/jobs/:id(\\d+)',
    name: 'job',
    component: () => import('@/views/JobDetailView.vue'),
    meta: { roles: rolesWith('jobs:read'), title: 'Job' },
  },
  {
    path: '/jobs/:id(\\d+)/edit',
    name: 'job-edit',
    component: () => import('@/views/JobFormView.vue'),
    meta: { roles: rolesWith('jobs:write'), title: 'Edit job' },
  },
  {
    path: '/jobs/:id(\\d+)/survey',
    name: 'job-survey',
    component: () => import('@/views/SurveyView.vue'),
    meta: { roles: rolesWith('surveys:write'), title: 'Site survey' },
  },
  // The crew's commissioning record (the office reads and may fill it in too); the server decides who may change it.
  {
    path: '/jobs/:id(\\d+)/commission',
    name: 'job-commission',
    component: () => import('@/views/CommissioningView.vue'),
    meta: { roles: rolesWith('jobs:read'), title: 'Commissioning' },
  },
  // The handover with the householder on the crew's phone; signing takes the progress permission (the server checks it too).
  {
    path: '/jobs/:id(\\d+)/handover',
    name: 'job-handover',
    component: () => import('@/views/HandoverView.vue'),
    meta: { roles: rolesWith('jobs:read'), title: 'Handover' },
  },
  {
    path: '/templates',
    name: 'templates',
    component: () => import('@/views/TemplatesView.vue'),
    meta: { roles: rolesWith('jobs:write'), title: 'Stage templates' },
  },
  {
    path: '/day-sheets',
    name: 'day-sheets',
    component: () => import('@/views/DaySheetView.vue'),
    meta: { roles: rolesWith('day-sheets:read'), title: 'Day sheets' },
  },
  {
    path: '/slots/day-sheets',
    name: 'partner-day-sheets',
    component: () => import('@/views/DaySheetView.vue'),
    meta: { roles: rolesWith('slots:read'), title: 'Day sheets' },
  },
  {
    path: '/reports',
    name: 'reports',
    component: () => import('@/views/ReportsView.vue'),
    meta: { roles: rolesWith('reports:read'), title: 'Reports' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { public: true, title: 'Page not found' },
  },
];

export const router = createRouter({
  history: createWebHistory(import.meta.env.BASE_URL),
  routes,
  scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
});

router.beforeEach(async (to) => {
  const session = useSessionStore();
  try {
    await session.load();
  } catch {
    // The server could not be reached: the sign-in page explains and offers to try again.
    return to.path === '/sign-in' ? true : { path: '/sign-in', query: { error: 'unavailable', next: to.fullPath } };
  }
  return decideNavigation(to, { signedIn: session.signedIn, role: session.role });
});

// A page's code that could not be fetched (a release since this tab opened, or the signal gone):
// the page is loaded afresh once; failing again, it is the server that can't be reached.
router.onError((error, to) => {
  if (!isCodeLoadError(error)) return;
  const loaded = reloadForPage(to.fullPath, {
    storage: sessionStorage,
    load: (path) => window.location.assign(path),
    now: Date.now(),
  });
  // (The waiting page's own code missing too: nothing more to try from here.)
  if (!loaded && to.path !== '/sign-in')
    void router.replace({ path: '/sign-in', query: { error: 'unavailable', next: to.fullPath } });
});

router.afterEach((to) => {
  const title = titleOf(to);
  document.title = title ? `${title} · Waterline` : 'Waterline';
});
