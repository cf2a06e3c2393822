import type { Knex } from 'knex';
import type { SessionInfo } from '../../shared/schemas/session.ts';
import type { FirmKind, Role } from '../../shared/permissions.ts';
import { User } from '../models/index.ts';
import type { Actor } from './actor.ts';

interface MembershipRow {
  firmId: string;
  firmName: string;
  firmKind: FirmKind;
  role: Role;
  timeZone: string;
}

// Sign-in and session look-ups run before there is an actor: they read only the person's own rows.
async function membershipsOf(knex: Knex, userId: string): Promise<MembershipRow[]> {
  return knex('memberships as m')
    .join('firms as f', 'f.id', 'm.firm_id')
    .where('m.user_id', userId)
    .select('f.id as firmId', 'f.name as firmName', 'f.kind as firmKind', 'm.role', 'f.time_zone as timeZone')
    .orderBy('f.name');
}

/** The actor for a session: the person's membership of the firm they are acting for. */
export async function actorFor(knex: Knex, userId: string, firmId: string | undefined): Promise<Actor | null> {
  const rows = await membershipsOf(knex, userId);
  const m = rows.find((r) => r.firmId === firmId) ?? rows[0];
  return m ? { userId, firmId: m.firmId, firmKind: m.firmKind, role: m.role } : null;
}

export interface GoogleProfile {
  sub: string;
  email: string | undefined;
  emailVerified: boolean;
  name: string;
}

/**
 * Finds the Waterline user for a Google account: by its subject, or on first sign-in by the verified
 * e-mail an owner invited. Unknown accounts get no user (and so no access).
 */
export async function userForGoogleProfile(knex: Knex, profile: GoogleProfile): Promise<User | null> {
  return knex.transaction(async (trx) => {
    let user = await User.query(trx).findOne({ googleSub: profile.sub });
    if (!user && profile.email && profile.emailVerified) {
      user = await User.query(trx).whereRaw('lower(email) = lower(?)', [profile.email]).whereNull('google_sub').first();
      if (user) await User.query(trx).patch({ googleSub: profile.sub }).where('id', user.id);
    }
    if (!user) return null;
    const memberships = await membershipsOf(trx, user.id);
    if (memberships.length === 0) return null;
    await User.query(trx).patch({ lastSignInAt: new Date() }).where('id', user.id);
    return user;
  });
}

export async function sessionInfo(knex: Knex, actor: Actor, csrfToken: string): Promise<SessionInfo> {
  const user = await User.query(knex).findById(actor.userId).throwIfNotFound();
  const memberships = await membershipsOf(knex, actor.userId);
  const current = memberships.find((m) => m.firmId === actor.firmId);
  if (!current) throw new Error('active membership vanished');
  return {
    user: { id: user.id, name: user.name, email: user.email },
    firm: { id: current.firmId, name: current.firmName, kind: current.firmKind, timeZone: current.timeZone },
    role: current.role,
    memberships: memberships.map(({ firmId, firmName, firmKind, role }) => ({ firmId, firmName, firmKind, role })),
    csrfToken,
  };
}
