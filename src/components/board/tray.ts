/**
 * The tray: every stage not yet booked as a whole, per job, in the order the stages must happen. A
 * stage with some of its resources booked stays until the rest are ("needs 1 dumper"), and a
 * partner's decline shows beside it. Pure, so it is tested without a browser.
 */
import type { BoardBooking, BoardData, BoardJob, BoardStage } from '@shared/board-data';
import { plural } from '@shared/plural';
import { kindLabel } from './board-events';

export interface TrayShort {
  kind: string;
  count: number;
}

export interface TrayStage {
  stage: BoardStage;
  /** What the stage still needs, per kind (all of it when nothing is booked). */
  short: TrayShort[];
  /** Its active bookings: a partly booked stage is dropped again at their time. */
  bookedCount: number;
  /** Earliest start of its active bookings, or null. */
  startsAt: number | null;
  /** Partners who declined a booking of it (still on the board, to rebook). */
  declinedBy: string[];
}

export interface TrayGroup {
  job: BoardJob;
  stages: TrayStage[];
}

interface Lookups {
  stages: Map<string, BoardStage>;
  kinds: Map<string, string>;
  bookingsOf: Map<string, BoardBooking[]>;
}
// Per loaded board (a change makes a new data object): stages, resource kinds and own bookings by stage,
// so the tray of a board of thousands of stages is worked out in one pass, not one scan per stage.
const lookups = new WeakMap<BoardData, Lookups>();
function lookupsOf(data: BoardData): Lookups {
  let found = lookups.get(data);
  if (!found) {
    const bookingsOf = new Map<string, BoardBooking[]>();
    for (const b of data.bookings) {
      if (b.elsewhere) continue;
      const list = bookingsOf.get(b.stageId);
      if (list) list.push(b);
      else bookingsOf.set(b.stageId, [b]);
    }
    found = {
      stages: new Map(data.stages.map((s) => [s.id, s])),
      kinds: new Map(data.resources.map((r) => [r.id, r.kind])),
      bookingsOf,
    };
    lookups.set(data, found);
  }
  return found;
}

/**
 * What a stage still lacks: for each requirement, the required count less the distinct resources
 * of that kind among its active (not declined) bookings.
 *
 * @example
 * shortfallOf(data, 'excavate-7') // [{ kind: 'dumper', count: 1 }]
 */
export function shortfallOf(data: BoardData, stageId: string): TrayShort[] {
  const { stages, kinds, bookingsOf } = lookupsOf(data);
  const stage = stages.get(stageId);
  if (!stage) return [];
  const own = (bookingsOf.get(stageId) ?? []).filter((b) => b.state !== 'declined');
  return stage.requirements
    .map((req) => ({
      kind: req.kind,
      count: req.count - new Set(own.filter((b) => kinds.get(b.resourceId) === req.kind).map((b) => b.resourceId)).size,
    }))
    .filter((s) => s.count > 0);
}

/** Kinds whose label is already a plural: counted in sets. */
const SETS: Record<string, [string, string]> = {
  rollers: ['set of rollers', 'sets of rollers'],
  spoil_removal: ['skip or grab lorry', 'skips or grab lorries'],
};

/** "1 dumper", "2 pallet trucks", "1 set of rollers". */
export function countOfKind(count: number, kind: string): string {
  const set = SETS[kind];
  return set ? plural(count, set[0], set[1]) : plural(count, kindLabel(kind));
}

/** "needs 1 dumper, 2 pallet trucks". */
export function needsText(short: readonly TrayShort[]): string {
  return short.length ? `needs ${short.map((s) => countOfKind(s.count, s.kind)).join(', ')}` : '';
}

/**
 * The tray's groups: jobs with a stage still to book (wholly or in part), soonest promised first,
 * each job's stages in `order` (the engine's dependency order).
 *
 * @example
 * trayGroups(data, () => index.order.map((i) => i.stage.id), (s) => visibility.trayStage(s))
 */
export function trayGroups(
  data: BoardData,
  order: (jobId: string) => string[],
  show: (stage: BoardStage) => boolean = () => true,
): TrayGroup[] {
  const jobs = new Map(data.jobs.map((j) => [j.id, j]));
  const firmOf = new Map(data.resources.map((r) => [r.id, r.firmName]));
  const byJob = new Map<string, TrayStage[]>();
  for (const stage of data.stages) {
    if (stage.kind === 'elsewhere' || !jobs.has(stage.jobId) || !show(stage)) continue;
    const short = shortfallOf(data, stage.id);
    if (short.length === 0) continue;
    const own = lookupsOf(data).bookingsOf.get(stage.id) ?? [];
    const active = own.filter((b) => b.state !== 'declined');
    const item: TrayStage = {
      stage,
      short,
      bookedCount: active.length,
      startsAt: active.length ? Math.min(...active.map((b) => b.start)) : null,
      declinedBy: [
        ...new Set(own.filter((b) => b.state === 'declined').map((b) => firmOf.get(b.resourceId) ?? 'A partner')),
      ],
    };
    byJob.set(stage.jobId, [...(byJob.get(stage.jobId) ?? []), item]);
  }
  const ranks = new Map<string[], Map<string, number>>();
  return [...byJob.entries()]
    .map(([jobId, stages]) => {
      // One rank table per order list (the board hands every job the same one).
      const list = order(jobId);
      let rank = ranks.get(list);
      if (!rank) {
        rank = new Map(list.map((id, i) => [id, i]));
        ranks.set(list, rank);
      }
      return {
        job: jobs.get(jobId)!,
        stages: stages.sort(
          (a, b) => (rank.get(a.stage.id) ?? a.stage.sequence) - (rank.get(b.stage.id) ?? b.stage.sequence),
        ),
      };
    })
    .sort(
      (a, b) =>
        (a.job.promisedBy ?? Infinity) - (b.job.promisedBy ?? Infinity) ||
        a.job.reference.localeCompare(b.job.reference),
    );
}
