import { INSTALLATION_TYPES } from './schemas/jobs.ts';

export type InstallationType = (typeof INSTALLATION_TYPES)[number];

/**
 * The one wording of each installation type, for every page, sheet and e-mail: a code such as
 * `in_ground` is never turned into words anywhere else (it read "In ground" on one page and
 * "In-ground" on another).
 */
export const INSTALLATION_TYPE_LABELS: Record<InstallationType, string> = {
  in_ground: 'In-ground',
  semi_recessed: 'Semi-recessed',
  slab: 'On a slab',
  deck: 'On a deck',
};

/**
 * The words for an installation type code; an unknown code is shown as it is rather than guessed at.
 *
 * @example
 * installationTypeLabel('in_ground') // 'In-ground'
 */
export function installationTypeLabel(code: string): string {
  return (INSTALLATION_TYPE_LABELS as Record<string, string>)[code] ?? code;
}

/** The types in their usual order, each with its words, for pickers. */
export const INSTALLATION_TYPE_OPTIONS: { value: InstallationType; label: string }[] = INSTALLATION_TYPES.map(
  (value) => ({ value, label: INSTALLATION_TYPE_LABELS[value] }),
);
