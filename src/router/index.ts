import { createRouter, createWebHistory, type RouteRecordRaw } from 'vue-router';
import { installGuards } from './guards';

/** The app's routes: every view is lazy, every route is named, roles live in meta. */
export const routes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { public: true, layout: 'bare', title: 'Sign in' },
  },
  {
    path: '/invite/:token',
    name: 'invite-accept',
    component: () => import('@/views/InviteAcceptView.vue'),
    props: true,
    meta: { public: true, layout: 'bare', title: 'Accept invitation' },
  },
  {
    path: '/reset',
    name: 'password-forgot',
    component: () => import('@/views/PasswordForgotView.vue'),
    meta: { public: true, layout: 'bare', title: 'Forgot password' },
  },
  {
    path: '/reset/:token',
    name: 'password-reset',
    component: () => import('@/views/PasswordResetView.vue'),
    props: true,
    meta: { public: true, layout: 'bare', title: 'Choose a new password' },
  },
  {
    path: '/',
    name: 'fleet-overview',
    component: () => import('@/views/FleetOverviewView.vue'),
    meta: { title: 'Fleet overview' },
  },
  {
    path: '/safety-caution',
    name: 'safety-caution',
    component: () => import('@/views/SafetyCautionView.vue'),
    meta: { title: 'What Driftline does not certify' },
  },
  {
    path: '/sites/:siteId',
    component: () => import('@/views/SiteView.vue'),
    props: true,
    children: [
      {
        path: '',
        name: 'site-overview',
        component: () => import('@/views/SiteOverviewView.vue'),
        props: true,
        meta: { title: 'Site' },
      },
      {
        path: 'map',
        name: 'site-map',
        component: () => import('@/views/SiteMapView.vue'),
        props: true,
        meta: { title: 'Map' },
      },
      {
        path: 'zones',
        name: 'site-zones',
        component: () => import('@/views/SiteZonesView.vue'),
        props: true,
        meta: { title: 'Zones' },
      },
      {
        path: 'robots',
        name: 'site-robots',
        component: () => import('@/views/SiteRobotsView.vue'),
        props: true,
        meta: { title: 'Robots' },
      },
      {
        path: 'remaps',
        name: 'site-remaps',
        component: () => import('@/views/SiteRemapsView.vue'),
        props: true,
        meta: { title: 'Remaps' },
      },
      {
        path: 'remaps/:remapId',
        name: 'site-remap',
        component: () => import('@/views/SiteRemapView.vue'),
        props: true,
        meta: { title: 'Remap request' },
      },
      {
        path: 'docking',
        name: 'site-docking',
        component: () => import('@/views/SiteDockingView.vue'),
        props: true,
        meta: { title: 'Docking' },
      },
      {
        path: 'docking/:stationId',
        name: 'site-docking-station',
        component: () => import('@/views/SiteDockingStationView.vue'),
        props: true,
        meta: { title: 'Docking station' },
      },
      {
        path: 'maps',
        name: 'site-maps',
        component: () => import('@/views/SiteMapVersionsView.vue'),
        props: true,
        meta: { title: 'Map versions' },
      },
      {
        path: 'scans',
        name: 'site-scans',
        component: () => import('@/views/SiteScanLogsView.vue'),
        props: true,
        meta: { title: 'Scan logs' },
      },
      {
        path: 'settings',
        name: 'site-settings',
        component: () => import('@/views/SiteSettingsView.vue'),
        props: true,
        meta: { title: 'Settings' },
      },
    ],
  },
  {
    path: '/remaps',
    name: 'remaps-calendar',
    component: () => import('@/views/RemapsCalendarView.vue'),
    meta: { title: 'Remaps calendar' },
  },
  {
    path: '/reports',
    name: 'reports',
    component: () => import('@/views/ReportsView.vue'),
    meta: { roles: ['admin', 'site_manager', 'viewer'], title: 'Reports' },
  },
  {
    path: '/reports/:orgId/:month(\\d{4}-\\d{2})',
    name: 'report-month',
    component: () => import('@/views/ReportMonthView.vue'),
    props: true,
    meta: { roles: ['admin', 'site_manager', 'viewer'], title: 'Monthly report' },
  },
  {
    path: '/unsubscribe/:token',
    name: 'unsubscribe',
    component: () => import('@/views/UnsubscribeView.vue'),
    props: true,
    meta: { public: true, layout: 'bare', title: 'Unsubscribe' },
  },
  {
    path: '/admin',
    component: () => import('@/views/AdminView.vue'),
    meta: { roles: ['admin'], title: 'Admin' },
    children: [
      { path: '', name: 'admin', redirect: { name: 'admin-users' } },
      { path: 'users', name: 'admin-users', component: () => import('@/views/AdminUsersView.vue'), meta: { title: 'Users' } },
      {
        path: 'organizations',
        name: 'admin-organizations',
        component: () => import('@/views/AdminOrganizationsView.vue'),
        meta: { title: 'Organizations' },
      },
      {
        path: 'invitations',
        name: 'admin-invitations',
        component: () => import('@/views/AdminInvitationsView.vue'),
        meta: { title: 'Invitations' },
      },
      { path: 'outbox', name: 'admin-outbox', component: () => import('@/views/AdminOutboxView.vue'), meta: { title: 'Outbox' } },
      { path: 'job-runs', name: 'admin-job-runs', component: () => import('@/views/AdminJobRunsView.vue'), meta: { title: 'Job runs' } },
      { path: 'audit', name: 'admin-audit', component: () => import('@/views/AdminAuditView.vue'), meta: { title: 'Audit log' } },
    ],
  },
  {
    path: '/account',
    name: 'account',
    component: () => import('@/views/AccountView.vue'),
    meta: { title: 'Your account' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { title: 'Page not found' },
  },
];

/** Creates the app's router with its guard installed. */
export function createAppRouter() {
  const router = createRouter({
    history: createWebHistory(),
    routes,
    scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
  });
  installGuards(router);
  return router;
}
