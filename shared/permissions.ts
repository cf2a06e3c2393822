/**
 * Who may do what. The server enforces these on every route (refused by default), and every
 * permission here is the access rule of at least one route (tests/server/access.test.ts checks
 * both ways); the client uses the same table to hide what a role cannot do. Which rows and fields a
 * permitted reader then gets is server/services/read-policy.ts's and the model scopes' business.
 */
export const ROLES = ['owner', 'scheduler', 'manager', 'crew', 'partner', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

/** Each role in words, as every page and e-mail says it. */
export const ROLE_LABELS: Record<Role, string> = {
  owner: 'Owner',
  scheduler: 'Scheduler',
  manager: 'Installation manager',
  crew: 'Crew',
  partner: 'Partner firm',
  viewer: 'Viewer',
};

export const FIRM_KINDS = ['installer', 'groundworks', 'plant_hire', 'crane_hire', 'haulage', 'electrical'] as const;
export type FirmKind = (typeof FIRM_KINDS)[number];

const OFFICE: Role[] = ['owner', 'scheduler', 'manager', 'viewer'];

/**
 * The roles a firm of a kind gives its people: an installer its office and crew; a partner firm
 * (groundworks, plant, crane, haulage, electrical) its owner and the coordinators who answer the
 * installers' requests. A partner role inside an installer, or a scheduler inside a partner firm,
 * would read the board as neither.
 *
 * @example rolesForFirmKind('electrical') // ['owner', 'partner']
 */
export function rolesForFirmKind(kind: FirmKind): readonly Role[] {
  return kind === 'installer' ? ['owner', 'scheduler', 'manager', 'crew', 'viewer'] : ['owner', 'partner'];
}

export const PERMISSIONS = {
  /** The board and its live stream: the office sees its whole firm, crew only their own rows. */
  'board:read': [...OFFICE, 'crew'],
  /** Jobs of one's own firm: the office all of them, crew the ones they are booked on (no householder e-mail or phone). */
  'jobs:read': [...OFFICE, 'crew'],
  'jobs:write': ['owner', 'scheduler'],
  /** Resources: the office its own and its partners', crew the rows they work as, a partner firm its own. */
  'resources:read': [...OFFICE, 'crew', 'partner'],
  'firms:read': [...OFFICE, 'partner'],
  /** The bookings API (lists and single bookings of the firm's jobs). Crew read theirs through My work. */
  'bookings:read': OFFICE,
  /** The manager fixes what the reports find (a hire clash, idle hire) on the board. */
  'bookings:write': ['owner', 'scheduler', 'manager'],
  /**
   * The firm's own crews, people and machines: add one, take one off the books, mark time away
   * (holidays, sickness, a machine off the road) or close the firm for a few days; a partner firm its own.
   */
  'resources:write': ['owner', 'scheduler', 'manager', 'partner'],
  /** A partner firm's coordinator answers the requests for its own resources. */
  'bookings:answer': ['partner'],
  /** Crew mark their own bookings on site and done. */
  'bookings:progress': ['crew', 'owner', 'scheduler'],
  /** Day sheets of the installer's own people: the office all of them, crew their own. */
  'day-sheets:read': [...OFFICE, 'crew'],
  'units:read': OFFICE,
  /** Site surveys: the office reads them; whoever stands in the garden (often a crew) fills them in. */
  'surveys:read': [...OFFICE, 'crew'],
  'surveys:write': ['owner', 'scheduler', 'crew'],
  'hire:approve': ['owner', 'manager'],
  /** Money from the householder (deposit, balance, the job's price): the office only; crew and partners never see it. */
  'payments:read': OFFICE,
  'payments:write': ['owner', 'scheduler', 'manager'],
  'reports:read': ['owner', 'manager'],
  /** E-mails that did not go (job page, Reports), and sending one again: the office roles that plan. */
  'mail:read': ['owner', 'scheduler', 'manager'],
  'mail:resend': ['owner', 'scheduler', 'manager'],
  'firm:manage': ['owner'],
  /** A crew member's own assignments, with what each visit needs. */
  'my-work:read': ['crew'],
  /** A partner coordinator's own firm's slots (sent, confirmed, on site) and their day sheet. */
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
