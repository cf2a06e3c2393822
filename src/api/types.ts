/** Shapes of the API as the server sends them (server contract, Platform item 7). */

export type Role = 'owner' | 'scheduler' | 'manager' | 'crew' | 'partner' | 'viewer';

export interface SessionUser {
  id: number | string;
  name: string;
  email: string;
}

export interface SessionFirm {
  id: number | string;
  name: string;
  kind: string;
  timeZone: string;
}

export interface Membership {
  firmId: number | string;
  firmName: string;
  firmKind: string;
  role: Role;
}

export interface SessionBody {
  user: SessionUser;
  firm: SessionFirm;
  role: Role;
  memberships: Membership[];
  csrfToken: string;
}

export type InstallationType = 'in_ground' | 'semi_recessed' | 'slab' | 'deck';

export type JobStatus = 'enquiry' | 'surveyed' | 'planned' | 'in_progress' | 'handed_over' | 'cancelled';

export interface JobRow {
  id: number | string;
  reference: string;
  customerName: string;
  siteTown: string;
  unitName: string;
  installationType: InstallationType;
  status: JobStatus;
  /** Calendar dates, `YYYY-MM-DD`. */
  promisedFrom: string | null;
  promisedTo: string | null;
  orderedOn: string | null;
}

export interface Page<T> {
  items: T[];
  total: number;
}

export type ResourceCategory = 'crew' | 'person' | 'machine';
export type Ownership = 'owned' | 'hired' | 'partner';

export interface ResourceRow {
  id: number | string;
  name: string;
  category: ResourceCategory;
  kind: string;
  firmId: number | string;
  firmName: string;
  firmKind: string;
  ownership: Ownership;
  /** The working week it keeps when not its firm's standard week (the reader's own firm only). */
  workingWeek?: string | null;
}

export interface MemberRow {
  userId: number | string;
  name: string;
  email: string;
  role: Role;
}

export interface ItemList<T> {
  items: T[];
}
