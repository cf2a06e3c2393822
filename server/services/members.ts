import type { Knex } from 'knex';
import { ROLE_LABELS, rolesForFirmKind, type Role } from '../../shared/permissions.ts';
import type { ChangeMemberRole } from '../../shared/schemas/session.ts';
import { BadRequestError, ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';

export interface MemberView {
  userId: string;
  name: string;
  email: string;
  role: Role;
}

/**
 * Refuses (400, field `role`) a role the actor's kind of firm does not give its people
 * (rolesForFirmKind): for an invitation and for a change of role alike.
 */
export function assertRoleOfFirm(actor: Actor, role: Role): void {
  const roles = rolesForFirmKind(actor.firmKind);
  if (!roles.includes(role))
    throw new BadRequestError(`A firm of this kind has no ${role} role.`, [
      { field: 'role', message: `must be one of ${roles.join(', ')} for this firm` },
    ]);
}

interface MemberRow {
  id: string;
  userId: string;
  role: Role;
  name: string;
  email: string;
}

/**
 * An owner changes a person's role in the firm, or takes them out of it (someone who has left).
 * Access follows at once: every request finds its actor from the memberships as they are now.
 * A firm always keeps an owner: the last one can be neither changed nor taken out.
 */
export class MembersService {
  constructor(private readonly knex: Knex) {}

  /**
   * The firm's owners' rows and the person's, locked: two owners changing each other at once are
   * taken one after the other, so they can't leave the firm with none.
   */
  private async locked(trx: Knex.Transaction, actor: Actor, userId: string) {
    const rows = (await trx('memberships as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where('m.firm_id', actor.firmId)
      .andWhere((q) => q.where('m.role', 'owner').orWhere('m.user_id', userId))
      .orderBy('m.id')
      .forUpdate('m')
      .select('m.id', 'm.user_id', 'm.role', 'u.name', 'u.email')) as MemberRow[];
    const member = rows.find((r) => String(r.userId) === userId);
    if (!member) throw new NotFoundError('member');
    return { member, owners: rows.filter((r) => r.role === 'owner').length };
  }

  private stale(member: MemberRow, shown: Role): void {
    if (member.role !== shown)
      throw new ConflictError(
        `${member.name}'s role was changed meanwhile, to ${ROLE_LABELS[member.role].toLowerCase()}: reload and try again.`,
        { code: 'stale-version', current: { role: member.role } },
      );
  }

  private lastOwner(member: MemberRow, owners: number, doing: string): void {
    if (member.role === 'owner' && owners === 1)
      throw new ConflictError(`${member.name} is the firm's only owner: make someone else an owner before ${doing}.`, {
        code: 'last-owner',
      });
  }

  async changeRole(actor: Actor, userId: string, input: ChangeMemberRole): Promise<MemberView> {
    assertRoleOfFirm(actor, input.role);
    return this.knex.transaction(async (trx) => {
      const { member, owners } = await this.locked(trx, actor, userId);
      this.stale(member, input.previousRole);
      const view = { userId, name: member.name, email: member.email, role: input.role };
      if (member.role === input.role) return view;
      if (input.role !== 'owner') this.lastOwner(member, owners, 'changing their role');
      await trx('memberships').where('id', member.id).update({ role: input.role });
      await recordChange(
        trx,
        actor,
        'membership',
        String(member.id),
        'update',
        { role: member.role },
        { role: input.role },
      );
      return view;
    });
  }

  async remove(actor: Actor, userId: string, shown: Role): Promise<void> {
    await this.knex.transaction(async (trx) => {
      const { member, owners } = await this.locked(trx, actor, userId);
      this.stale(member, shown);
      this.lastOwner(member, owners, 'taking them out of the firm');
      await trx('memberships').where('id', member.id).delete();
      await recordChange(
        trx,
        actor,
        'membership',
        String(member.id),
        'delete',
        { userId, role: member.role, email: member.email },
        null,
      );
    });
  }
}
