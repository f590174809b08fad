import type { NavigationGuardWithThis, RouteLocationNormalized, Router } from 'vue-router';
import { useSessionStore } from '@/stores/session.store';

/** Returns true when the signed-in role may open every matched record of the route. */
function roleAllows(to: RouteLocationNormalized, role: string | null): boolean {
  return to.matched.every((record) => !record.meta.roles || (role !== null && (record.meta.roles as string[]).includes(role)));
}

/**
 * The app's one navigation guard: resolves the session, sends visitors who are not signed in to
 * the sign-in page (remembering where they wanted to go), keeps signed-in users off the sign-in
 * page, and answers a route their role does not open with the not-found page, which does not
 * reveal whether the page exists. The store is used inside the guard, so Pinia is active by then.
 */
export const sessionGuard: NavigationGuardWithThis<undefined> = async (to) => {
  const session = useSessionStore();
  await session.resolve();

  if (to.meta.public) {
    if (to.name === 'sign-in' && session.isSignedIn) {
      const next = typeof to.query.next === 'string' && to.query.next.startsWith('/') ? to.query.next : '/';
      return next;
    }
    return true;
  }

  if (!session.isSignedIn) {
    return { name: 'sign-in', query: to.fullPath === '/' ? {} : { next: to.fullPath } };
  }

  if (!roleAllows(to, session.role)) {
    return { name: 'not-found', params: { pathMatch: to.path.slice(1).split('/') }, query: to.query, hash: to.hash, replace: true };
  }
  return true;
};

/** Installs the guard and keeps the browser tab's title in step with the page. */
export function installGuards(router: Router): void {
  router.beforeEach(sessionGuard);
  router.afterEach((to) => {
    const title = [...to.matched].reverse().find((record) => record.meta.title)?.meta.title;
    document.title = title ? `${title} · Driftline` : 'Driftline';
  });
}
