/**
 * Who may see what in the client. The server enforces every rule again; this table only
 * decides what the app shows, so a role never meets a page or a button it cannot use.
 */
import type { Role } from '@/api/types';
import { homeFor, may, type Permission as SharedPermission } from '@shared/permissions';

export const ALL_ROLES: readonly Role[] = ['owner', 'scheduler', 'manager', 'crew', 'partner', 'viewer'];

/** Client and server share one permission table (shared/permissions.ts). */
export type Permission = SharedPermission;

/** @example can('viewer', 'jobs:write') // false */
export function can(role: Role | null | undefined, permission: Permission): boolean {
  return role ? may(role, permission) : false;
}

/** The roles holding a permission, for a route's `meta.roles`. @example rolesWith('firm:manage') // ['owner'] */
export function rolesWith(permission: Permission): Role[] {
  return ALL_ROLES.filter((role) => may(role, permission));
}

/** Where each role lands after sign-in, and where it is sent from a page it may not see. */
export { homeFor };

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ALL_ROLES as readonly string[]).includes(value);
}

export interface NavItem {
  label: string;
  path: string;
  permission: Permission;
}

/** The main navigation, in the order it is shown. */
export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'My work', path: '/my-work', permission: 'my-work:read' },
  { label: 'Our slots', path: '/slots', permission: 'slots:read' },
  { label: 'Board', path: '/board', permission: 'board:read' },
  { label: 'Jobs', path: '/jobs', permission: 'jobs:read' },
  { label: 'Resources', path: '/resources', permission: 'resources:read' },
  { label: 'Day sheets', path: '/day-sheets', permission: 'day-sheets:read' },
  // A partner firm's own day sheet, from its slots: the same page over its own API.
  { label: 'Day sheets', path: '/slots/day-sheets', permission: 'slots:read' },
  { label: 'Templates', path: '/templates', permission: 'jobs:write' },
  { label: 'Reports', path: '/reports', permission: 'reports:read' },
  { label: 'Firm', path: '/firm', permission: 'firm:manage' },
];

/** @example navFor('viewer').map((item) => item.label) // ['Board', 'Jobs'] */
export function navFor(role: Role | null | undefined): NavItem[] {
  return NAV_ITEMS.filter((item) => can(role, item.permission));
}

export interface AccessMeta {
  public?: boolean;
  roles?: readonly Role[];
}

/** Whether a role may open a route. Routes without `meta.roles` are open to anyone signed in. */
export function mayVisit(meta: AccessMeta, role: Role | null | undefined): boolean {
  if (meta.public) return true;
  if (!role) return false;
  return meta.roles ? meta.roles.includes(role) : true;
}

/**
 * Keeps `?next=` to paths inside this app, so a crafted sign-in link cannot send anyone elsewhere.
 * @example safeNext('//elsewhere.example') // null
 */
export function safeNext(next: unknown): string | null {
  if (typeof next !== 'string' || !next.startsWith('/')) return null;
  if (next.startsWith('//') || next.startsWith('/\\') || next.startsWith('/sign-in')) return null;
  return next;
}

export interface GuardTarget {
  path: string;
  fullPath: string;
  meta: AccessMeta;
  query?: Record<string, unknown>;
}
export interface GuardSession {
  signedIn: boolean;
  role: Role | null;
}
export type GuardDecision = true | { path: string; query?: Record<string, string> };

/**
 * The router guard's rules as a pure function.
 * - Signed out: public routes open; anything else goes to /sign-in?next=<where they were going>.
 * - Signed in: /sign-in and / lead to `next` or the role's home; a route the role may not see
 *   leads to the role's home.
 */
export function decideNavigation(to: GuardTarget, session: GuardSession): GuardDecision {
  const role = session.signedIn ? session.role : null;
  if (!role) {
    if (to.meta.public) return true;
    return to.fullPath === '/' ? { path: '/sign-in' } : { path: '/sign-in', query: { next: to.fullPath } };
  }
  if (to.path === '/sign-in') return { path: safeNext(to.query?.next) ?? homeFor(role) };
  if (to.path === '/') return { path: homeFor(role) };
  return mayVisit(to.meta, role) ? true : { path: homeFor(role) };
}

/**
 * The tab's title for a page: its own, or what the sign-in page is showing when it is waiting
 * for the server (a tab left on it should not read "Sign in" to someone who is signed in).
 * @example titleOf({ meta: { title: 'Sign in' }, query: { error: 'unavailable' } }) // 'Waiting for a connection'
 */
export function titleOf(to: { meta: { title?: string }; query: Record<string, unknown> }): string {
  if (to.meta.title === 'Sign in' && to.query.error === 'unavailable') return 'Waiting for a connection';
  return to.meta.title ?? '';
}
