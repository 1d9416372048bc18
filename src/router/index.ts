import { createRouter, createWebHistory, type RouteLocationNormalized, type RouteLocationRaw, type RouteRecordRaw } from 'vue-router';
import type { Role } from '@shared/types/api';
import { setUnauthenticatedHandler } from '@/api/http';
import { useAuthStore } from '@/stores/auth';
import { useClubStore } from '@/stores/club';

declare module 'vue-router' {
  interface RouteMeta {
    /** The page title shown in the layout header and the browser tab. */
    title?: string;
    /** Reachable without signing in (sign-in, sign-up). */
    public?: boolean;
    /** Roles in the club in view that may open the page; absent means every member. */
    roles?: readonly Role[];
  }
}

const STAFF: readonly Role[] = ['admin', 'coach'];
const ADMIN: readonly Role[] = ['admin'];
const ATHLETE: readonly Role[] = ['athlete'];

const routes: RouteRecordRaw[] = [
  {
    path: '/signin',
    name: 'signin',
    component: () => import('@/views/SignInView.vue'),
    meta: { title: 'Sign in', public: true },
  },
  {
    path: '/signup',
    name: 'signup',
    component: () => import('@/views/SignUpView.vue'),
    meta: { title: 'Sign up', public: true },
  },
  {
    path: '/join/:token',
    name: 'join',
    component: () => import('@/views/JoinView.vue'),
    props: true,
    meta: { title: 'Join a club', public: true },
  },
  {
    path: '/reset-password/:token',
    name: 'reset-password',
    component: () => import('@/views/ResetPasswordView.vue'),
    props: true,
    meta: { title: 'Choose a new password', public: true },
  },
  {
    path: '/',
    component: () => import('@/layout/AppLayout.vue'),
    children: [
      { path: '', name: 'overview', component: () => import('@/views/OverviewView.vue'), meta: { title: 'Overview' } },
      {
        path: 'my-flights',
        name: 'my-flights',
        component: () => import('@/views/MyFlightsView.vue'),
        meta: { title: 'My flights', roles: ATHLETE },
      },
      {
        path: 'squad/athletes/:athleteId(\\d+)',
        name: 'athlete',
        component: () => import('@/views/AthleteView.vue'),
        meta: { title: 'Athlete', roles: STAFF },
      },
      {
        path: 'squad',
        name: 'squad',
        component: () => import('@/views/SquadView.vue'),
        meta: { title: 'Squad', roles: STAFF },
      },
      {
        path: 'club',
        name: 'club',
        component: () => import('@/views/ClubView.vue'),
        meta: { title: 'Club', roles: ADMIN },
      },
      {
        path: 'billing',
        name: 'billing',
        component: () => import('@/views/BillingView.vue'),
        meta: { title: 'Seats & billing', roles: ADMIN },
      },
      {
        path: 'sessions',
        name: 'sessions',
        component: () => import('@/views/SessionsView.vue'),
        meta: { title: 'Sessions' },
      },
      {
        path: 'sessions/:sessionId(\\d+)',
        name: 'session',
        component: () => import('@/views/SessionView.vue'),
        props: true,
        meta: { title: 'Session' },
      },
      {
        path: 'clips',
        name: 'clips',
        component: () => import('@/views/ClipsView.vue'),
        meta: { title: 'Clips' },
      },
      {
        path: 'clips/:clipId(\\d+)',
        name: 'clip',
        component: () => import('@/views/ClipView.vue'),
        props: true,
        meta: { title: 'Clip' },
      },
      {
        path: 'clips/:clipId(\\d+)/trace',
        name: 'trace',
        component: () => import('@/views/TraceView.vue'),
        props: true,
        meta: { title: 'Trace' },
      },
      {
        path: 'flights',
        name: 'flights',
        component: () => import('@/views/FlightsView.vue'),
        meta: { title: 'Flights' },
      },
      {
        path: 'flights/:flightId(\\d+)',
        name: 'flight-report',
        component: () => import('@/views/FlightReportView.vue'),
        props: true,
        meta: { title: 'Flight report' },
      },
      {
        path: 'sessions/:sessionId(\\d+)/report',
        name: 'session-report',
        component: () => import('@/views/SessionReportView.vue'),
        props: true,
        meta: { title: 'Session report' },
      },
      {
        path: 'progress',
        name: 'progress',
        component: () => import('@/views/ProgressView.vue'),
        meta: { title: 'Progress' },
      },
      {
        path: 'planner',
        name: 'planner',
        component: () => import('@/views/PlannerView.vue'),
        meta: { title: 'Planner' },
      },
      {
        path: ':pathMatch(.*)*',
        name: 'not-found',
        component: () => import('@/views/NotFoundView.vue'),
        meta: { title: 'Not found' },
      },
    ],
  },
];

const router = createRouter({
  history: createWebHistory(import.meta.env.BASE_URL),
  routes,
  scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
});

/** Only a path of this app may be a redirect target (never another origin). */
export function safeRedirect(value: unknown): string | null {
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null;
  return value;
}

/**
 * Starts fetching the page chunks (`() => import(...)`) of `to` at once, so that on the first load they travel
 * while the session is checked rather than after it; the router awaits the same (cached) module promises later.
 */
function startLoadingPages(to: RouteLocationNormalized): void {
  for (const record of to.matched) {
    for (const component of Object.values(record.components ?? {})) {
      const isLoader = typeof component === 'function' && !('displayName' in component) && !('props' in component) && !('__vccOpts' in component);
      // A failed load is reported by the router when it awaits the same import.
      if (isLoader) (component as () => Promise<unknown>)().catch(() => undefined);
    }
  }
}

router.beforeEach(async (to): Promise<boolean | RouteLocationRaw> => {
  const auth = useAuthStore();
  if (!auth.loaded) {
    startLoadingPages(to);
    try {
      await auth.loadMe();
    } catch {
      // The server did not answer: treat the visitor as signed out; the sign-in form reports the problem on submit.
    }
  }

  if (to.meta.public) {
    if (auth.isSignedIn && (to.name === 'signin' || to.name === 'signup')) {
      return safeRedirect(to.query.redirect) ?? { name: 'overview' };
    }
    return true;
  }

  if (!auth.isSignedIn) {
    return to.fullPath === '/' ? { name: 'signin' } : { name: 'signin', query: { redirect: to.fullPath } };
  }

  // A link that names a club (the payment provider's return links do) opens it in that club, if the user is a member.
  const linkedClub = Number(to.query.club);
  if (Number.isInteger(linkedClub) && linkedClub > 0) useClubStore().switchClub(linkedClub);

  // An athlete's start is My flights; the staff's is the Overview.
  const clubStore = useClubStore();
  if (to.name === 'overview' && clubStore.role === 'athlete') return { name: 'my-flights' };
  const roles = to.meta.roles;
  if (roles && !clubStore.hasRole(roles)) return { name: 'overview' };
  return true;
});

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Arcwright` : 'Arcwright';
});

// The server ended the session (expired, signed out elsewhere): forget the user and ask for a sign-in,
// coming back to the same page afterwards.
setUnauthenticatedHandler(() => {
  const auth = useAuthStore();
  const wasSignedIn = auth.isSignedIn;
  auth.forget();
  const current = router.currentRoute.value;
  if (wasSignedIn && !current.meta.public) {
    void router.push({ name: 'signin', query: { redirect: current.fullPath, ended: '1' } });
  }
});

export default router;
