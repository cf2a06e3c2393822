import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { ApiError, api, setCsrfToken } from '@/api/client';
import type { Membership, Role, SessionBody, SessionFirm, SessionUser } from '@/api/types';
import { can as roleCan, homeFor, isRole, type Permission } from '@/router/access';
import { forgetKeptAnswers } from '@/composables/useApiResource';

/** Who is signed in, in which firm and with which role: the one app-wide piece of state. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionUser | null>(null);
  const firm = ref<SessionFirm | null>(null);
  const role = ref<Role | null>(null);
  const memberships = ref<Membership[]>([]);
  const csrfToken = ref<string | null>(null);
  /** True once the server has answered GET /api/session at least once. */
  const loaded = ref(false);

  const signedIn = computed(() => user.value !== null && role.value !== null);
  const home = computed(() => (role.value ? homeFor(role.value) : '/sign-in'));
  const timeZone = computed(() => firm.value?.timeZone ?? 'Europe/London');

  function apply(body: SessionBody | null): void {
    const valid = body !== null && isRole(body.role);
    // Answers kept for a page opened without a signal belong to one person in one firm.
    if (!valid || body.user.id !== user.value?.id || body.firm.id !== firm.value?.id) forgetKeptAnswers();
    user.value = valid ? body.user : null;
    firm.value = valid ? body.firm : null;
    role.value = valid ? body.role : null;
    memberships.value = valid ? body.memberships : [];
    csrfToken.value = valid ? body.csrfToken : null;
    setCsrfToken(csrfToken.value);
    loaded.value = true;
  }

  let pending: Promise<boolean> | null = null;

  /**
   * Fetches the session once (later calls reuse it unless `force`). Resolves true when signed in;
   * a 401 means signed out. Other failures (server down) are thrown for the caller to show.
   */
  function load(options: { force?: boolean } = {}): Promise<boolean> {
    if (loaded.value && !options.force) return Promise.resolve(signedIn.value);
    pending ??= api
      .get<SessionBody>('/api/session', { allowUnauthorized: true })
      .then(
        (body) => {
          apply(body);
          return signedIn.value;
        },
        (error: unknown) => {
          if (error instanceof ApiError && error.status === 401) {
            apply(null);
            return false;
          }
          throw error;
        },
      )
      .finally(() => {
        pending = null;
      });
    return pending;
  }

  /** Makes another of the person's firms the active one; role and navigation follow. */
  async function switchFirm(firmId: Membership['firmId']): Promise<void> {
    apply(await api.put<SessionBody>('/api/session/firm', { firmId }));
  }

  /** Ends the session on the server; the caller then goes to /sign-in. */
  async function signOut(): Promise<void> {
    try {
      await api.post<void>('/auth/sign-out', undefined, { allowUnauthorized: true });
    } catch (error) {
      // Already signed out on the server is the outcome we wanted.
      if (!(error instanceof ApiError && error.status === 401)) throw error;
    }
    apply(null);
  }

  /** Forgets the session without asking the server (after a 401 elsewhere). */
  function reset(): void {
    apply(null);
  }

  function can(permission: Permission): boolean {
    return roleCan(role.value, permission);
  }

  return {
    user,
    firm,
    role,
    memberships,
    csrfToken,
    loaded,
    signedIn,
    home,
    timeZone,
    load,
    switchFirm,
    signOut,
    reset,
    can,
  };
});
