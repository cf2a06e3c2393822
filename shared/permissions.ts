/**
 * Who may do what. The server enforces these on every route (refused by default); the client uses
 * the same table to hide what a role cannot do.
 */
export const ROLES = ['owner', 'scheduler', 'manager', 'crew', 'partner', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

export const FIRM_KINDS = ['installer', 'groundworks', 'plant_hire', 'crane_hire', 'haulage', 'electrical'] as const;
export type FirmKind = (typeof FIRM_KINDS)[number];

const OFFICE: Role[] = ['owner', 'scheduler', 'manager', 'viewer'];

export const PERMISSIONS = {
  /** The board, jobs, resources and firms of one's own firm and its partners. */
  'board:read': OFFICE,
  'jobs:read': OFFICE,
  'jobs:write': ['owner', 'scheduler'],
  'resources:read': [...OFFICE, 'crew', 'partner'],
  'resources:write': ['owner', 'scheduler'],
  'firms:read': [...OFFICE, 'partner'],
  'bookings:read': [...OFFICE, 'crew', 'partner'],
  'bookings:write': ['owner', 'scheduler'],
  /** A partner firm's coordinator answers the requests for its own resources. */
  'bookings:answer': ['partner'],
  /** Crew mark their own bookings on site and done. */
  'bookings:progress': ['crew', 'owner', 'scheduler'],
  'units:read': OFFICE,
  /** Site surveys: the office reads them; whoever stands in the garden (often a crew) fills them in. */
  'surveys:read': [...OFFICE, 'crew'],
  'surveys:write': ['owner', 'scheduler', 'crew'],
  'hire:read': ['owner', 'scheduler', 'manager'],
  'hire:approve': ['owner', 'manager'],
  'reports:read': ['owner', 'manager'],
  'audit:read': ['owner', 'manager'],
  'firm:manage': ['owner'],
  /** A crew member's own assignments; a partner coordinator's own firm's slots. */
  'my-work:read': ['crew'],
  'slots:read': ['partner'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

/** True when `role` holds `permission`. */
export function may(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

/** Where each role lands after signing in. */
export function homeFor(role: Role): string {
  if (role === 'crew') return '/my-work';
  if (role === 'partner') return '/slots';
  return '/board';
}
