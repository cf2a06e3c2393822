import { assertBookingStep, DEFAULT_BOOKING_STEP_MINUTES } from './booking-step.js';
import { addBooking, bookingLists, orderedByResource, sortInPlace } from './booking-lists.js';
import { compileCalendar, type CompiledCalendar } from './calendar.js';
import { SchedulerError } from './errors.js';
import { findCycles } from './graph.js';
import { IdMap } from './id-map.js';
import type { Board, BoardOptions, Booking, Dependency, HirePeriod, Job, Resource, Stage } from './types.js';

export { compareBookings } from './booking-lists.js';

/** Bookings on one resource, sorted by start then id, with the longest length for window scans. */
export interface ResourceBookings {
  list: Booking[];
  maxLength: number;
}

/** A resource and the calendar it works to. */
export interface ResourceInfo {
  resource: Resource;
  cal: CompiledCalendar;
}

/** A dependency with both ends resolved. */
export interface DepLink {
  dep: Dependency;
  from: StageInfo;
  to: StageInfo;
}

/** A stage with what the checks need about it, resolved once. */
export interface StageInfo {
  /** Position in board.stages. */
  idx: number;
  stage: Stage;
  /** Active (not declined) bookings, sorted by id. */
  bookings: Booking[];
  depsIn: DepLink[];
  depsOut: DepLink[];
}

/**
 * Everything the checks look up, built once per board: maps by id, active (not declined)
 * bookings per stage and per resource, dependencies in and out, people per crew, hire periods
 * and compiled calendars. The index copies what it sorts; the board is never changed.
 */
export interface BoardIndex {
  readonly board: Board;
  readonly now: number;
  /** The booking step in minutes that times worked out for people are rounded up to. */
  readonly stepMinutes: number;
  /** False when the board holds only part of the bookings: unbooked predecessors are not checked. */
  readonly seesAllBookings: boolean;
  /** Stages by id, with their bookings and dependencies (read-only: see IdMap). */
  readonly stages: ReadonlyMap<string, StageInfo>;
  /** The same, in board order. */
  readonly stageList: StageInfo[];
  readonly jobs: Map<string, Job>;
  readonly resources: Map<string, Resource>;
  readonly calendars: Map<string, CompiledCalendar>;
  /** Each resource with its compiled calendar. */
  readonly resourceInfo: Map<string, ResourceInfo>;
  readonly bookingsByResource: Map<string, ResourceBookings>;
  readonly personsOfResource: Map<string, string[]>;
  readonly resourcesOfPerson: Map<string, string[]>;
  readonly hireByResource: Map<string, HirePeriod[]>;
  readonly resourcesByKind: Map<string, Resource[]>;
  readonly cycles: string[][];
  /** Stages in dependency order (those in or behind a cycle left out). */
  readonly order: StageInfo[];
  /** Stages in or behind a cycle. */
  readonly blocked: ReadonlySet<string>;
}

/** Options for {@link createBoardIndex}. */
export interface BoardIndexOptions extends BoardOptions {
  /**
   * False when the board holds only part of the bookings (a crew member's own rows): a stage with
   * none here may be booked where this reader can't see, so the unbooked-predecessor check is
   * skipped. Default true.
   */
  seesAllBookings?: boolean;
}

function push<K, V>(m: Map<K, V[]>, k: K, v: V): void {
  const l = m.get(k);
  if (l === undefined) m.set(k, [v]);
  else l.push(v);
}

// Shared, frozen empty lists: most stages have few links, and allocating three arrays for each of
// 20,000 stages showed up in the benchmark. Anything that adds replaces the list first.
const EMPTY_BOOKINGS = Object.freeze([]) as unknown as Booking[];
const EMPTY_LINKS = Object.freeze([]) as unknown as DepLink[];

/**
 * A stage's links with one more: a new list for the first, a copy of a list shared with the other
 * end of its one link (see createBoardIndex), otherwise the list itself.
 */
function withLink(links: DepLink[], link: DepLink, shared: boolean): DepLink[] {
  if (links.length === 0) return [link];
  if (shared) return [links[0] as DepLink, link];
  links.push(link);
  return links;
}

