import { z } from 'zod';
import { FIRM_KINDS, ROLES } from '../permissions.ts';
import { Id, requiredAs } from './common.ts';

export const Membership = z.object({
  firmId: Id,
  firmName: z.string(),
  firmKind: z.enum(FIRM_KINDS),
  role: z.enum(ROLES),
});
export type Membership = z.infer<typeof Membership>;

export const SessionInfo = z.object({
  user: z.object({ id: Id, name: z.string(), email: z.string() }),
  firm: z.object({ id: Id, name: z.string(), kind: z.enum(FIRM_KINDS), timeZone: z.string() }),
  role: z.enum(ROLES),
  memberships: z.array(Membership),
  csrfToken: z.string(),
});
export type SessionInfo = z.infer<typeof SessionInfo>;

export const SwitchFirm = z.object({ firmId: Id });
export type SwitchFirm = z.infer<typeof SwitchFirm>;

/**
 * PUT /api/firm/members/:id: a person's new role in the owner's firm, with the role the page showed
 * (a change made meanwhile by another owner is refused, not overwritten).
 */
export const ChangeMemberRole = z
  .object({
    role: z.enum(ROLES, { message: `must be one of ${ROLES.join(', ')}` }),
    previousRole: z.enum(ROLES, requiredAs('the role the page showed')),
  })
  .strict();
export type ChangeMemberRole = z.infer<typeof ChangeMemberRole>;

/** DELETE /api/firm/members/:id?role=…: the role the page showed, for the same reason. */
export const RemoveMember = z.object({ role: z.enum(ROLES, requiredAs('the role the page showed')) });
export type RemoveMember = z.infer<typeof RemoveMember>;
