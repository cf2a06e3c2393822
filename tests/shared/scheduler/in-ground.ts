// An invented in-ground install planned from the firm's default template (shared/templates): the
// firm, its partners and their people are our own scenario.
import type { Board, Resource, WorkingCalendar } from '../../../shared/scheduler/index.js';
import { weeklyHours } from '../../../shared/scheduler/index.js';
import {
  DECK_TEMPLATE,
  IN_GROUND_TEMPLATE,
  planFromTemplate,
  type InstallTemplate,
} from '../../../shared/templates/index.js';
import { at, LONDON } from './scenario.js';
import { ENGLAND_AND_WALES } from './uk-holidays.js';

/** Mon–Fri 08:00–17:00 in England (the installer, the groundworkers, the crane and lorry firms). */
export const standardWeek: WorkingCalendar = {
  id: 'cal-standard',
  timeZone: LONDON,
  weekly: weeklyHours([1, 2, 3, 4, 5], [[8 * 60, 17 * 60]]),
  holidayRegion: { country: 'GB', state: 'ENG' },
  holidays: ENGLAND_AND_WALES,
};

/** The electricians' week: Mon–Fri 07:30–16:30 and Saturday 08:00–12:00. */
export const electriciansWeek: WorkingCalendar = {
  id: 'cal-electricians',
  timeZone: LONDON,
  weekly: [[], [[450, 990]], [[450, 990]], [[450, 990]], [[450, 990]], [[450, 990]], [[480, 720]]],
  holidayRegion: { country: 'GB', state: 'ENG' },
  holidays: ENGLAND_AND_WALES,
};

const res = (id: string, kind: string, firmId: string, calendarId = standardWeek.id, name?: string): Resource => ({
  id,
  kind,
  firmId,
  calendarId,
  category: kind.endsWith('crew') ? 'crew' : kind === 'electrician' ? 'person' : 'machine',
  ...(name ? { name } : {}),
});

export const installResources: Resource[] = [
  res('crew-heron', 'install_crew', 'tideway', standardWeek.id, 'Crew Heron'),
  res('gang', 'groundworks_crew', 'millstone', standardWeek.id, 'Millstone gang'),
  res('digger', 'excavator', 'tideway'),
  res('dumper', 'dumper', 'tideway'),
  res('priya', 'electrician', 'brightspark', electriciansWeek.id, 'Priya Nair'),
  res('lorry', 'lorry', 'carrow'),
  res('crane', 'crane', 'fellside', standardWeek.id, '60 t mobile crane'),
  res('planner', 'lift_planner', 'fellside', standardWeek.id, 'Fellside lift planner'),
  res('grab', 'spoil_removal', 'carrow', standardWeek.id, 'Grab lorry'),
  res('pt-1', 'pallet_truck', 'tideway'),
  res('pt-2', 'pallet_truck', 'tideway'),
  res('rollers', 'rollers', 'tideway'),
];

/**
 * The in-ground template as a firm might edit it: block walls only on a cured base (the link waits
 * for the cure, after the day's set the default template asks). The walls then decide the lift's
 * earliest time, which the tests of unbooked chains rely on.
 */
export const WALLS_AFTER_CURE: InstallTemplate = {
  ...IN_GROUND_TEMPLATE,
  links: IN_GROUND_TEMPLATE.links.map((l) =>
    l.from === 'base_pour' && l.to === 'walls'
      ? { ...l, lagAmount: 1, lagUnit: 'elapsed_days', waitsForCure: true }
      : l,
  ),
};

/** Mon 1 Jun 2026 08:00 BST. */
export const JUNE_1 = at(2026, 6, 1, 8);

/**
 * One job planned from a template with nothing booked: stage ids are the template's kinds. The unit
 * was ordered on Fri 15 May 09:00 unless `orderedAt` says otherwise. Notice: crane 5 working days,
 * electrician 3, delivery 15 from the order (the firm-wide rules; the stages' own notice is not loaded here).
 */
export function plannedBoard(
  template: InstallTemplate = IN_GROUND_TEMPLATE,
  orderedAt: number | null = at(2026, 5, 15, 9),
): Board {
  const plan = planFromTemplate(template, { craneNeeded: true, excavationMinutes: null });
  return {
    calendars: [standardWeek, electriciansWeek],
    resources: installResources,
    jobs: [{ id: 'job', firmId: 'tideway', promisedBy: null, orderedAt }],
    stages: plan.stages.map((s) => ({
      id: s.kind,
      jobId: 'job',
      kind: s.kind,
      name: s.name,
      durationMinutes: s.durationMinutes,
      requirements: s.requirements,
      cure: s.cure,
      mayContinueNextDay: s.mayContinueNextDay,
      justInTime: s.justInTime,
    })),
    dependencies: plan.links.map((l) => ({
      id: `${l.fromKind}>${l.toKind}`,
      fromStageId: l.fromKind,
      toStageId: l.toKind,
      type: l.type,
      lag: { amount: l.lagAmount, unit: l.lagUnit },
      waitsForCure: l.waitsForCure,
    })),
    bookings: [],
    hirePeriods: [],
    leadTimeRules: [
      { appliesTo: { resourceKind: 'crane' }, workingDays: 5, from: 'now' },
      { appliesTo: { resourceKind: 'electrician' }, workingDays: 3, from: 'now' },
      { appliesTo: { stageKind: 'delivery' }, workingDays: 15, from: 'order' },
    ],
  };
}

export { DECK_TEMPLATE, IN_GROUND_TEMPLATE };