function byId(a: Booking, b: Booking): number {
  return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

function stageIdOf(info: StageInfo): string {
  return info.stage.id;
}

function byOnHire(a: HirePeriod, b: HirePeriod): number {
  return a.onHire - b.onHire;
}

/**
 * A resource's people, sorted and each once: its `personIds` and itself when it is a person
 * (what `[...new Set(ids)].sort()` gives, without the Set and spread per resource).
 */
function peopleOf(r: Resource): string[] {
  const ids = r.personIds ?? EMPTY_IDS;
  const list: string[] = [];
  for (const id of ids) {
    // Anything but a string sorts by its text: leave that to the general way.
    if (typeof id !== 'string') return [...new Set([...ids, ...(r.category === 'person' ? [r.id] : [])])].sort();
    if (!list.includes(id)) list.push(id);
  }
  if (r.category === 'person' && !list.includes(r.id)) list.push(r.id);
  sortInPlace(list, byText);
  return list;
}

const EMPTY_IDS: readonly string[] = Object.freeze([]);

function byText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Kahn's algorithm over the resolved links, taking the most recently freed stage first (a stack),
 * so each job's stages come out together; Tarjan's only over what it could not order.
 */
function orderStages(list: StageInfo[]): { order: StageInfo[]; blocked: Set<string>; cycles: string[][] } {
  const indeg = new Int32Array(list.length);
  for (const s of list) indeg[s.idx] = s.depsIn.length;
  const stack: StageInfo[] = [];
  for (let i = list.length - 1; i >= 0; i--) {
    const s = list[i] as StageInfo;
    if (indeg[s.idx] === 0) stack.push(s);
  }
  // Made at its full length (20,000 pushes grew it through a dozen copies); cut short by a cycle.
  const order: StageInfo[] = new Array<StageInfo>(list.length);
  let ordered = 0;
  while (stack.length > 0) {
    const s = stack.pop() as StageInfo;
    order[ordered++] = s;
    for (let k = s.depsOut.length - 1; k >= 0; k--) {
      const to = (s.depsOut[k] as DepLink).to;
      const left = (indeg[to.idx] as number) - 1;
      indeg[to.idx] = left;
      if (left === 0) stack.push(to);
    }
  }
  if (ordered === list.length) return { order, blocked: new Set(), cycles: [] };
  order.length = ordered;
  const rest = list.filter((s) => (indeg[s.idx] as number) > 0);
  const blocked = new Set(rest.map((s) => s.stage.id));
  const deps = rest.flatMap((s) => s.depsOut.filter((l) => blocked.has(l.to.stage.id)).map((l) => l.dep));
  return { order, blocked, cycles: findCycles([...blocked], deps) };
}

/**
 * The stage with an id, as `stages.get(id)` gives it. Bookings and dependencies mostly come stage
 * by stage in board order, so the stage at the cursor and the one after it are tried first: a
 * string comparison instead of a map look-up for most of the index's 60,000 look-ups.
 */
function findStage(
  list: readonly StageInfo[],
  stages: ReadonlyMap<string, StageInfo>,
  id: string,
  cursor: { at: number; usable: boolean },
): StageInfo | undefined {
  if (cursor.usable) {
    const here = list[cursor.at];
    if (here !== undefined && here.stage.id === id) return here;
    const next = list[cursor.at + 1];
    if (next !== undefined && next.stage.id === id) {
      cursor.at++;
      return next;
    }
  }
  const info = stages.get(id);
  if (info !== undefined) cursor.at = info.idx;
  return info;
}

/**
 * Builds the lookup index for a board. Call once; `checkMove` and the slot finder reuse it.
 * Throws SchedulerError for unknown ids and RangeError for bookings that end before they start.
 *
 * @example
 * const index = createBoardIndex(board, { now: Date.UTC(2026, 4, 1) })
 * checkMove(index, { stageId: 'lift-1', start: Date.UTC(2026, 4, 12, 7) })
 */
export function createBoardIndex(board: Board, options: BoardIndexOptions): BoardIndex {
  if (!Number.isFinite(options.now)) throw new RangeError('now must be an epoch-millisecond instant');
  const stepMinutes = options.bookingStepMinutes ?? DEFAULT_BOOKING_STEP_MINUTES;
  assertBookingStep(stepMinutes);
  const calendars = new Map<string, CompiledCalendar>();
  for (const c of board.calendars) calendars.set(c.id, compileCalendar(c));
  const resources = new Map<string, Resource>();
  const resourceInfo = new Map<string, ResourceInfo>();
  const resourcesByKind = new Map<string, Resource[]>();
  const personsOfResource = new Map<string, string[]>();
  const resourcesOfPerson = new Map<string, string[]>();
  for (const r of board.resources) {
    if (!calendars.has(r.calendarId)) {
      throw new SchedulerError(
        'unknown_calendar',
        `Resource ${r.id} works to calendar ${r.calendarId}, which is not on the board`,
      );
    }
    resources.set(r.id, r);
    resourceInfo.set(r.id, { resource: r, cal: calendars.get(r.calendarId) as CompiledCalendar });
    // The one list every search for a resource of a kind reads: one taken off the books is not in it.
    if (r.retired !== true) push(resourcesByKind, r.kind, r);
    if ((r.personIds !== undefined && r.personIds.length > 0) || r.category === 'person') {
      const list = peopleOf(r);
      personsOfResource.set(r.id, list);
      for (const p of list) push(resourcesOfPerson, p, r.id);
    }
  }
  const stageList: StageInfo[] = new Array<StageInfo>(board.stages.length);
  // A plain loop (no closure per stage): this runs for every stage of every analysis.
  for (let idx = 0; idx < board.stages.length; idx++) {
    const s = board.stages[idx] as Stage;
    if (!(Number.isFinite(s.durationMinutes) && s.durationMinutes >= 0)) {
      throw new SchedulerError('invalid_duration', `Stage ${s.id} needs a duration of zero or more working minutes`);
    }
    stageList[idx] = { idx, stage: s, bookings: EMPTY_BOOKINGS, depsIn: EMPTY_LINKS, depsOut: EMPTY_LINKS };
  }
  const stages = new IdMap(stageList, stageIdOf);
  const jobs = new Map<string, Job>();
  for (const j of board.jobs) jobs.set(j.id, j);
  // Each resource's active bookings, gathered in board order (see addBooking).
  const byResource = bookingLists(board.resources.length);
  // With repeated ids the map holds the last stage of each: look-ups then go to the map alone.
  const cursor = { at: 0, usable: stages.size === stageList.length };
  // Each active booking's stage, and how many each stage has, so its list is made at its full
  // length (a list grown from one to two holds room for seventeen, and the index lives through
  // the whole analysis).
  const stageOf = new Int32Array(board.bookings.length).fill(-1);
  const counts = new Int32Array(stageList.length);
  for (let k = 0; k < board.bookings.length; k++) {
    const b = board.bookings[k] as Booking;
    if (!(Number.isFinite(b.start) && Number.isFinite(b.end) && b.end > b.start)) {
      throw new RangeError(`Booking ${b.id} must end after it starts`);
    }
    const info = findStage(stageList, stages, b.stageId, cursor);
    if (info === undefined)
      throw new SchedulerError('unknown_stage', `Booking ${b.id} is for stage ${b.stageId}, which is not on the board`);
    // A resource with a list already is on the board: one look-up for most bookings, not two.
    const no = byResource.numbers.get(b.resourceId);
    if (no === undefined && !resourceInfo.has(b.resourceId))
      throw new SchedulerError(
        'unknown_resource',
        `Booking ${b.id} is for resource ${b.resourceId}, which is not on the board`,
      );
    if (b.state === 'declined') continue;
    stageOf[k] = info.idx;
    counts[info.idx] = (counts[info.idx] as number) + 1;
    addBooking(byResource, no, b);
  }
  for (let k = 0; k < board.bookings.length; k++) {
    const at = stageOf[k] as number;
    if (at < 0) continue;
    const info = stageList[at] as StageInfo;
    const b = board.bookings[k] as Booking;
    if (info.bookings.length === 0) {
      const n = counts[at] as number;
      info.bookings = n === 1 ? [b] : new Array<Booking>(n);
      counts[at] = 0; // from here on: how many are in
    }
    info.bookings[counts[at] as number] = b;
    counts[at] = (counts[at] as number) + 1;
  }
  for (let i = 0; i < stageList.length; i++) {
    const info = stageList[i] as StageInfo;
    if (info.bookings.length > 1) sortInPlace(info.bookings, byId);
  }
  const bookingsByResource: Map<string, ResourceBookings> = orderedByResource(byResource);
  for (const d of board.dependencies) {
    const from = findStage(stageList, stages, d.fromStageId, cursor),
      to = findStage(stageList, stages, d.toStageId, cursor);
    if (from === undefined || to === undefined) {
      throw new SchedulerError('unknown_stage', `Dependency ${d.id} links a stage that is not on the board`);
    }
    const link: DepLink = { dep: d, from, to };
    // The only link out of one stage and into the next (most of a job's chain) is one list for
    // both ends: 18,000 fewer arrays that every analysis allocates and keeps to the end.
    if (from.depsOut.length === 0 && to.depsIn.length === 0) {
      from.depsOut = to.depsIn = [link];
      continue;
    }
    from.depsOut = withLink(from.depsOut, link, from.depsOut[0]?.to.depsIn === from.depsOut);
    to.depsIn = withLink(to.depsIn, link, to.depsIn[0]?.from.depsOut === to.depsIn);
  }
  const hireByResource = new Map<string, HirePeriod[]>();
  for (const h of board.hirePeriods) {
    if (!(h.offHire > h.onHire)) throw new RangeError(`Hire period ${h.id} must end after it starts`);
    push(hireByResource, h.resourceId, h);
  }
  hireByResource.forEach((l) => sortInPlace(l, byOnHire));
  const { order, blocked, cycles } = orderStages(stageList);
  return {
    board,
    now: options.now,
    stepMinutes,
    seesAllBookings: options.seesAllBookings !== false,
    stages,
    stageList,
    jobs,
    resources,
    resourceInfo,
    calendars,
    bookingsByResource,
    personsOfResource,
    resourcesOfPerson,
    hireByResource,
    resourcesByKind,
    cycles,
    order,
    blocked,
  };
}

/**
 * The compiled calendar a resource works to.
 *
 * @example
 * resourceCalendarOf(index, 'crane-1').timeZone // 'Europe/London'
 */
export function resourceCalendarOf(index: BoardIndex, resourceId: string): CompiledCalendar {
  const info = index.resourceInfo.get(resourceId);
  if (info === undefined) throw new SchedulerError('unknown_resource', `Resource ${resourceId} is not on the board`);
  return info.cal;
}

/**
 * The calendar a stage's times are counted on: its first booking's resource when booked,
 * otherwise a resource of its first required kind that the board has (the job's firm first),
 * otherwise the calendar whose id is the firm's id, otherwise the calendar of one of the firm's
 * own resources, otherwise the board's first calendar.
 *
 * @example
 * stageCalendarOf(index, 'excavation-1', bookingsOfStage(index, 'excavation-1'))
 */
export function stageCalendarOf(index: BoardIndex, stageId: string, bookings: readonly Booking[]): CompiledCalendar {
  const first = bookings[0];
  if (first !== undefined) return resourceCalendarOf(index, first.resourceId);
  const stage = index.stages.get(stageId)?.stage;
  if (stage === undefined) throw new SchedulerError('unknown_stage', `Stage ${stageId} is not on the board`);
  const firmId = index.jobs.get(stage.jobId)?.firmId;
  for (const req of stage.requirements) {
    const cal = kindCalendarOf(index, req.kind, firmId);
    if (cal !== undefined) return cal;
  }
  const firmCal = firmId === undefined ? undefined : index.calendars.get(firmId);
  if (firmCal !== undefined) return firmCal;
  // Calendars loaded from the database have their own ids: the firm's hours are its resources'.
  if (firmId !== undefined) {
    for (const info of index.resourceInfo.values()) if (info.resource.firmId === firmId) return info.cal;
  }
  const any = index.calendars.values().next();
  if (any.done) throw new SchedulerError('unknown_calendar', 'The board has no calendars');
  return any.value;
}

/**
 * The calendar of a resource of a kind (the firm's own first), or undefined when the board has none.
 *
 * @example
 * kindCalendarOf(index, 'electrician', 'installer-1')?.source.id // 'cal-electricians'
 */
export function kindCalendarOf(
  index: BoardIndex,
  kind: string,
  firmId: string | undefined,
): CompiledCalendar | undefined {
  const candidates = index.resourcesByKind.get(kind);
  if (candidates === undefined || candidates.length === 0) return undefined;
  const own = candidates.find((r) => r.firmId === firmId) ?? (candidates[0] as Resource);
  return index.resourceInfo.get(own.id)?.cal;
}

const NONE: readonly Booking[] = Object.freeze([]);

/**
 * Active bookings of a stage (an empty list for an unknown or unbooked stage).
 *
 * @example
 * bookingsOfStage(index, 'lift-1').map(b => b.resourceId) // ['crane-1', 'crew-a']
 */
export function bookingsOfStage(index: BoardIndex, stageId: string): readonly Booking[] {
  return index.stages.get(stageId)?.bookings ?? NONE;
}

/**
 * Earliest start of a non-empty set of bookings (no allocation; hot path).
 *
 * @example
 * spanStart(bookings) // epoch ms
 */
export function spanStart(bookings: readonly Booking[]): number {
  let t = (bookings[0] as Booking).start;
  for (let i = 1; i < bookings.length; i++) {
    const s = (bookings[i] as Booking).start;
    if (s < t) t = s;
  }
  return t;
}

/**
 * Latest end of a non-empty set of bookings (no allocation; hot path).
 *
 * @example
 * spanEnd(bookings) // epoch ms
 */
export function spanEnd(bookings: readonly Booking[]): number {
  let t = (bookings[0] as Booking).end;
  for (let i = 1; i < bookings.length; i++) {
    const e = (bookings[i] as Booking).end;
    if (e > t) t = e;
  }
  return t;
}

/**
 * Earliest start and latest end of a set of bookings (null for none).
 *
 * @example
 * spanOf([{ start: 1, end: 5 }, { start: 3, end: 9 }] as Booking[]) // { start: 1, end: 9 }
 */
export function spanOf(bookings: readonly Booking[]): { start: number; end: number } | null {
  if (bookings.length === 0) return null;
  let start = Number.POSITIVE_INFINITY,
    end = Number.NEGATIVE_INFINITY;
  for (const b of bookings) {
    if (b.start < start) start = b.start;
    if (b.end > end) end = b.end;
  }
  return { start, end };
}
