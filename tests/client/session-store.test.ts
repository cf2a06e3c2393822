import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { setUnauthorizedHandler } from '@/api/client';
import type { SessionBody } from '@/api/types';
import { useSessionStore } from '@/stores/session';
import { stubFetch, type SentRequest } from './fake-fetch';

// An invented scenario: one person who schedules for an installer and also owns a groundworks firm.
const installer: SessionBody = {
  user: { id: 11, name: 'Ffion Marsh', email: 'ffion@tidewell-spas.example' },
  firm: { id: 1, name: 'Tidewell Spas', kind: 'installer', timeZone: 'Europe/London' },
  role: 'scheduler',
  memberships: [
    { firmId: 1, firmName: 'Tidewell Spas', firmKind: 'installer', role: 'scheduler' },
    { firmId: 2, firmName: 'Marsh Groundworks', firmKind: 'groundworker', role: 'owner' },
  ],
  csrfToken: 'csrf-installer',
};
const groundworks: SessionBody = {
  ...installer,
  firm: { id: 2, name: 'Marsh Groundworks', kind: 'groundworker', timeZone: 'Europe/London' },
  role: 'owner',
  csrfToken: 'csrf-groundworks',
};

let sent: SentRequest[];
let signedIn: boolean;

beforeEach(() => {
  setActivePinia(createPinia());
  setUnauthorizedHandler(() => {});
  signedIn = true;
  sent = stubFetch((request) => {
    if (request.url === '/api/session')
      return signedIn ? { status: 200, body: installer } : { status: 401, body: { title: 'Please sign in' } };
    if (request.url === '/api/session/firm') return { status: 200, body: groundworks };
    if (request.url === '/auth/sign-out') return { status: 204 };
    return { status: 404, body: { title: 'Not found' } };
  });
});
afterEach(() => {
  vi.unstubAllGlobals();
});

describe('useSessionStore', () => {
  describe('when signed in', () => {
    it('loads the person, firm, role and memberships', async () => {
      const session = useSessionStore();
      await expect(session.load()).resolves.toBe(true);
      expect(session.user?.name).toBe('Ffion Marsh');
      expect(session.firm?.name).toBe('Tidewell Spas');
      expect(session.role).toBe('scheduler');
      expect(session.memberships).toHaveLength(2);
      expect(session.csrfToken).toBe('csrf-installer');
      expect(session.home).toBe('/board');
    });

    it('asks the server once, however many guards call load', async () => {
      const session = useSessionStore();
      await Promise.all([session.load(), session.load()]);
      await session.load();
      expect(sent.filter((r) => r.url === '/api/session')).toHaveLength(1);
      await session.load({ force: true });
      expect(sent.filter((r) => r.url === '/api/session')).toHaveLength(2);
    });

    it('answers can() from the role', async () => {
      const session = useSessionStore();
      await session.load();
      expect(session.can('board:read')).toBe(true);
      expect(session.can('firm:manage')).toBe(false);
    });
  });

  describe('when signed out', () => {
    it('treats 401 as an answer, not a failure', async () => {
      signedIn = false;
      const session = useSessionStore();
      await expect(session.load()).resolves.toBe(false);
      expect(session.signedIn).toBe(false);
      expect(session.loaded).toBe(true);
      expect(session.can('board:read')).toBe(false);
    });
  });

  describe('switchFirm', () => {
    it('sends the firm with the CSRF token and takes the new role', async () => {
      const session = useSessionStore();
      await session.load();
      await session.switchFirm(2);
      const put = sent.find((r) => r.url === '/api/session/firm');
      expect(put?.method).toBe('PUT');
      expect(put?.body).toEqual({ firmId: 2 });
      expect(put?.headers['X-CSRF-Token']).toBe('csrf-installer');
      expect(session.firm?.name).toBe('Marsh Groundworks');
      expect(session.role).toBe('owner');
      expect(session.can('firm:manage')).toBe(true);
      expect(session.csrfToken).toBe('csrf-groundworks');
    });
  });

  describe('signOut', () => {
    it('posts with the CSRF token and forgets the session', async () => {
      const session = useSessionStore();
      await session.load();
      await session.signOut();
      const post = sent.find((r) => r.url === '/auth/sign-out');
      expect(post?.method).toBe('POST');
      expect(post?.headers['X-CSRF-Token']).toBe('csrf-installer');
      expect(session.user).toBeNull();
      expect(session.role).toBeNull();
      expect(session.csrfToken).toBeNull();
      expect(session.memberships).toEqual([]);
    });
  });

  it('refuses a session whose role the client does not know', async () => {
    vi.unstubAllGlobals();
    stubFetch(() => ({ status: 200, body: { ...installer, role: 'superuser' } }));
    const session = useSessionStore();
    await expect(session.load()).resolves.toBe(false);
    expect(session.user).toBeNull();
  });
});
