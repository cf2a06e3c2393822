import { describe, expect, it } from 'vitest';
import type { Role } from '@/api/types';
import {
  ALL_ROLES,
  can,
  decideNavigation,
  homeFor,
  mayVisit,
  navFor,
  rolesWith,
  safeNext,
  titleOf,
} from '@/router/access';

const navLabels = (role: Role) => navFor(role).map((item) => item.label);

describe('navigation by role', () => {
  it('gives each role the places agreed for it', () => {
    expect(navLabels('owner')).toEqual(['Board', 'Jobs', 'Resources', 'Day sheets', 'Templates', 'Reports', 'Firm']);
    expect(navLabels('scheduler')).toEqual(['Board', 'Jobs', 'Resources', 'Day sheets', 'Templates']);
    expect(navLabels('manager')).toEqual(['Board', 'Jobs', 'Resources', 'Day sheets', 'Reports']);
    expect(navLabels('viewer')).toEqual(['Board', 'Jobs', 'Resources', 'Day sheets']);
    // Crews see the board, the jobs and resources of their own bookings; partner firms only their own slots, people and day sheet.
    expect(navLabels('crew')).toEqual(['My work', 'Board', 'Jobs', 'Resources', 'Day sheets']);
    expect(navLabels('partner')).toEqual(['Our slots', 'Resources', 'Day sheets']);
    expect(navFor('partner').find((item) => item.label === 'Day sheets')?.path).toBe('/slots/day-sheets');
    expect(navFor('crew').find((item) => item.label === 'Day sheets')?.path).toBe('/day-sheets');
  });

  it('gives no navigation without a role', () => {
    expect(navFor(null)).toEqual([]);
  });

  it("puts every role's home inside its own navigation", () => {
    for (const role of ALL_ROLES) expect(navFor(role).map((item) => item.path)).toContain(homeFor(role));
  });
});

describe('homeFor', () => {
  it('sends office roles to the board, crews to their work and partners to their slots', () => {
    expect(ALL_ROLES.map((role) => [role, homeFor(role)])).toEqual([
      ['owner', '/board'],
      ['scheduler', '/board'],
      ['manager', '/board'],
      ['crew', '/my-work'],
      ['partner', '/slots'],
      ['viewer', '/board'],
    ]);
  });
});

describe('can', () => {
  it('lets a viewer look at jobs but not change them', () => {
    expect(can('viewer', 'jobs:read')).toBe(true);
    expect(can('viewer', 'jobs:write')).toBe(false);
  });
  it('shows the firm and its people to owners only', () => {
    expect(rolesWith('firm:manage')).toEqual(['owner']);
    expect(can(null, 'board:read')).toBe(false);
  });
});

describe('mayVisit', () => {
  const firmPage = { roles: rolesWith('firm:manage') };
  it('opens a route to the roles it lists', () => {
    expect(mayVisit(firmPage, 'owner')).toBe(true);
    expect(mayVisit(firmPage, 'scheduler')).toBe(false);
  });
  it('opens public routes to anyone and unlisted routes to anyone signed in', () => {
    expect(mayVisit({ public: true }, null)).toBe(true);
    expect(mayVisit({}, 'crew')).toBe(true);
    expect(mayVisit({}, null)).toBe(false);
  });
});

describe('safeNext', () => {
  it('keeps paths inside the app', () => {
    expect(safeNext('/jobs?status=planned')).toBe('/jobs?status=planned');
  });
  it('refuses other sites, odd values and the sign-in page itself', () => {
    expect(safeNext('https://elsewhere.example/')).toBeNull();
    expect(safeNext('//elsewhere.example/')).toBeNull();
    expect(safeNext('/\\elsewhere.example')).toBeNull();
    expect(safeNext('/sign-in?next=/jobs')).toBeNull();
    expect(safeNext(['/jobs'])).toBeNull();
  });
});

describe('decideNavigation', () => {
  const to = (fullPath: string, meta = {}, query: Record<string, unknown> = {}) => ({
    path: fullPath.split('?')[0] ?? fullPath,
    fullPath,
    meta,
    query,
  });
  const signedOut = { signedIn: false, role: null };
  const as = (role: Role) => ({ signedIn: true, role });

  describe('when signed out', () => {
    it('sends to sign-in and remembers where the person was going', () => {
      expect(decideNavigation(to('/jobs?page=2', { roles: rolesWith('jobs:read') }), signedOut)).toEqual({
        path: '/sign-in',
        query: { next: '/jobs?page=2' },
      });
    });
    it('leaves next out for the front page', () => {
      expect(decideNavigation(to('/'), signedOut)).toEqual({ path: '/sign-in' });
    });
    it('lets public pages open', () => {
      expect(decideNavigation(to('/sign-in', { public: true }), signedOut)).toBe(true);
    });
  });

  describe('when signed in', () => {
    it("sends the front page to the role's home", () => {
      expect(decideNavigation(to('/'), as('crew'))).toEqual({ path: '/my-work' });
      expect(decideNavigation(to('/'), as('partner'))).toEqual({ path: '/slots' });
    });
    it('moves away from sign-in, to next when it is safe', () => {
      expect(decideNavigation(to('/sign-in', { public: true }, { next: '/resources' }), as('manager'))).toEqual({
        path: '/resources',
      });
      expect(
        decideNavigation(to('/sign-in', { public: true }, { next: '//elsewhere.example' }), as('manager')),
      ).toEqual({ path: '/board' });
    });
    it('sends a role that may not see a page to its home', () => {
      expect(decideNavigation(to('/firm', { roles: rolesWith('firm:manage') }), as('scheduler'))).toEqual({
        path: '/board',
      });
      expect(decideNavigation(to('/reports', { roles: rolesWith('reports:read') }), as('crew'))).toEqual({
        path: '/my-work',
      });
      expect(decideNavigation(to('/board', { roles: rolesWith('board:read') }), as('partner'))).toEqual({
        path: '/slots',
      });
      expect(decideNavigation(to('/jobs', { roles: rolesWith('jobs:read') }), as('partner'))).toEqual({
        path: '/slots',
      });
    });
    it('lets a role open what it may see', () => {
      expect(decideNavigation(to('/firm', { roles: rolesWith('firm:manage') }), as('owner'))).toBe(true);
    });
  });
});

describe("the tab's title", () => {
  it("is the page's own, and says the sign-in page is waiting when the server can't be reached", () => {
    expect(titleOf({ meta: { title: 'My work' }, query: {} })).toBe('My work');
    expect(titleOf({ meta: { title: 'Sign in' }, query: {} })).toBe('Sign in');
    expect(titleOf({ meta: { title: 'Sign in' }, query: { error: 'denied' } })).toBe('Sign in');
    expect(titleOf({ meta: { title: 'Sign in' }, query: { error: 'unavailable' } })).toBe('Waiting for a connection');
    expect(titleOf({ meta: {}, query: {} })).toBe('');
  });
});
