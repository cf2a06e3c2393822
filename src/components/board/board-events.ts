/**
 * The board's data turned into what the resource timeline draws: rows (resources, grouped by firm
 * and kind), events (bookings) and background blocks (holidays, closures, absences, a hired
 * machine off hire). Pure, so it is tested without a browser.
 */
import type { BoardBooking, BoardData, BoardJob, BoardResource, BoardStage } from '@shared/board-data';
import { MOVABLE_STATES } from '@shared/booking-states';
import type { BookingState, Violation } from '@shared/scheduler/index';

export interface RowInput {
  id: string;
  title: string;
  /** Group, as "<order>|<heading>", e.g. "0|Our crews" or "3 Fellside Crane Hire|Fellside Crane Hire". */
  group: string;
  /** Sort key of the group, so our own rows come first. */
  groupOrder: string;
  kind: string;
  firmId: string;
  businessHours: { daysOfWeek: number[]; startTime: string; endTime: string }[];
  /** Taken off the firm's books: shown for its bookings, nothing may be dropped on it. */
  retired: boolean;
}

export interface EventInput {
  id: string;
  resourceId: string;
  start: number;
  end: number;
  title: string;
  classNames: string[];
  editable: boolean;
  extendedProps: {
    bookingId: string;
    stageId: string;
    jobId: string;
    state: BookingState;
    elsewhere: boolean;
    problems: string[];
    /** What a booking's label shows: job reference, stage (name and kind), town, and its markers. */
    reference: string;
    stageName: string;
    stageKind: string;
    town: string;
    markers: BookingMarker[];
  };
}

export interface BackgroundInput {
  id: string;
  resourceIds: string[];
  start: number;
  end: number;
  display: 'background';
  classNames: string[];
  title: string;
}

/** Our own names for booking states, each with a symbol so colour is never the only sign. */
export const STATE_LABELS: Record<BookingState, { label: string; symbol: string; description: string }> = {
  pencilled: { label: 'Pencilled', symbol: '✎', description: 'planned, nobody asked yet' },
  sent: { label: 'Asked', symbol: '✉', description: 'request sent, waiting for an answer' },
  confirmed: { label: 'Confirmed', symbol: '✔', description: 'the firm said yes' },
  declined: { label: 'Declined', symbol: '✖', description: 'the firm said no' },
  on_site: { label: 'On site', symbol: '▶', description: 'work under way' },
  done: { label: 'Done', symbol: '■', description: 'finished' },
};

/**
 * Marks a booking can carry besides its state; the symbol leads the title, the class draws the edge.
 * Symbols are text characters of the system sans (DejaVu Sans on Debian, the usual fallback behind
 * Work Sans), never emoji-presentation characters, which draw as empty boxes where no emoji font is
 * installed: the overdue clock is ◷ (U+25F7), not ⏰ (U+23F0).
 */
export const BOOKING_MARKERS = {
  problem: {
    symbol: '⚠',
    label: 'Problem',
    description: 'breaks a rule: open the job to see which',
    className: 'wl-has-problem',
  },
  overdue: {
    symbol: '◷',
    label: 'Answer overdue',
    description: 'the partner has not answered by the reminder time',
    className: 'wl-overdue',
  },
  proposed: {
    symbol: '⇄',
    label: 'Other time proposed',
    description: 'the partner proposed another time: open the job to accept or refuse it',
    className: 'wl-proposed',
  },
} as const;
export type BookingMarker = keyof typeof BOOKING_MARKERS;

/** Blocks that are not this board's bookings: another installer's work, closures and absences, public holidays. */
export const BOARD_BLOCKS = {
  elsewhere: {
    label: 'Busy elsewhere',
    description: 'booked by another installer (no details are shared)',
    className: 'wl-elsewhere',
  },
  closed: { label: 'Not working', description: 'closure or absence', className: 'wl-closed' },
  holiday: { label: 'Public holiday', description: "a holiday in the resource's region", className: 'wl-holiday' },
  offHire: {
    label: 'Off hire',
    description: 'a hired machine with no hire recorded for that time',
    className: 'wl-off-hire',
  },
} as const;

