// An invented install: firm, people, machines and job are all our own scenario.
import type { Board, Booking, Dependency, Resource, Stage, WorkingCalendar } from '../../../shared/scheduler/index.js';
import { localToInstant, dayNumber, weeklyHours } from '../../../shared/scheduler/index.js';
import { ENGLAND_AND_WALES } from './uk-holidays.js';

export const LONDON = 'Europe/London';

/** Monday–Friday 08:00–17:00 (a common crew pattern: common practice, no source). */
export const MON_FRI_8_TO_5 = weeklyHours([1, 2, 3, 4, 5], [[8 * 60, 17 * 60]]);

/** Local wall-clock time in London as an instant. */
export function at(y: number, m: number, d: number, hh = 0, mm = 0, tz = LONDON): number {
  return localToInstant(tz, dayNumber(y, m, d), hh * 60 + mm);
}

export const firmCal: WorkingCalendar = {
  id: 'cal-installer',
  timeZone: LONDON,
  weekly: MON_FRI_8_TO_5,
  holidayRegion: { country: 'GB', state: 'ENG' },
  holidays: ENGLAND_AND_WALES,
};

export function dep(
  from: string,
  to: string,
  type: Dependency['type'] = 'FS',
  amount = 0,
  unit: Dependency['lag']['unit'] = 'working_hours',
): Dependency {
  return { id: `${from}>${to}`, fromStageId: from, toStageId: to, type, lag: { amount, unit } };
}

export function stage(
  id: string,
  kind: string,
  durationMinutes: number,
  req: [string, number][],
  extra: Partial<Stage> = {},
): Stage {
  return {
    id,
    jobId: 'job-1',
    kind,
    name: kind.replace(/_/g, ' ').replace(/^./, (c) => c.toUpperCase()),
    durationMinutes,
    requirements: req.map(([kind, count]) => ({ kind, count })),
    ...extra,
  };
}

export function booking(
  id: string,
  stageId: string,
  resourceId: string,
  start: number,
  end: number,
  extra: Partial<Booking> = {},
): Booking {
  return { id, stageId, resourceId, start, end, state: 'confirmed', installerFirmId: 'installer-1', ...extra };
}

export const resources: Resource[] = [
  {
    id: 'crew-a',
    firmId: 'installer-1',
    category: 'crew',
    kind: 'install_crew',
    calendarId: 'cal-installer',
    personIds: ['sam', 'ria'],
  },
  {
    id: 'crew-b',
    firmId: 'installer-1',
    category: 'crew',
    kind: 'install_crew',
    calendarId: 'cal-installer',
    personIds: ['ria', 'tom'],
  },
  { id: 'ground-1', firmId: 'installer-1', category: 'crew', kind: 'groundworks_crew', calendarId: 'cal-installer' },
  { id: 'crane-1', firmId: 'partner-lifting', category: 'machine', kind: 'crane', calendarId: 'cal-installer' },
  {
    id: 'digger-1',
    firmId: 'partner-plant',
    category: 'machine',
    kind: 'excavator',
    calendarId: 'cal-installer',
    hired: true,
  },
  { id: 'pt-1', firmId: 'installer-1', category: 'machine', kind: 'pallet_truck', calendarId: 'cal-installer' },
  { id: 'pt-2', firmId: 'installer-1', category: 'machine', kind: 'pallet_truck', calendarId: 'cal-installer' },
  { id: 'spark-1', firmId: 'partner-electric', category: 'person', kind: 'electrician', calendarId: 'cal-installer' },
];

/** One in-ground install: dig, pour, cure, lift, connect. Nothing booked yet. */
export function emptyBoard(): Board {
  return {
    calendars: [firmCal],
    resources,
    jobs: [{ id: 'job-1', firmId: 'installer-1', promisedBy: null, orderedAt: null }],
    stages: [
      stage('dig', 'excavation', 12 * 60, [
        ['groundworks_crew', 1],
        ['excavator', 1],
      ]),
      stage('base', 'base_pour', 4 * 60, [['groundworks_crew', 1]], { cure: { targetFraction: 0.7 } }),
      stage('lift', 'lift', 4 * 60, [
        ['crane', 1],
        ['install_crew', 1],
        ['pallet_truck', 2],
      ]),
      stage('connect', 'electrical_connect', 3 * 60, [['electrician', 1]]),
    ],
    dependencies: [
      dep('dig', 'base'),
      { ...dep('base', 'lift'), waitsForCure: true },
      dep('lift', 'connect', 'FS', 1, 'working_hours'),
    ],
    bookings: [],
    hirePeriods: [
      {
        id: 'hire-1',
        resourceId: 'digger-1',
        onHire: at(2026, 5, 1, 0),
        offHire: at(2026, 5, 9, 0),
        dayRatePence: 15_000,
      },
    ],
    leadTimeRules: [{ appliesTo: { resourceKind: 'crane' }, workingDays: 5, from: 'now' }],
  };
}
