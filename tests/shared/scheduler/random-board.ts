// Random boards for property tests: an invented scenario, built from a seed.
import type { Board, Booking, BookingState, Dependency, Resource, Stage } from '../../../shared/scheduler/index.js';
import type { StageMove } from '../../../shared/scheduler/index.js';
import { firmCal, MON_FRI_8_TO_5 } from './scenario.js';
import { weeklyHours } from '../../../shared/scheduler/index.js';

// The planner's seeded generator (mulberry32, bench/generate.ts's prng), so tests and benchmark draw boards the same way.
import { seededRandom as prng } from '../../../shared/scheduler/planner/search.js';
import { SCOTLAND } from './uk-holidays.js';

export { prng };

const KINDS = ['install_crew', 'groundworks_crew', 'crane', 'excavator', 'pallet_truck', 'electrician'];
const STAGE_KINDS = ['excavation', 'base_pour', 'delivery', 'lift', 'electrical_connect', 'commission'];
const STATES: BookingState[] = ['pencilled', 'sent', 'confirmed', 'declined', 'on_site', 'done'];
export const T0 = Date.UTC(2026, 4, 4, 7); // Mon 4 May 2026 08:00 BST (a bank holiday, on purpose)
const HOUR = 3_600_000;

export interface RandomBoardOptions {
  jobs?: number;
  stagesPerJob?: number;
  resources?: number;
  bookedFraction?: number;
}

/** A small random board: chains of stages per job, shared people, partners, hire, cures. */
export function randomBoard(seed: number, o: RandomBoardOptions = {}): Board {
  const rnd = prng(seed);
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)] as T;
  const nJobs = o.jobs ?? 3,
    per = o.stagesPerJob ?? 4,
    nRes = o.resources ?? 8;
  const cal2 = {
    id: 'cal-partner',
    timeZone: 'Europe/London',
    weekly: weeklyHours(
      [1, 2, 3, 4, 5, 6],
      [
        [7 * 60, 12 * 60],
        [13 * 60, 18 * 60],
      ],
    ),
    holidayRegion: { country: 'GB', state: 'SCT' },
    holidays: SCOTLAND,
  };
  const resources: Resource[] = [];
  for (let i = 0; i < nRes; i++) {
    const kind = KINDS[i % KINDS.length] as string;
    resources.push({
      id: `r${i}`,
      firmId: rnd() < 0.3 ? 'partner' : 'f1',
      category: kind.endsWith('crew') ? 'crew' : kind === 'electrician' ? 'person' : 'machine',
      kind,
      calendarId: rnd() < 0.3 ? 'cal-partner' : firmCal.id,
      hired: kind === 'excavator' && rnd() < 0.7,
      personIds: kind.endsWith('crew') ? [pick(['p1', 'p2', 'p3']), pick(['p3', 'p4'])] : [],
    });
  }
  const stages: Stage[] = [],
    dependencies: Dependency[] = [],
    bookings: Booking[] = [];
  const jobs = [];
  for (let j = 0; j < nJobs; j++) {
    const firm = rnd() < 0.8 ? 'f1' : 'f2';
    jobs.push({
      id: `j${j}`,
      firmId: firm,
      promisedBy: rnd() < 0.5 ? T0 + Math.floor(rnd() * 40) * 24 * HOUR : null,
      orderedAt: rnd() < 0.5 ? T0 - 5 * 24 * HOUR : null,
    });
    for (let s = 0; s < per; s++) {
      const id = `j${j}s${s}`;
      stages.push({
        id,
        jobId: `j${j}`,
        kind: pick(STAGE_KINDS),
        name: `Stage ${j}.${s}`,
        durationMinutes: 60 * (1 + Math.floor(rnd() * 12)),
        requirements: [{ kind: pick(KINDS), count: 1 + (rnd() < 0.2 ? 1 : 0) }],
        cure:
          rnd() < 0.2
            ? { targetFraction: 0.5 + rnd() * 0.3, ...(rnd() < 0.5 ? { dailyMeanTempsC: [4, 8, 12] } : {}) }
            : null,
      });
      if (s > 0) {
        dependencies.push({
          id: `d${id}`,
          fromStageId: `j${j}s${s - 1}`,
          toStageId: id,
          type: pick(['FS', 'FS', 'SS', 'FF', 'SF'] as const),
          lag: {
            amount: Math.floor(rnd() * 5) - 1,
            unit: pick(['working_hours', 'working_days', 'elapsed_hours', 'elapsed_days'] as const),
          },
          // Every link out of a cured stage waits for its cure (no extra draw: the boards stay the same).
          waitsForCure: true,
        });
      }
      if (rnd() < (o.bookedFraction ?? 0.7)) {
        const n = rnd() < 0.3 ? 2 : 1;
        for (let k = 0; k < n; k++) {
          const start = T0 + Math.floor(rnd() * 20 * 24) * HOUR;
          bookings.push({
            id: `b${id}-${k}`,
            stageId: id,
            resourceId: `r${Math.floor(rnd() * nRes)}`,
            start,
            end: start + (1 + Math.floor(rnd() * 30)) * HOUR,
            state: pick(STATES),
            installerFirmId: rnd() < 0.85 ? firm : 'f3',
          });
        }
      }
    }
  }
  if (rnd() < 0.3 && per >= 3)
    dependencies.push({
      id: 'dback',
      fromStageId: 'j0s2',
      toStageId: 'j0s0',
      type: 'FS',
      lag: { amount: 0, unit: 'working_hours' },
    });
  return {
    calendars: [firmCal, cal2, { id: 'cal-weekdays-only', timeZone: 'Europe/London', weekly: MON_FRI_8_TO_5 }],
    resources,
    jobs,
    stages,
    dependencies,
    bookings,
    hirePeriods: resources
      .filter((r) => r.hired)
      .map((r, i) => ({
        id: `h${i}`,
        resourceId: r.id,
        onHire: T0 + 24 * HOUR,
        offHire: T0 + 10 * 24 * HOUR,
        dayRatePence: 12_000,
      })),
    leadTimeRules: [
      { appliesTo: { resourceKind: 'crane' }, workingDays: 3, from: 'now' },
      { appliesTo: { stageKind: 'delivery' }, workingDays: 10, from: 'order' },
    ],
  };
}

/** A random move of one stage on a board built by randomBoard. */
export function randomMove(board: Board, seed: number): StageMove {
  const rnd = prng(seed ^ 0x9e3779b9);
  const stage = board.stages[Math.floor(rnd() * board.stages.length)] as Stage;
  const hasBookings = board.bookings.some((b) => b.stageId === stage.id && b.state !== 'declined');
  const start = T0 + Math.floor(rnd() * 20 * 24 * 4) * (HOUR / 4);
  const move: StageMove = { stageId: stage.id, start };
  if (rnd() < 0.3) move.end = start + (1 + Math.floor(rnd() * 20)) * HOUR;
  if (!hasBookings || rnd() < 0.4)
    move.resourceId = (board.resources[Math.floor(rnd() * board.resources.length)] as Resource).id;
  return move;
}