const KIND_LABELS: Record<string, string> = {
  install_crew: 'install crew',
  groundworks_crew: 'groundworks crew',
  electrician: 'electrician',
  crane: 'crane',
  excavator: 'excavator',
  dumper: 'dumper',
  pallet_truck: 'pallet truck',
  rollers: 'rollers',
  lorry: 'lorry',
  installer: 'installer',
  lift_planner: 'lift planner',
  spoil_removal: 'skips / grab lorry',
};

/** The heading shown for a row group. */
export function groupHeading(group: string): string {
  return group.slice(group.indexOf('|') + 1);
}

/** The heading a resource's row sits under: crews, machines, hired machines, partner firms, people. */
export function groupOf(r: BoardResource): { group: string; order: string } {
  if (r.retired) return { group: 'Taken off the books', order: '5' };
  if (r.ownership === 'partner') return { group: r.firmName, order: `3 ${r.firmName}` };
  if (r.ownership === 'hired') return { group: 'Hired machines', order: '2' };
  if (r.category === 'machine') return { group: 'Our machines', order: '1' };
  // People mostly work as part of a crew: their own rows come last.
  return r.category === 'crew' ? { group: 'Our crews', order: '0' } : { group: 'Our people', order: '4' };
}

export function kindLabel(kind: string): string {
  return KIND_LABELS[kind] ?? kind.replace(/_/g, ' ');
}

