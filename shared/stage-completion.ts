import {
  addWorkingMinutes,
  checkStageBookings,
  resourceCalendarOf,
  violationKey,
  type BoardIndex,
  type Booking,
  type Resource,
  type Violation,
} from './scheduler/index.ts';
import { bookingsOfStage } from './board-actions.ts';
import type { BoardData, BoardResource } from './board-data.ts';
import type { CompletionCandidate, CompletionRequirement, StageCompletion } from './schemas/bookings.ts';

/** Alternatives listed per requirement beyond the proposal: enough to choose from, short enough to read. */
export const COMPLETION_ALTERNATIVES = 8;

/** A resource whose kind the stage does not ask for: the words both the board and the server use. */
export function wrongKindMessage(
  stageName: string,
  resource: { name?: string; kind: string },
  kinds: readonly string[],
): string {
  const words = (k: string) => k.replace(/_/g, ' ');
  const a = /^[aeiou]/.test(resource.kind) ? 'an' : 'a';
  return `${resource.name ?? words(resource.kind)} is ${a} ${words(resource.kind)}; '${stageName}' needs ${kinds.map(words).join(', ')}.`;
}

/**
 * The engine's order of choice for a requirement (the same as auto-place): the job's own firm
 * first, owned before hired, then by id — cheapest and closest first; partners' come after.
 */
export function candidateOrder(index: BoardIndex, kind: string, firmId: string | undefined): Resource[] {
  return (index.resourcesByKind.get(kind) ?? [])
    .slice()
    .sort(
      (a, b) =>
        Number(a.firmId !== firmId) - Number(b.firmId !== firmId) ||
        Number(a.hired === true) - Number(b.hired === true) ||
        (a.id < b.id ? -1 : 1),
    );
}

const errorsOf = (index: BoardIndex, stageId: string, own: readonly Booking[]): Violation[] =>
  checkStageBookings(index, stageId, own, { errorsOnly: true }).filter((v) => v.kind !== 'capacity');

/**
 * What it takes to book a stage as a whole at `start`: for each requirement, the resources it has
 * (its active bookings, plus `resourceId` when one was just dropped), the engine's proposal for
 * the rest and the alternatives. A candidate is free when adding its booking (start to its
 * calendar's end of the stage's working time) brings no new error (clash, busy elsewhere, not
 * working then, not on hire, lead time, one person in two places); the stage being short of other
 * kinds is not counted, as that is what the proposal fills.
 *
 * @example
 * completeStage(data, index, { stageId: 'excavate-7', start: mon0800, resourceId: 'excavator-1' })
 * // { requirements: [{ kind: 'groundworks_crew', proposed: [{ name: 'Millstone gang', … }], short: 0 }, …], complete: true }
 */
export function completeStage(
  data: BoardData,
  index: BoardIndex,
  request: { stageId: string; start: number; resourceId?: string },
): StageCompletion {
  const stage = index.stages.get(request.stageId)?.stage;
  if (!stage) throw new RangeError(`Stage ${request.stageId} is not on the board`);
  const job = data.jobs.find((j) => j.id === stage.jobId);
  const byId = new Map<string, BoardResource>(data.resources.map((r) => [r.id, r]));
  const iso = (t: number) => new Date(t).toISOString();
  const bookingAt = (resourceId: string, n: number): Booking => {
    const end = addWorkingMinutes(resourceCalendarOf(index, resourceId), request.start, stage.durationMinutes);
    return {
      id: `completion:${n}`,
      stageId: stage.id,
      resourceId,
      start: request.start,
      end: end > request.start ? end : request.start + 60_000,
      state: 'pencilled',
      installerFirmId: job?.firmId ?? '',
    };
  };
  const chosen: Booking[] = [...bookingsOfStage(index, stage.id)];
  if (request.resourceId && !chosen.some((b) => b.resourceId === request.resourceId))
    chosen.push(bookingAt(request.resourceId, 0));
  const baseline = new Set(errorsOf(index, stage.id, chosen).map(violationKey));
  let n = 1;

  const candidate = (r: Resource, booking: Booking, reason?: string): CompletionCandidate => {
    const shown = byId.get(r.id);
    return {
      resourceId: r.id,
      name: shown?.name ?? r.name ?? r.id,
      firmName: shown?.firmName ?? '',
      ownership: shown?.ownership ?? (r.hired ? 'hired' : 'owned'),
      startsAt: iso(booking.start),
      endsAt: iso(booking.end),
      free: reason === undefined,
      ...(reason !== undefined ? { reason } : {}),
    };
  };

  const requirements: CompletionRequirement[] = stage.requirements.map((req) => {
    const booked = [
      ...new Set(chosen.filter((b) => index.resources.get(b.resourceId)?.kind === req.kind).map((b) => b.resourceId)),
    ];
    const proposed: CompletionCandidate[] = [];
    const free: CompletionCandidate[] = [];
    const busy: CompletionCandidate[] = [];
    for (const r of candidateOrder(index, req.kind, job?.firmId)) {
      if (chosen.some((b) => b.resourceId === r.id)) continue;
      const booking = bookingAt(r.id, n++);
      const fresh = errorsOf(index, stage.id, [...chosen, booking]).filter((v) => !baseline.has(violationKey(v)));
      if (fresh.length === 0 && booked.length + proposed.length < req.count) {
        proposed.push(candidate(r, booking));
        chosen.push(booking);
      } else if (fresh.length === 0) free.push(candidate(r, booking));
      else busy.push(candidate(r, booking, fresh[0]!.message));
    }
    const short = Math.max(0, req.count - booked.length - proposed.length);
    return {
      kind: req.kind,
      count: req.count,
      booked,
      proposed,
      alternatives: [...free, ...busy].slice(0, COMPLETION_ALTERNATIVES),
      short,
    };
  });

  return {
    stageId: stage.id,
    jobId: stage.jobId,
    stageName: stage.name,
    jobReference: job?.reference ?? '',
    startsAt: iso(request.start),
    requirements,
    complete: requirements.every((r) => r.short === 0),
  };
}
