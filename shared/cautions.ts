/**
 * Safety cautions: the one list every page, e-mail, calendar feed, partner slot and day sheet
 * shows for a stage. They remind; they never replace the firm's own risk assessment and method
 * statement, local codes or licensed practice, and every list ends by saying so.
 */
export const CAUTION_NOTE = 'Follow local codes and licensed practice.';

export type CautionTopic =
  | 'site'
  | 'excavation'
  | 'plant'
  | 'lifting'
  | 'electrical'
  | 'fill'
  | 'water_hygiene'
  | 'chemicals'
  | 'manual_handling'
  | 'concrete'
  | 'structure'
  | 'spoil';

export const CAUTIONS: Record<CautionTopic, readonly string[]> = {
  site: [
    'Note overhead power lines, trees, buried services and soft ground on the survey: they decide how the work is planned.',
  ],
  excavation: [
    'Excavation: the sides of a pit can collapse without warning. Support or batter them back; nobody works in an unsupported trench.',
    'Locate buried services (cables, gas, water, drains) with plans and a detector before digging; hand-dig near them.',
    'Falls into the pit: barrier the edge and keep people out when it is left open; keep spoil and plant back from the edge.',
    "Don't undermine nearby foundations or walls; ask an engineer where the pit comes close to them.",
    'Pump out water standing in the pit before anyone works in it.',
  ],
  plant: [
    'Excavators and dumpers are driven only by trained, competent operators.',
    "Keep people out of the machine's reach and away from its travel route.",
  ],
  lifting: [
    'Lifting: the lift follows a lift plan made by a competent person; the crane operator and lift supervisor have the final say.',
    'Set and keep an exclusion zone round the crane and the load path; keep the public and the household out of it.',
    "Stop when wind exceeds the crane's limit for this load (a spa shell catches the wind like a sail).",
    'Nobody stands or walks under a suspended load.',
    'Lifting gear is thoroughly examined and in date; ground mats go under the outriggers.',
    'Look for overhead power lines near the crane and the load path; keep the safe distance the line owner gives.',
    'A slinger/signaller guides the lift; a highway permit is needed where the crane stands on the road.',
  ],
  electrical: [
    'Electrical work is for a registered (licensed) electrician only.',
    'Isolate and lock off the supply, and prove it dead, before work starts.',
    'The wiring rules for pools and spa basins apply: zones around the water limit where isolators and sockets may go.',
    '30 mA RCD protection on the spa circuit(s), and supplementary bonding where the rules require it.',
    "A local isolator within sight of the unit, out of a bather's reach.",
    "The supply's earthing arrangement decides how an outdoor spa is earthed: check it before choosing the cable and protection.",
    'Test and certify the installation, and notify building control where the rules require it, before the spa is used.',
  ],
  fill: [
    'Fill through the filter housing with backflow protection on the hose (a check valve or the tap fitting the water rules ask for).',
    'Never run the pumps or the heater dry: fill above the intakes first.',
  ],
  water_hygiene: [
    "Spa pools can carry legionella: follow the health and safety authority's spa-pool guidance on disinfection, testing and cleaning.",
  ],
  chemicals: [
    'Chemicals: wear gloves and eye protection and read the safety data sheet; never mix products.',
    'Dissolve sanitiser in warm water as the maker says, then add the solution to the spa; never add water to the chemical.',
    'Store oxidisers apart from acids, in their own labelled containers, away from children and pets.',
  ],
  manual_handling: [
    "Manual handling: plan the route and clear it; enough people for the unit's weight, with pallet trucks, skates and rollers.",
    'Keep fingers and feet clear of rollers, boards and pallet truck forks when the unit moves.',
  ],
  concrete: ['Wet concrete burns skin: wear gloves, boots and eye protection, and wash splashes off at once.'],
  structure: ['A structural engineer confirms the deck or floor carries the filled weight before the unit goes on it.'],
  spoil: [
    'Loading a lorry: keep people clear of the grab and the excavator bucket; nobody stands on the lorry or beside it while it is loaded.',
    "Don't overload a skip: wet soil reaches the skip's weight limit long before it is full; load it level with the sides, never above them.",
    "A skip or a lorry on the highway needs the highway authority's permit, with lights and cones as the permit says.",
    'A banksman sees the lorry in and out; keep the public and the household away from it and off the path it takes.',
  ],
};

/** Which topics apply to each stage kind. */
export const STAGE_CAUTION_TOPICS: Record<string, readonly CautionTopic[]> = {
  survey: ['site'],
  excavation: ['excavation', 'plant'],
  // Skips swapped or a grab lorry loaded: heavy loads, lorries reversing, a skip on the road.
  spoil_away: ['spoil', 'plant'],
  base_pour: ['concrete', 'excavation'],
  walls: ['excavation', 'manual_handling'],
  deck_check: ['structure'],
  electrical_first_fix: ['electrical', 'excavation'],
  delivery: ['lifting', 'manual_handling'],
  lift: ['lifting', 'manual_handling'],
  // The appointed person's site visit: where the crane stands, what is overhead, the ground under the outriggers.
  lift_plan: ['site', 'lifting'],
  placement: ['manual_handling'],
  fill: ['fill'],
  electrical_connect: ['electrical'],
  commission: ['fill', 'chemicals', 'water_hygiene', 'electrical'],
  handover: ['chemicals', 'water_hygiene'],
  // A service visit: the water, its chemicals and the spa's electrics are looked at.
  service_visit: ['chemicals', 'water_hygiene', 'electrical'],
};

/** The stage kinds the product plans (each has its cautions: a test holds every template to it). */
export const CAUTION_STAGE_KINDS = Object.keys(STAGE_CAUTION_TOPICS);

/**
 * The caution lines for a stage kind, without the closing note (for outputs that print the note
 * once below several lists).
 *
 * @example
 * cautionLines('fill')[0] // 'Fill through the filter housing with backflow protection on the hose …'
 */
export function cautionLines(stageKind: string): string[] {
  return (STAGE_CAUTION_TOPICS[stageKind] ?? []).flatMap((t) => CAUTIONS[t]);
}

/**
 * The cautions for a stage kind, ending with {@link CAUTION_NOTE}.
 *
 * @example
 * cautionsFor('lift')[0] // 'Lifting: the lift follows a lift plan made by a competent person; …'
 * cautionsFor('lift').at(-1) // 'Follow local codes and licensed practice.'
 */
export function cautionsFor(stageKind: string): string[] {
  return [...cautionLines(stageKind), CAUTION_NOTE];
}
