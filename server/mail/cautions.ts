/**
 * The cautions an e-mail shows for the work a stage involves (docs: DOMAIN.md, "Cautions the product
 * must show"). They remind; they never replace the firm's own risk assessment, local codes or
 * licensed practice, and every list ends by saying so.
 */
export type Hazard = 'excavation' | 'lifting' | 'electrical' | 'chemicals' | 'manual_handling';

const HAZARD_LINES: Record<Hazard, string[]> = {
  excavation: [
    'Excavation: the sides of a pit can collapse without warning. Support or batter them back; nobody works in an unsupported trench.',
    'Locate buried services (cables, gas, water, drains) before digging: utility plans and a cable locator, then hand-dig near them.',
    'Falls into the pit: barriers or edge protection around open excavations, and keep machines and spoil back from the edge.',
  ],
  lifting: [
    'Lifting: the lift follows a lift plan made by a competent person; the crane operator and lift supervisor have the final say.',
    'Set up an exclusion zone and keep the public and the household out of it.',
    'Stop when wind exceeds the crane\'s limit for this load (a spa shell catches the wind like a sail).',
    'Nobody stands or walks under a suspended load.',
  ],
  electrical: [
    'Electrical work is for a registered (licensed) electrician only.',
    'Isolate and lock off the supply, and prove it dead before work starts.',
    'RCD protection on the spa circuit(s), as the maker and the wiring rules require.',
    'Test and certify the installation under the local wiring rules before the spa is handed over.',
  ],
  chemicals: [
    'Chemicals: wear gloves and eye protection; dissolve sanitiser in warm water before adding it, and never mix products.',
    'Keep chemicals in their own labelled containers, away from children and pets.',
  ],
  manual_handling: [
    'Manual handling: plan the route, use pallet trucks, skates and rollers, and enough people for the weight.',
    'Keep fingers and feet clear of rollers and boards when the unit moves.',
  ],
};

/** Which hazards each stage kind involves. */
const STAGE_HAZARDS: Record<string, Hazard[]> = {
  excavation: ['excavation', 'manual_handling'],
  base_pour: ['excavation', 'chemicals', 'manual_handling'],
  walls: ['excavation', 'manual_handling'],
  electrical_first_fix: ['electrical', 'excavation'],
  electrical_connect: ['electrical'],
  delivery: ['lifting', 'manual_handling'],
  lift: ['lifting', 'manual_handling'],
  placement: ['manual_handling'],
  fill: ['chemicals', 'manual_handling'],
  commission: ['chemicals', 'electrical'],
};

export const CAUTION_FOOTNOTE = 'Follow local codes and licensed practice; these notes do not replace your own risk assessment and method statement.';

/** The caution lines for a stage kind (empty when none apply), in a stable order. */
export function cautionsFor(stageKind: string): string[] {
  return (STAGE_HAZARDS[stageKind] ?? []).flatMap((h) => HAZARD_LINES[h]);
}

export function hazardsFor(stageKind: string): Hazard[] {
  return [...(STAGE_HAZARDS[stageKind] ?? [])];
}

/** What a partner's people should bring, by the kind of resource booked. */
const BRING_BY_RESOURCE: Record<string, string[]> = {
  crane: ['The lift plan and the lift supervisor\'s contact', 'Outrigger mats or spreader pads', 'Lifting gear with current inspection records'],
  electrician: ['Test instruments and certification forms', 'Isolator, RCD and cable as specified for the unit'],
  groundworks_crew: ['Cable locator and utility plans', 'Edge protection and barriers', 'A pump for water in the pit'],
  lorry: ['The delivery note', 'Straps and corner protectors', 'The loader crane\'s inspection record if it will lift'],
  excavator: ['The machine\'s current inspection record', 'The operator\'s competence card'],
  dumper: ['The machine\'s current inspection record', 'The operator\'s competence card'],
};
const BRING_ALWAYS = 'Usual protective kit: boots, gloves, hi-vis, and a hard hat where there is lifting or digging';

export function whatToBring(resourceKind: string): string[] {
  return [...(BRING_BY_RESOURCE[resourceKind] ?? []), BRING_ALWAYS];
}
