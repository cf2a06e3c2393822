import type { Role } from '../shared/permissions.ts';

/** The demo scenario's people who sign in (all invented; .example is a reserved domain). */
export interface DemoAccount {
  email: string;
  name: string;
  firm: string;
  role: Role;
}

export const DEMO_ACCOUNTS: DemoAccount[] = [
  { email: 'olivia.hart@tideway.example', name: 'Olivia Hart', firm: 'Tideway Hot Tubs', role: 'owner' },
  { email: 'sam.okafor@tideway.example', name: 'Sam Okafor', firm: 'Tideway Hot Tubs', role: 'scheduler' },
  { email: 'maya.lindqvist@tideway.example', name: 'Maya Lindqvist', firm: 'Tideway Hot Tubs', role: 'manager' },
  { email: 'connor.reid@tideway.example', name: 'Connor Reid', firm: 'Tideway Hot Tubs', role: 'crew' },
  { email: 'vic.amos@tideway.example', name: 'Vic Amos', firm: 'Tideway Hot Tubs', role: 'viewer' },
  { email: 'priya.nair@brightspark.example', name: 'Priya Nair', firm: 'Brightspark Electrical', role: 'partner' },
  { email: 'fiona.fell@fellside.example', name: 'Fiona Fell', firm: 'Fellside Crane Hire', role: 'partner' },
  { email: 'ben.moor@moorview.example', name: 'Ben Moor', firm: 'Moorview Spas', role: 'scheduler' },
];
