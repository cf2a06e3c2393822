// Generated boards for the engine benchmark: an invented scenario, deterministic from a seed.
import type { Board, Booking, Dependency, Resource, Stage, WorkingCalendar } from '../shared/scheduler/index.js';
import { addWorkingMinutes, nextWorkingInstant, weeklyHours, type HirePeriod } from '../shared/scheduler/index.js';
import { seededRandom } from '../shared/scheduler/planner/search.js';
import { holidaysFor } from '../server/services/holiday-days.ts';

/** The planner's seeded generator (mulberry32), so generated boards and plans share one. */
export const prng = seededRandom;

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
export const BENCH_NOW = Date.UTC(2026, 0, 5, 8); // Mon 5 Jan 2026 08:00 UK

/** A UK region's calendar fields: its bank holidays across the generated year (as the server lists them). */
const region = (state: string) => ({
  holidayRegion: { country: 'GB', state },
  holidays: holidaysFor({ country: 'GB', state }, { from: BENCH_NOW, to: BENCH_NOW + 400 * DAY }),
});

/** The stages of one install, with the kind each needs and working minutes. */
const TEMPLATE: [string, string, number][] = [
  ['survey', 'install_crew', 120],
  ['excavation', 'groundworks_crew', 720],
  ['base_pour', 'groundworks_crew', 240],
  ['walls', 'groundworks_crew', 960],
  ['electrical_first_fix', 'electrician', 240],
  ['delivery', 'lorry', 120],
  ['lift', 'crane', 240],
  ['fill', 'install_crew', 180],
  ['electrical_connect', 'electrician', 180],
  ['commission', 'install_crew', 240],
];
const KINDS = ['install_crew', 'groundworks_crew', 'electrician', 'lorry', 'crane', 'excavator', 'pallet_truck'];

export interface GeneratedBoard {
  board: Board;
  unbookedJobIds: string[];
}

/**
 * `jobs` installs of 10 stages each, `resources` resources spread over the kinds, a year of
 * bookings (most stages booked once, some clashes on purpose), hire periods and lead times.
 * The last `unbookedJobs` jobs have no bookings, for auto-place.
 */
