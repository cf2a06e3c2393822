import { z } from 'zod';
import { FIRM_KINDS, ROLES } from '../permissions.ts';
import { Id } from './common.ts';

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
