import type { Knex } from 'knex';
import type { CreateInvitation } from '../../shared/schemas/answers.ts';
import type { Role } from '../../shared/permissions.ts';
import { ConflictError, NotFoundError } from '../errors.ts';
import { assertRoleOfFirm } from './members.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import { enqueueMessage } from './outbox.ts';
import type { InviteClaims } from './links.ts';

const INVITATION_DAYS = 14;

export interface InvitationView {
  id: string;
  email: string;
  role: Role;
  expiresAt: string;
  acceptedAt: string | null;
  /** When an owner withdrew it (its link no longer works); null while it stands. */
  withdrawnAt: string | null;
  /** The invitation to the same address that replaced it (withdrawn by inviting again); null otherwise. */
  replacedBy: string | null;
  firmName: string;
}

/** A new invitation, and the ids of the open ones to the same address it replaced (their links stop working). */
export interface CreatedInvitation extends InvitationView {
  replaced: string[];
}

export type InvitationOutcome =
  | { result: 'accepted' | 'already-member'; invitation: InvitationView }
  | { result: 'used' }
  | { result: 'expired' }
  | { result: 'gone' };

interface InvitationRow {
  id: string;
  email: string;
  role: Role;
  expiresAt: Date;
  acceptedAt: Date | null;
  withdrawnAt: Date | null;
  replacedBy: string | null;
  firmName: string;
  firmId: string;
}

const toView = (r: InvitationRow): InvitationView => ({
  id: String(r.id),
  email: r.email,
  role: r.role,
  expiresAt: r.expiresAt.toISOString(),
  acceptedAt: r.acceptedAt?.toISOString() ?? null,
  withdrawnAt: r.withdrawnAt?.toISOString() ?? null,
  replacedBy: r.replacedBy ? String(r.replacedBy) : null,
  firmName: r.firmName,
});

/**
 * An owner invites someone by e-mail; the e-mail carries a signed link. Accepting it creates the
 * person's user row (with the invited e-mail) and their membership, so the next Google sign-in with
 * that verified e-mail finds them through the existing look-up in session.ts and links the account.
 */
export class InvitationsService {
  constructor(
    private readonly knex: Knex,
    /** The app's clock: an invitation runs out INVITATION_DAYS after it is made by it. */
    private readonly now: () => number = Date.now,
  ) {}

  private rows(q: Knex | Knex.Transaction) {
    return q('invitations as i')
      .join('firms as f', 'f.id', 'i.firm_id')
      .select(
        'i.id',
        'i.email',
        'i.role',
        'i.expires_at',
        'i.accepted_at',
        'i.withdrawn_at',
        'i.replaced_by',
        'i.firm_id',
        'f.name as firm_name',
      );
  }

  /**
   * Invites a person by e-mail. Someone already in the firm is refused (409 `member`: their role is
   * changed in the list of people). An invitation still open to the same address is withdrawn and
   * replaced: inviting again is how an owner sends a lost or expired link anew, and only the newest
   * link works. Two at once (a double-click) send one: the second is refused by the index of open
   * invitations (409).
   */
  async create(actor: Actor, input: CreateInvitation): Promise<CreatedInvitation> {
    assertRoleOfFirm(actor, input.role);
    return this.knex.transaction(async (trx) => {
      const member = await trx('memberships as m')
        .join('users as u', 'u.id', 'm.user_id')
        .where('m.firm_id', actor.firmId)
        .whereRaw('lower(u.email) = lower(?)', [input.email])
        .first('m.id');
      if (member)
        throw new ConflictError(
          `${input.email} is already in your firm: change their role in the list of people instead.`,
          { code: 'member', errors: [{ field: 'email', message: 'is already in your firm' }] },
        );
      const now = new Date(this.now());
      const replaced = (
        await trx('invitations')
          .where({ firm_id: actor.firmId, accepted_at: null, withdrawn_at: null })
          .whereRaw('lower(email) = lower(?)', [input.email])
          .update({ withdrawn_at: now, withdrawn_by: actor.userId })
          .returning('id')
      ).map((r: { id: string | number }) => String(r.id));
      const [row] = await trx('invitations')
        .insert({
          firm_id: actor.firmId,
          email: input.email,
          role: input.role,
          invited_by: actor.userId,
          expires_at: new Date(now.getTime() + INVITATION_DAYS * 86_400_000),
        })
        .returning('id');
      if (replaced.length > 0) await trx('invitations').whereIn('id', replaced).update({ replaced_by: row.id });
      for (const id of replaced)
        await recordChange(
          trx,
          actor,
          'invitation',
          id,
          'update',
          { withdrawnAt: null },
          { withdrawnAt: now, replacedBy: String(row.id) },
        );
      await enqueueMessage(trx, `invitation.${row.id}`, 'invitation', { invitationId: String(row.id) });
      await recordChange(trx, actor, 'invitation', String(row.id), 'create', null, {
        email: input.email,
        role: input.role,
      });
      return { ...toView((await this.rows(trx).where('i.id', row.id).first()) as InvitationRow), replaced };
    });
  }

