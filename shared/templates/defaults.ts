import type { InstallTemplate, LinkTemplate, StageTemplate } from './types.ts';

/*
 * The default templates. Durations are a firm's usual working minutes (common practice, no source):
 * a working day is about 540 minutes. Notice (checked by the engine on the job's stage): the crane
 * firm 10 working days, time for its appointed person's site visit and a written lift plan before
 * the lift, and 5 for that visit itself; the electrician 3 (common practice, no source); the unit's
 * delivery waits on the maker's lead time from the order (the unit's own figure when it has one).
 * Walls go up once the base has set overnight (16 elapsed hours, common practice, no source); the
 * lift and anything else that loads the base waits for the base's cure (`waitsForCure`).
 * Digging and block laying may stop at the end of the day and carry on the next
 * (`mayContinueNextDay`); a pour, a lift, a delivery or an electrician's visit is done within one
 * working day (common practice, no source).
 * The dig's spoil goes on skips or a grab lorry, booked with the haulier after the dig (the same
 * working day allowed) with 2 working days' notice (common practice, no source).
 */

const fixed = (minutes: number) => ({ kind: 'fixed', minutes }) as const;
const fs = (
  from: string,
  to: string,
  lagAmount = 0,
  lagUnit: LinkTemplate['lagUnit'] = 'working_hours',
): LinkTemplate => ({ from, to, type: 'FS', lagAmount, lagUnit });
/** A link into a stage that loads the base: it waits for the base's cure. */
const onCuredBase = (from: string, to: string): LinkTemplate => ({ ...fs(from, to), waitsForCure: true });

const SURVEY: StageTemplate = {
  kind: 'survey',
  name: 'Site survey',
  duration: fixed(120),
  requirements: [{ kind: 'install_crew', count: 1 }],
};
const ELECTRICIAN_NOTICE = { workingDays: 3, countedFrom: 'now', resourceKind: 'electrician' } as const;
const FIRST_FIX: StageTemplate = {
  kind: 'electrical_first_fix',
  name: 'Supply cable first fix',
  duration: fixed(240),
  requirements: [{ kind: 'electrician', count: 1 }],
  leadTime: { ...ELECTRICIAN_NOTICE },
};
const DELIVERY: StageTemplate = {
  kind: 'delivery',
  name: 'Delivery',
  duration: fixed(120),
  requirements: [{ kind: 'lorry', count: 1 }],
  leadTime: { workingDays: 15, countedFrom: 'order', reason: "the maker's lead time" },
  // Delivery and lift day: lorry, crane, crew and pallet trucks on site together; a unit delivered
  // weeks early stands on the drive (common practice, no source).
  justInTime: true,
};
/** The crane firm's appointed person visits the site and sends the lift plan the lift follows. */
const LIFT_PLAN: StageTemplate = {
  kind: 'lift_plan',
  name: 'Lift plan received',
  duration: fixed(60),
  when: 'crane',
  requirements: [{ kind: 'lift_planner', count: 1 }],
  leadTime: { workingDays: 5, countedFrom: 'now', resourceKind: 'lift_planner' },
};
/**
 * The dig's spoil taken away by the hired haulier (skips swapped or a grab lorry loaded); the plan's
 * note counts the skips or grab-lorry loads from the job's quantities.
 */
