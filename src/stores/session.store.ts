import { computed, ref } from 'vue';
import { defineStore } from 'pinia';
import * as authApi from '@/api/auth.api';
import type { Me, Role } from '@/api/types';
import { canManageRobots, isOperatorRole } from '@/domain/roles';

/** The signed-in user, shared by the layout, the guard and every view that checks a role. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<Me | null>(null);
  /** True once the server was asked "who am I?" on this page load. */
  const isResolved = ref(false);
  let pending: Promise<Me | null> | null = null;

  const isSignedIn = computed(() => user.value !== null);
  const role = computed<Role | null>(() => user.value?.role ?? null);
  const isAdmin = computed(() => user.value?.role === 'admin');
  const isOperator = computed(() => (user.value ? isOperatorRole(user.value.role) : false));
  const mayManageRobots = computed(() => (user.value ? canManageRobots(user.value.role) : false));

  /** Asks the server once per page load who is signed in; later calls share the same answer. */
  function resolve(): Promise<Me | null> {
    if (isResolved.value) return Promise.resolve(user.value);
    pending ??= authApi
      .fetchMe()
      .then((me) => {
        user.value = me;
        return me;
      })
      .catch(() => {
        // A server that cannot answer "who am I" leaves the visitor signed out; the sign-in page shows the real error.
        user.value = null;
        return null;
      })
      .finally(() => {
        isResolved.value = true;
        pending = null;
      });
    return pending;
  }

  async function signIn(email: string, password: string): Promise<Me> {
    const me = await authApi.signIn(email, password);
    setUser(me);
    return me;
  }

  /** Remembers a user the server has just signed in (sign-in, accepted invitation). */
  function setUser(me: Me): void {
    user.value = me;
    isResolved.value = true;
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut();
    } finally {
      clearLocal();
    }
  }

  /** Forgets the user without asking the server (used when the server already ended the session). */
  function clearLocal(): void {
    user.value = null;
    isResolved.value = true;
  }

  return { user, isResolved, isSignedIn, role, isAdmin, isOperator, mayManageRobots, resolve, signIn, setUser, signOut, clearLocal };
});
