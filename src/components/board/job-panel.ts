/** What the job panel lists: the job's stages in order with dates, float and the critical path. */
import type { BoardBooking, BoardData, BoardStage } from '@shared/board-data';
import {
  describeLag,
  formatInstant,
  unbookedPlan,
  unbookedTimesOf,
  type BoardIndex,
  type JobCriticalPath,
  type Violation,
} from '@shared/scheduler/index';
import { bookingsOfStage, dependentStageIds } from '@shared/board-actions';
import { plural } from '@shared/plural';

export interface StageLine {
  stage: BoardStage;
  booked: boolean;
  start: number | null;
  end: number | null;
  /**
   * Earliest start. For an unbooked stage, as a person would book it (the engine's unbooked-stage
   * times: after its unbooked predecessors could be done, in working time, on the booking step);
   * for a booked one (or one in a cycle), the critical path's.
   */
  earliestStart: number | null;
  floatMinutes: number | null;
  /** On the critical path with no time to spare (zero float, or late): never beside spare time. */
  critical: boolean;
  /** Its bookings, declined ones included (they stay on the board to rebook). */
  bookings: BoardBooking[];
  after: string[];
  problems: Violation[];
}

/**
 * The job's stages for the panel, in the order they happen (booked ones by their start, unbooked by
 * their earliest). `index` is the board's engine index, over the same data.
 */
export function stageLines(
  data: BoardData,
  index: BoardIndex,
  jobId: string,
  path: JobCriticalPath | undefined,
  violations: readonly Violation[],
): StageLine[] {
  const stages = data.stages.filter((s) => s.jobId === jobId);
  // One plan for the panel: each unbooked predecessor is worked out once.
  const plan = unbookedPlan(index);
  const names = new Map(data.stages.map((s) => [s.id, s.name]));
  const timing = new Map((path?.stages ?? []).map((t) => [t.stageId, t]));
  return stages
    .map((stage) => {
      const own = data.bookings.filter((b) => b.stageId === stage.id && b.state !== 'declined');
      const t = timing.get(stage.id);
      const cure = data.dependencies.some(
        (d) =>
          d.toStageId === stage.id && d.waitsForCure === true && data.stages.find((s) => s.id === d.fromStageId)?.cure,
      );
      return {
        stage,
        booked: own.length > 0,
        start: own.length ? Math.min(...own.map((b) => b.start)) : null,
        end: own.length ? Math.max(...own.map((b) => b.end)) : null,
        earliestStart: own.length ? (t?.es ?? null) : (unbookedTimesOf(plan, stage.id)?.start ?? t?.es ?? null),
        floatMinutes: t?.totalFloatMinutes ?? null,
        critical: isCritical(path, stage.id, t?.totalFloatMinutes ?? null),
        bookings: data.bookings.filter((b) => b.stageId === stage.id && !b.elsewhere),
        after: data.dependencies
          .filter((d) => d.toStageId === stage.id)
          .map((d) => {
            const lag = d.lag.amount ? ` + ${describeLag(d.lag)}` : '';
            return `${d.type === 'FS' ? 'after' : d.type} ${names.get(d.fromStageId) ?? 'another stage'}${lag}`;
          })
          .concat(cure ? ['once the base has cured'] : []),
        problems: violations.filter((v) => v.stageIds.includes(stage.id)),
      };
    })
    .sort(
      (a, b) =>
        (a.start ?? a.earliestStart ?? Infinity) - (b.start ?? b.earliestStart ?? Infinity) ||
        a.stage.sequence - b.stage.sequence,
    );
}

/**
 * Critical means no time to spare: on the job's critical path and with zero (or less) total float.
 * The engine's path is the job's least float, which may still be days; those stages are not called
 * critical, so "critical" never sits beside spare time.
 *
 * @example
 * isCritical(path, 'lift-1', 0)     // true
 * isCritical(path, 'lift-1', 3240)  // false: 6 working days spare
 */
export function isCritical(
  path: Pick<JobCriticalPath, 'criticalStageIds'> | undefined,
  stageId: string,
  floatMinutes: number | null,
): boolean {
  return floatMinutes !== null && floatMinutes <= 0 && (path?.criticalStageIds.includes(stageId) ?? false);
}

/** A working day of the float's words (common practice, no source: 9 working hours). */
const WORKING_DAY_MINUTES = 540;

/** Float in words a scheduler reads: "2.5 working days spare", "no slack", "1 working day late". */
export function floatText(minutes: number | null): string {
  if (minutes === null) return '';
  const days = Math.round((Math.abs(minutes) / WORKING_DAY_MINUTES) * 10) / 10;
  if (minutes === 0 || days === 0) return 'no slack';
  return minutes > 0 ? `${plural(days, 'working day')} spare` : `${plural(days, 'working day')} late`;
}

/** "Finishes 1 day after the promised date". */
export function lateText(lateByMs: number): string {
  return `Finishes ${plural(Math.ceil(lateByMs / 86_400_000), 'day')} after the promised date`;
}

/** A booked later stage that leaves no room for this one. */
export interface BlockingStage {
  stageId: string;
  name: string;
  start: number;
  message: string;
}

/**
 * Why the slot finder found nothing: a booked stage after this one (directly or through others)
 * that starts before this stage could even finish at its earliest, so no slot can come first.
 * `earliest` is the stage's earliest start (the critical path's); its working time is counted on
 * the calendar of a resource of `kind` (the first of the board's). Null when nothing after it is
 * in the way.
 *
 * @example
 * blockingLaterStage(data, index, 'fill-1', es, 'install_crew', 'Europe/London')
 * // { name: 'Connect and certify', message: "'Connect and certify' is booked for Tue 3 Mar 08:00, before 'Fill' could be done (Wed 4 Mar 11:00 at the earliest): move it later first." }
 */
export function blockingLaterStage(
  data: BoardData,
  index: BoardIndex,
  stageId: string,
  earliest: number,
  kind: string,
  timeZone: string,
  addMinutes: (resourceId: string, t: number, minutes: number) => number,
): BlockingStage | null {
  const stage = data.stages.find((s) => s.id === stageId);
  const resource = data.resources.find((r) => r.kind === kind);
  if (!stage || !resource) return null;
  const finish = addMinutes(resource.id, earliest, stage.durationMinutes);
  const later = dependentStageIds(index, stageId)
    .map((id) => ({ id, bookings: bookingsOfStage(index, id) }))
    .filter((x) => x.bookings.length > 0)
    .map((x) => ({ id: x.id, start: Math.min(...x.bookings.map((b) => b.start)) }))
    .filter((x) => x.start < finish)
    .sort((a, b) => a.start - b.start);
  const first = later[0];
  if (!first) return null;
  const name = data.stages.find((s) => s.id === first.id)?.name ?? 'a later stage';
  return {
    stageId: first.id,
    name,
    start: first.start,
    message: `'${name}' is booked for ${formatInstant(first.start, timeZone)}, before '${stage.name}' could be done (${formatInstant(finish, timeZone)} at the earliest): move it later first.`,
  };
}
