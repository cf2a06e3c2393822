/** Words the app shows for the server's codes. */
import type { JobStatus, Ownership, ResourceCategory } from '@/api/types';

/** One wording of installation types for every page: the shared map (shared/installation-types.ts). */
export { INSTALLATION_TYPE_LABELS, installationTypeLabel } from '@shared/installation-types';

export const JOB_STATUS_LABELS: Record<JobStatus, string> = {
  enquiry: 'Enquiry',
  surveyed: 'Surveyed',
  planned: 'Planned',
  in_progress: 'In progress',
  handed_over: 'Handed over',
  cancelled: 'Cancelled',
};

/** Roles in words: the shared map, which the server's invitation page uses too. */
export { ROLE_LABELS } from '@shared/permissions';

export const OWNERSHIP_LABELS: Record<Ownership, string> = {
  owned: 'Our own',
  hired: 'Hired',
  partner: 'Partner firm',
};

export const CATEGORY_LABELS: Record<ResourceCategory, string> = {
  crew: 'Crew',
  person: 'Person',
  machine: 'Machine',
};

/** Turns an open-ended code such as `plant_hire` into words. @example humanise('plant_hire') // 'Plant hire' */
export function humanise(code: string): string {
  const words = code.replace(/[_-]+/g, ' ').trim();
  return words ? words.charAt(0).toUpperCase() + words.slice(1) : code;
}
