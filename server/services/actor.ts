import type { FirmKind, Role } from '../../shared/permissions.ts';

/** The signed-in person acting for one firm in one role: every service call takes one. */
export interface Actor {
  userId: string;
  firmId: string;
  firmKind: FirmKind;
  role: Role;
}

/** Installer office roles see their whole firm and its partners; the rest see only their own share. */
export type Reach = 'installer-office' | 'crew' | 'partner';

export function reachOf(actor: Actor): Reach {
  if (actor.firmKind !== 'installer') return 'partner';
  if (actor.role === 'crew') return 'crew';
  if (actor.role === 'partner') return 'partner';
  return 'installer-office';
}