const SPOIL_AWAY: StageTemplate = {
  kind: 'spoil_away',
  name: 'Spoil away (skips or grab lorry)',
  duration: fixed(120),
  requirements: [{ kind: 'spoil_removal', count: 1 }],
  leadTime: { workingDays: 2, countedFrom: 'now', resourceKind: 'spoil_removal' },
};
const LIFT = (name: string): StageTemplate => ({
  kind: 'lift',
  name,
  duration: fixed(240),
  when: 'crane',
  leadTime: { workingDays: 10, countedFrom: 'now', resourceKind: 'crane' },
  requirements: [
    { kind: 'crane', count: 1 },
    { kind: 'install_crew', count: 1 },
    { kind: 'pallet_truck', count: 2 },
    { kind: 'rollers', count: 1 },
  ],
});
const PLACEMENT = (name: string, rollers: boolean): StageTemplate => ({
  kind: 'placement',
  name,
  duration: fixed(180),
  when: 'no_crane',
  requirements: [
    { kind: 'install_crew', count: 1 },
    { kind: 'pallet_truck', count: 2 },
    ...(rollers ? [{ kind: 'rollers', count: 1 }] : []),
  ],
});
const FINISH: StageTemplate[] = [
  { kind: 'fill', name: 'Fill', duration: fixed(180), requirements: [{ kind: 'install_crew', count: 1 }] },
  {
    kind: 'electrical_connect',
    name: 'Connect and certify',
    duration: fixed(240),
    requirements: [{ kind: 'electrician', count: 1 }],
    leadTime: { ...ELECTRICIAN_NOTICE },
  },
  { kind: 'commission', name: 'Commission', duration: fixed(180), requirements: [{ kind: 'install_crew', count: 1 }] },
  { kind: 'handover', name: 'Handover', duration: fixed(60), requirements: [{ kind: 'install_crew', count: 1 }] },
];
const CURE_70 = { targetFraction: 0.7 };

/**
 * The unit goes in (lift or placement), then fill and connect, commission, handover. The lift
 * plan follows the survey and is in hand a working day before the lift, to brief the crew
 * (common practice, no source).
 */
const FINISH_LINKS: LinkTemplate[] = [
  fs('survey', 'lift_plan', 0, 'working_days'),
  fs('lift_plan', 'lift', 1, 'working_days'),
  fs('delivery', 'lift'),
  fs('delivery', 'placement'),
  fs('electrical_first_fix', 'lift'),
  fs('electrical_first_fix', 'placement'),
  fs('lift', 'fill'),
  fs('placement', 'fill'),
  fs('lift', 'electrical_connect'),
  fs('placement', 'electrical_connect'),
  fs('fill', 'commission'),
  fs('electrical_connect', 'commission'),
  fs('commission', 'handover'),
];

const PIT_LINKS: LinkTemplate[] = [
  fs('survey', 'excavation', 0, 'working_days'),
  fs('survey', 'electrical_first_fix', 0, 'working_days'),
  fs('excavation', 'base_pour'),
  // The spoil goes once the dig is done: a grab lorry collects at its end (the same day allowed).
  fs('excavation', 'spoil_away'),
  // Walls go up on the base once it has set overnight; the lift and the placement wait for the cure.
  fs('base_pour', 'walls', 16, 'elapsed_hours'),
  onCuredBase('base_pour', 'lift'),
  onCuredBase('base_pour', 'placement'),
  fs('walls', 'lift'),
  fs('walls', 'placement'),
  ...FINISH_LINKS,
];

export const IN_GROUND_TEMPLATE: InstallTemplate = {
  installationType: 'in_ground',
  name: 'In-ground pit',
  stages: [
    SURVEY,
    {
      kind: 'excavation',
      name: 'Excavate pit',
      duration: { kind: 'excavation', fallbackMinutes: 720 },
      requirements: [
        { kind: 'groundworks_crew', count: 1 },
        { kind: 'excavator', count: 1 },
        { kind: 'dumper', count: 1 },
      ],
      mayContinueNextDay: true,
    },
    SPOIL_AWAY,
    {
      kind: 'base_pour',
      name: 'Pour reinforced base',
      duration: fixed(300),
      requirements: [{ kind: 'groundworks_crew', count: 1 }],
      cure: CURE_70,
    },
    {
      kind: 'walls',
      name: 'Block retaining walls',
      duration: fixed(960),
      requirements: [{ kind: 'groundworks_crew', count: 1 }],
      mayContinueNextDay: true,
    },
    FIRST_FIX,
    DELIVERY,
    LIFT_PLAN,
    LIFT('Crane lift into pit'),
    PLACEMENT('Lower into pit on boards and rollers', true),
    ...FINISH,
  ],
  links: PIT_LINKS,
};

