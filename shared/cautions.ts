/**
 * Safety cautions shown wherever a stage is shown: job page, day sheets, booking mails.
 * They are reminders, not a method statement: the firm's own risk assessment and the local rules
 * decide what is done on site.
 */
export const CAUTION_NOTE = 'Follow local codes and licensed practice.';

export type CautionTopic = 'excavation' | 'lifting' | 'electrical' | 'chemicals' | 'manual_handling' | 'concrete' | 'structure';

export const CAUTIONS: Record<CautionTopic, readonly string[]> = {
  excavation: [
    'Sides of the pit can collapse: support or batter them back; keep spoil and plant away from the edge.',
    'Locate buried services (cables, gas, water, drains) with plans and a detector before digging; hand-dig near them.',
    'Falls into the pit: barrier the edge and keep people out when it is left open.',
  ],
  lifting: [
    'A competent person writes the lift plan before lift day.',
    'Set and keep an exclusion zone round the crane and the load path.',
    'Stop the lift when the wind is over the crane\'s limit.',
    'Nobody stands or walks under a suspended load.',
  ],
  electrical: [
    'Only a registered/licensed electrician works on the supply.',
    'Isolate and lock off the supply, and prove it dead, before work.',
    'The spa circuit has RCD protection.',
    'The work is tested and certified under the local wiring rules.',
  ],
  chemicals: [
    'Sanitiser: wear gloves and eye protection; never mix chemicals.',
    'Dissolve sanitiser in warm water as the maker says, then add the solution to the spa; never add water to the chemical.',
  ],
  manual_handling: [
    'Keep fingers clear of rollers, boards and pallet truck forks.',
    'Team lifts for panels, covers and steps; plan the route and clear it first.',
  ],
  concrete: [
    'Wet concrete burns skin: wear gloves, boots and eye protection, wash splashes off at once.',
  ],
  structure: [
    'A structural engineer confirms the deck or floor carries the filled weight before the unit goes on it.',
  ],
};

/** Which topics apply to each stage kind; unknown kinds get none beyond the note. */
export const STAGE_CAUTION_TOPICS: Record<string, readonly CautionTopic[]> = {
  survey: [],
  excavation: ['excavation'],
  base_pour: ['concrete', 'excavation'],
  walls: ['excavation', 'manual_handling'],
  deck_check: ['structure'],
  electrical_first_fix: ['electrical', 'excavation'],
  delivery: ['lifting', 'manual_handling'],
  lift: ['lifting', 'manual_handling'],
  placement: ['manual_handling'],
  fill: [],
  electrical_connect: ['electrical'],
  commission: ['chemicals', 'electrical'],
  handover: ['chemicals'],
};

/**
 * The cautions for a stage kind, ending with {@link CAUTION_NOTE}.
 * @example
 * cautionsFor('lift')[0] // 'A competent person writes the lift plan before lift day.'
 * cautionsFor('lift').at(-1) // 'Follow local codes and licensed practice.'
 */
export function cautionsFor(stageKind: string): string[] {
  const topics = STAGE_CAUTION_TOPICS[stageKind] ?? [];
  return [...topics.flatMap((t) => CAUTIONS[t]), CAUTION_NOTE];
}