const hhmm = (minute: number) =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(minute % 60).padStart(2, '0')}`;

export interface RowFilter {
  firmIds?: string[];
  kinds?: string[];
  search?: string;
}

/** Rows for the timeline: grouped, filtered, with each resource's weekly hours as business hours. */
export function rowsOf(data: BoardData, filter: RowFilter = {}): RowInput[] {
  const calendars = new Map(data.calendars.map((c) => [c.id, c]));
  const search = filter.search?.trim().toLowerCase();
  // A resource taken off the books is drawn only where it has work in the window (its job may be
  // in play for later stages, and its past booking loaded with it).
  const workedIn = new Set(
    data.bookings.filter((b) => b.start < data.to && b.end > data.from).map((b) => b.resourceId),
  );
  return data.resources
    .filter((r) => !r.retired || workedIn.has(r.id))
    .filter((r) => !filter.firmIds?.length || filter.firmIds.includes(r.firmId))
    .filter((r) => !filter.kinds?.length || filter.kinds.includes(r.kind))
    .filter((r) => !search || r.name.toLowerCase().includes(search) || r.firmName.toLowerCase().includes(search))
    .map((r) => {
      const { group, order } = groupOf(r);
      const weekly = calendars.get(r.calendarId)?.weekly ?? [];
      const businessHours = weekly.flatMap((ranges, day) =>
        ranges.map(([a, b]) => ({ daysOfWeek: [day], startTime: hhmm(a), endTime: hhmm(b) })),
      );
      // The timeline orders groups by their value: the order key leads it, the label follows.
      return {
        id: r.id,
        title: r.name,
        group: `${order}|${group}`,
        groupOrder: order,
        kind: kindLabel(r.kind),
        firmId: r.firmId,
        businessHours,
        retired: r.retired === true,
      };
    })
    .sort(
      (a, b) =>
        a.groupOrder.localeCompare(b.groupOrder) || a.kind.localeCompare(b.kind) || a.title.localeCompare(b.title),
    );
}

export interface EventFilter {
  jobId?: string | null;
  states?: BookingState[];
  search?: string;
}

/** Problems per booking id, from the engine's violations. */
export function problemsByBooking(violations: readonly Violation[]): Map<string, Violation[]> {
  const out = new Map<string, Violation[]>();
  for (const v of violations) for (const id of v.bookingIds) out.set(id, [...(out.get(id) ?? []), v]);
  return out;
}

/** One event per booking; another installer's booking of a shared resource shows only as busy. */
export function eventsOf(
  data: BoardData,
  options: {
    canEdit: boolean;
    problems?: Map<string, Violation[]>;
    filter?: EventFilter;
    /** Keep declined bookings (the board shows them, to rebook). */ declined?: boolean;
  },
): EventInput[] {
  const stages = new Map<string, BoardStage>(data.stages.map((s) => [s.id, s]));
  const jobs = new Map<string, BoardJob>(data.jobs.map((j) => [j.id, j]));
  const search = options.filter?.search?.trim().toLowerCase();
  const out: EventInput[] = [];
  for (const b of data.bookings) {
    if (b.state === 'declined' && !b.elsewhere && !options.declined) continue;
    const stage = stages.get(b.stageId);
    const job = stage ? jobs.get(stage.jobId) : undefined;
    if (!stage || !job) continue;
    const f = options.filter;
    if (!b.elsewhere && f?.jobId && job.id !== f.jobId) continue;
    if (!b.elsewhere && f?.states?.length && !f.states.includes(b.state)) continue;
    const title = b.elsewhere ? 'Busy elsewhere' : `${job.reference} · ${stage.name}`;
    if (search && !b.elsewhere && !`${title} ${job.customerName} ${job.siteTown}`.toLowerCase().includes(search))
      continue;
    // A busy-elsewhere block is another installer's: its problems are not this board's to show.
    const problems = b.elsewhere
      ? []
      : (options.problems?.get(b.id) ?? []).filter((v) => v.severity === 'error').map((v) => v.message);
    out.push(toEvent(b, title, stage, job, options.canEdit, problems));
  }
  return out;
}

function toEvent(
  b: BoardBooking,
  title: string,
  stage: BoardStage,
  job: BoardJob,
  canEdit: boolean,
  problems: string[],
): EventInput {
  const state = STATE_LABELS[b.state];
  const markers = b.elsewhere
    ? []
    : ([problems.length && 'problem', b.overdue && 'overdue', b.proposal && 'proposed'].filter(
        Boolean,
      ) as BookingMarker[]);
  return {
    id: b.id,
    resourceId: b.resourceId,
    start: b.start,
    end: b.end,
    title: b.elsewhere
      ? title
      : `${markers.map((m) => `${BOOKING_MARKERS[m].symbol} `).join('')}${state.symbol} ${title}`,
    classNames: [
      'wl-booking',
      b.elsewhere ? BOARD_BLOCKS.elsewhere.className : `wl-state-${b.state}`,
      ...markers.map((m) => BOOKING_MARKERS[m].className),
    ],
    editable: canEdit && !b.elsewhere && MOVABLE_STATES.has(b.state),
    extendedProps: {
      bookingId: b.id,
      stageId: stage.id,
      jobId: job.id,
      state: b.state,
      elsewhere: Boolean(b.elsewhere),
      problems,
      reference: job.reference,
      stageName: b.elsewhere ? title : stage.name,
      stageKind: stage.kind,
      town: job.siteTown,
      markers,
    },
  };
}

/** Calendar closures and absences as shaded blocks on the rows they apply to. */
export function closuresOf(
  data: BoardData,
  holidays: { calendarId: string; start: number; end: number; name: string }[] = [],
): BackgroundInput[] {
  const rowsByCalendar = new Map<string, string[]>();
  for (const r of data.resources) rowsByCalendar.set(r.calendarId, [...(rowsByCalendar.get(r.calendarId) ?? []), r.id]);
  const out: BackgroundInput[] = [];
  for (const c of data.calendars) {
    const rows = rowsByCalendar.get(c.id);
    if (!rows) continue;
    (c.closures ?? []).forEach((span, i) => {
      if (span.end > data.from && span.start < data.to) {
        out.push({
          id: `closure-${c.id}-${i}`,
          resourceIds: rows,
          start: span.start,
          end: span.end,
          display: 'background',
          classNames: [BOARD_BLOCKS.closed.className],
          // Why, where the board was told (the reader's own firm's time away and closures).
          title: span.reason ? `${BOARD_BLOCKS.closed.label}: ${span.reason}` : BOARD_BLOCKS.closed.label,
        });
      }
    });
  }
  for (const h of holidays) {
    const rows = rowsByCalendar.get(h.calendarId);
    if (rows)
      out.push({
        id: `holiday-${h.calendarId}-${h.start}`,
        resourceIds: rows,
        start: h.start,
        end: h.end,
        display: 'background',
        classNames: [BOARD_BLOCKS.holiday.className],
        title: h.name,
      });
  }
  return out;
}

/**
 * The time in the board's range when a hired machine is on no hire (before its on-hire, after its
 * off-hire, between two hires, or all of it when none is recorded), shaded on its row: a booking
 * there is one the engine flags.
 *
 * @example
 * offHireOf(data) // [{ id: 'off-hire-r2-0', resourceIds: ['r2'], start: data.from, end: onHire, … }]
 */
export function offHireOf(data: BoardData): BackgroundInput[] {
  const out: BackgroundInput[] = [];
  for (const r of data.resources) {
    if (r.hired !== true) continue;
    const hires = data.hirePeriods
      .filter((h) => h.resourceId === r.id && h.offHire > data.from && h.onHire < data.to)
      .sort((a, b) => a.onHire - b.onHire);
    let from = data.from;
    const gap = (to: number) => {
      if (to > from)
        out.push({
          id: `off-hire-${r.id}-${out.length}`,
          resourceIds: [r.id],
          start: from,
          end: to,
          display: 'background',
          classNames: [BOARD_BLOCKS.offHire.className],
          title: BOARD_BLOCKS.offHire.label,
        });
    };
    for (const h of hires) {
      gap(h.onHire);
      from = Math.max(from, h.offHire);
    }
    gap(data.to);
  }
  return out;
}

/** The stages still waiting for a booking, per job, in the order they must happen. */
export function trayOf(data: BoardData, order: (jobId: string) => string[]): { job: BoardJob; stages: BoardStage[] }[] {
  const booked = new Set(data.bookings.filter((b) => b.state !== 'declined').map((b) => b.stageId));
  const byJob = new Map<string, BoardStage[]>();
  for (const s of data.stages)
    if (!booked.has(s.id) && s.kind !== 'elsewhere') byJob.set(s.jobId, [...(byJob.get(s.jobId) ?? []), s]);
  const jobs = new Map(data.jobs.map((j) => [j.id, j]));
  return [...byJob.entries()]
    .map(([jobId, stages]) => {
      const rank = new Map(order(jobId).map((id, i) => [id, i]));
      return {
        job: jobs.get(jobId)!,
        stages: [...stages].sort((a, b) => (rank.get(a.id) ?? a.sequence) - (rank.get(b.id) ?? b.sequence)),
      };
    })
    .filter((t) => t.job)
    .sort(
      (a, b) =>
        (a.job.promisedBy ?? Infinity) - (b.job.promisedBy ?? Infinity) ||
        a.job.reference.localeCompare(b.job.reference),
    );
}

/**
 * The public holidays each calendar carries (the server lists them for the loaded range) that fall
 * within the board's range, as whole local days — the days the engine also treats as non-working.
 */
export function holidaysOf(
  data: BoardData,
  toInstant: (timeZone: string, day: number, minute: number) => number,
  dayOf: (y: number, m: number, d: number) => number,
): { calendarId: string; start: number; end: number; name: string }[] {
  const out: { calendarId: string; start: number; end: number; name: string }[] = [];
  for (const c of data.calendars) {
    for (const h of c.holidays ?? []) {
      const [y, m, d] = h.date.split('-').map(Number) as [number, number, number];
      const day = dayOf(y, m, d);
      const start = toInstant(c.timeZone, day, 0);
      const end = toInstant(c.timeZone, day + 1, 0);
      if (end > data.from && start < data.to) out.push({ calendarId: c.id, start, end, name: h.name });
    }
  }
  return out;
}