export const SEMI_RECESSED_TEMPLATE: InstallTemplate = {
  installationType: 'semi_recessed',
  name: 'Semi-recessed pit',
  stages: [
    SURVEY,
    {
      kind: 'excavation',
      name: 'Excavate part-depth pit',
      duration: { kind: 'excavation', fallbackMinutes: 480 },
      requirements: [
        { kind: 'groundworks_crew', count: 1 },
        { kind: 'excavator', count: 1 },
        { kind: 'dumper', count: 1 },
      ],
      mayContinueNextDay: true,
    },
    SPOIL_AWAY,
    {
      kind: 'base_pour',
      name: 'Pour reinforced base',
      duration: fixed(300),
      requirements: [{ kind: 'groundworks_crew', count: 1 }],
      cure: CURE_70,
    },
    {
      kind: 'walls',
      name: 'Block walls to part height',
      duration: fixed(540),
      requirements: [{ kind: 'groundworks_crew', count: 1 }],
      mayContinueNextDay: true,
    },
    FIRST_FIX,
    DELIVERY,
    LIFT_PLAN,
    LIFT('Crane lift into place'),
    PLACEMENT('Move into place on boards and rollers', true),
    ...FINISH,
  ],
  links: PIT_LINKS,
};

export const SLAB_TEMPLATE: InstallTemplate = {
  installationType: 'slab',
  name: 'On a slab',
  stages: [
    SURVEY,
    {
      kind: 'base_pour',
      name: 'Pour slab',
      duration: fixed(360),
      requirements: [{ kind: 'groundworks_crew', count: 1 }],
      cure: CURE_70,
    },
    FIRST_FIX,
    DELIVERY,
    LIFT_PLAN,
    LIFT('Crane lift onto slab'),
    PLACEMENT('Move into place', false),
    ...FINISH,
  ],
  links: [
    fs('survey', 'base_pour', 0, 'working_days'),
    fs('survey', 'electrical_first_fix', 0, 'working_days'),
    onCuredBase('base_pour', 'lift'),
    onCuredBase('base_pour', 'placement'),
    ...FINISH_LINKS,
  ],
};

export const DECK_TEMPLATE: InstallTemplate = {
  installationType: 'deck',
  name: 'On a deck',
  stages: [
    SURVEY,
    {
      kind: 'deck_check',
      name: "Confirm the deck's rating with the engineer",
      duration: fixed(60),
      requirements: [{ kind: 'install_crew', count: 1 }],
    },
    FIRST_FIX,
    DELIVERY,
    LIFT_PLAN,
    LIFT('Crane lift onto deck'),
    PLACEMENT('Move onto deck', false),
    ...FINISH,
  ],
  links: [
    fs('survey', 'deck_check', 0, 'working_days'),
    fs('survey', 'electrical_first_fix', 0, 'working_days'),
    fs('deck_check', 'lift'),
    fs('deck_check', 'placement'),
    ...FINISH_LINKS,
  ],
};

export const DEFAULT_TEMPLATES: Record<InstallTemplate['installationType'], InstallTemplate> = {
  in_ground: IN_GROUND_TEMPLATE,
  semi_recessed: SEMI_RECESSED_TEMPLATE,
  slab: SLAB_TEMPLATE,
  deck: DECK_TEMPLATE,
};

/**
 * A service visit after the handover: one install crew for two working hours (common practice, no
 * source). The firm's service plan sets these up as jobs of their own (server/services/handover.ts).
 */
export const SERVICE_VISIT_TEMPLATE: StageTemplate = {
  kind: 'service_visit',
  name: 'Service visit',
  duration: fixed(120),
  requirements: [{ kind: 'install_crew', count: 1 }],
};