export function generateBoard(jobs: number, resources: number, seed = 1, unbookedJobs = 20): GeneratedBoard {
  const rnd = prng(seed);
  const calendars: WorkingCalendar[] = [
    { id: 'eng', timeZone: 'Europe/London', weekly: weeklyHours([1, 2, 3, 4, 5], [[480, 1020]]), ...region('ENG') },
    {
      id: 'sct',
      timeZone: 'Europe/London',
      weekly: weeklyHours(
        [1, 2, 3, 4, 5, 6],
        [
          [450, 720],
          [780, 1050],
        ],
      ),
      ...region('SCT'),
    },
    { id: 'nir', timeZone: 'Europe/London', weekly: weeklyHours([1, 2, 3, 4, 5], [[480, 990]]), ...region('NIR') },
  ];
  const res: Resource[] = [];
  const byKind = new Map<string, Resource[]>();
  for (let i = 0; i < resources; i++) {
    const kind = KINDS[i % KINDS.length] as string;
    const r: Resource = {
      id: `res-${i}`,
      firmId: rnd() < 0.7 ? `firm-${i % 20}` : `partner-${i % 7}`,
      category: kind.endsWith('crew') ? 'crew' : kind === 'electrician' ? 'person' : 'machine',
      kind,
      calendarId: (calendars[Math.floor(i / KINDS.length) % 3] as WorkingCalendar).id,
      hired: kind === 'excavator',
      personIds: kind.endsWith('crew') ? [`person-${i % (resources / 2)}`, `person-${(i * 7) % (resources / 2)}`] : [],
    };
    res.push(r);
    (byKind.get(kind) ?? (byKind.set(kind, []).get(kind) as Resource[])).push(r);
  }
  const stages: Stage[] = [],
    dependencies: Dependency[] = [],
    bookings: Booking[] = [];
  const hirePeriods: HirePeriod[] = [];
  const calById = new Map(calendars.map((c) => [c.id, c]));
  const busyUntil = new Map<string, number>();
  const jobList = [];
  const unbookedJobIds: string[] = [];
  // Jobs in date order, so "is this resource free yet" below means something.
  const starts = Array.from({ length: jobs }, () => BENCH_NOW + Math.floor(rnd() * 330 * 24) * HOUR).sort(
    (a, b) => a - b,
  );
  for (let j = 0; j < jobs; j++) {
    const firmId = `firm-${j % 20}`;
    const jobStart = starts[j] as number;
    jobList.push({ id: `job-${j}`, firmId, promisedBy: jobStart + 30 * DAY, orderedAt: BENCH_NOW - 10 * DAY });
    const unbooked = j >= jobs - unbookedJobs;
    if (unbooked) unbookedJobIds.push(`job-${j}`);
    let t = jobStart;
    TEMPLATE.forEach(([kind, need, minutes], s) => {
      const id = `job-${j}-s${s}`;
      stages.push({
        id,
        jobId: `job-${j}`,
        kind,
        name: kind.replace(/_/g, ' '),
        durationMinutes: minutes,
        requirements:
          kind === 'lift'
            ? [
                { kind: 'crane', count: 1 },
                { kind: 'pallet_truck', count: 2 },
              ]
            : kind === 'excavation'
              ? [
                  { kind: need, count: 1 },
                  { kind: 'excavator', count: 1 },
                ]
              : [{ kind: need, count: 1 }],
        cure:
          kind === 'base_pour'
            ? { targetFraction: 0.7, ...(rnd() < 0.3 ? { dailyMeanTempsC: [6, 8, 10] } : {}) }
            : null,
      });
      if (s > 0)
        dependencies.push({
          id: `dep-${id}`,
          fromStageId: `job-${j}-s${s - 1}`,
          toStageId: id,
          type: s === 4 ? 'SS' : 'FS',
          lag: { amount: s === 8 ? 2 : 0, unit: s === 8 ? 'working_hours' : 'working_days' },
        });
      if (unbooked) return;
      const wanted: string[] =
        kind === 'lift'
          ? ['crane', 'pallet_truck', 'pallet_truck']
          : kind === 'excavation'
            ? [need, 'excavator']
            : [need];
      const cal0 = calById.get((byKind.get(need)?.[0] as Resource).calendarId) as WorkingCalendar;
      const start = nextWorkingInstant(cal0, t);
      let stageEnd = start;
      const used = new Set<string>();
      wanted.forEach((k, n) => {
        const pool = byKind.get(k) ?? [];
        const sameCal = pool.filter((r) => r.calendarId === cal0.id && !used.has(r.id));
        // Mostly pick a resource that is free (a scheduler avoids clashes); now and then any.
        let r = sameCal[Math.floor(rnd() * sameCal.length)] as Resource;
        for (let tries = 0; tries < 30 && (busyUntil.get(r.id) ?? 0) > start; tries++)
          r = sameCal[Math.floor(rnd() * sameCal.length)] as Resource;
        used.add(r.id);
        const end = addWorkingMinutes(cal0, start, minutes);
        stageEnd = Math.max(stageEnd, end);
        busyUntil.set(r.id, Math.max(busyUntil.get(r.id) ?? 0, end));
        bookings.push({
          id: `bk-${id}-${n}`,
          stageId: id,
          resourceId: r.id,
          start,
          end,
          state: rnd() < 0.01 ? 'declined' : 'confirmed',
          installerFirmId: firmId,
        });
        if (r.hired)
          hirePeriods.push({
            id: `hire-${hirePeriods.length}`,
            resourceId: r.id,
            onHire: start - 4 * HOUR,
            offHire: end + (rnd() < 0.2 ? 2 * DAY : 4 * HOUR),
            dayRatePence: 9_500,
          });
      });
      t = stageEnd + (kind === 'base_pour' ? 15 * DAY : kind === 'fill' ? 2 * HOUR : 0);
    });
  }
  // A few excavators are on long-term hire, so the jobs left for auto-place can get one.
  res
    .filter((r) => r.hired)
    .slice(0, Math.max(3, Math.floor(resources / 200)))
    .forEach((r) => {
      hirePeriods.push({
        id: `hire-long-${r.id}`,
        resourceId: r.id,
        onHire: BENCH_NOW,
        offHire: BENCH_NOW + 400 * DAY,
        dayRatePence: 7_000,
      });
    });
  return {
    board: {
      calendars,
      resources: res,
      jobs: jobList,
      stages,
      dependencies,
      bookings,
      hirePeriods,
      leadTimeRules: [
        { appliesTo: { resourceKind: 'crane' }, workingDays: 10, from: 'now' },
        { appliesTo: { stageKind: 'delivery' }, workingDays: 15, from: 'order' },
      ],
    },
    unbookedJobIds,
  };
}