  /** The firm's invitations, newest first (the actor's firm only). */
  async list(actor: Actor): Promise<InvitationView[]> {
    return (
      (await this.rows(this.knex)
        .where('i.firm_id', actor.firmId)
        .orderBy('i.created_at', 'desc')
        .limit(200)) as InvitationRow[]
    ).map(toView);
  }

  /**
   * Withdraws one of the firm's invitations not yet accepted: its link stops working (the person
   * sees that it is gone). Withdrawing one already withdrawn changes nothing; one already accepted
   * is refused (409), since the person is in the firm now. Another firm's invitation is not found.
   */
  async withdraw(actor: Actor, id: string, now = new Date(this.now())): Promise<InvitationView> {
    return this.knex.transaction(async (trx) => {
      const row = (await this.rows(trx).where({ 'i.id': id, 'i.firm_id': actor.firmId }).forUpdate('i').first()) as
        InvitationRow | undefined;
      if (!row) throw new NotFoundError('invitation');
      if (row.acceptedAt)
        throw new ConflictError(`${row.email} has already accepted this invitation: they are in the firm now.`, {
          code: 'accepted',
        });
      if (row.withdrawnAt) return toView(row);
      await trx('invitations').where('id', row.id).update({ withdrawn_at: now, withdrawn_by: actor.userId });
      await recordChange(
        trx,
        actor,
        'invitation',
        String(row.id),
        'update',
        { withdrawnAt: null },
        { withdrawnAt: now },
      );
      return toView({ ...row, withdrawnAt: now });
    });
  }

  async peek(claims: InviteClaims): Promise<InvitationView | null> {
    const row = (await this.rows(this.knex).where('i.id', claims.invitationId).first()) as InvitationRow | undefined;
    // A withdrawn invitation is gone for the person it was sent to.
    return row && !row.withdrawnAt ? toView(row) : null;
  }

  async accept(claims: InviteClaims, now = new Date(this.now())): Promise<InvitationOutcome> {
    return this.knex.transaction(async (trx) => {
      const taken = await trx('link_uses')
        .insert({ jti: claims.jti, purpose: 'invite', subject_id: claims.invitationId })
        .onConflict('jti')
        .ignore()
        .returning('jti');
      const row = (await this.rows(trx).where('i.id', claims.invitationId).forUpdate('i').first()) as
        InvitationRow | undefined;
      if (!row || row.withdrawnAt) return { result: 'gone' };
      if (taken.length === 0 || row.acceptedAt) return { result: 'used' };
      if (row.expiresAt.getTime() < now.getTime()) return { result: 'expired' };
      let user = await trx('users').whereRaw('lower(email) = lower(?)', [row.email]).first('id');
      if (!user)
        [user] = await trx('users')
          .insert({ email: row.email, name: row.email.split('@')[0] })
          .returning('id');
      const added = await trx('memberships')
        .insert({ user_id: user.id, firm_id: row.firmId, role: row.role })
        .onConflict(['user_id', 'firm_id'])
        .ignore()
        .returning('id');
      await trx('invitations').where('id', row.id).update({ accepted_at: now, accepted_user_id: user.id });
      await recordChange(
        trx,
        null,
        'invitation',
        String(row.id),
        'update',
        { acceptedAt: null },
        { acceptedAt: now, userId: String(user.id) },
        String(row.firmId),
      );
      return { result: added.length ? 'accepted' : 'already-member', invitation: toView({ ...row, acceptedAt: now }) };
    });
  }
}
