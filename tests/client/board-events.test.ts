import { describe, expect, it } from 'vitest';
import { ownViolations, type BoardData } from '@shared/board-data';
import type { Violation } from '@shared/scheduler/index';
import {
  closuresOf,
  eventsOf,
  groupHeading,
  groupOf,
  holidaysOf,
  offHireOf,
  problemsByBooking,
  rowsOf,
  trayOf,
} from '@/components/board/board-events';
import { WEEK, MON, boardJob } from './board-week';

function board(): BoardData {
  return {
    from: MON - 3_600_000,
    to: MON + 7 * 86_400_000,
    now: MON - 86_400_000,
    firmId: 'f1',
    calendars: [
      {
        id: 'c1',
        timeZone: 'Europe/London',
        weekly: WEEK.map((d) => d.map(([a, b]) => [a, b] as const)),
        holidayRegion: { country: 'GB', state: 'ENG' },
        closures: [{ start: MON + 86_400_000, end: MON + 2 * 86_400_000 }],
      },
    ],
    resources: [
      {
        id: 'r1',
        firmId: 'f1',
        category: 'crew',
        kind: 'install_crew',
        calendarId: 'c1',
        name: 'Crew Heron',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
      {
        id: 'r2',
        firmId: 'f1',
        category: 'machine',
        kind: 'excavator',
        calendarId: 'c1',
        hired: true,
        name: '3 t excavator',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'hired',
      },
      {
        id: 'r3',
        firmId: 'f2',
        category: 'person',
        kind: 'electrician',
        calendarId: 'c1',
        name: 'Priya',
        firmName: 'Brightspark',
        firmKind: 'electrical',
        ownership: 'partner',
      },
    ],
    jobs: [
      boardJob({ reference: 'TW-1', installationType: 'in_ground', promisedBy: MON + 20 * 86_400_000 }),
      {
        id: 'elsewhere',
        firmId: 'elsewhere',
        reference: '',
        customerName: '',
        siteTown: '',
        status: 'planned',
        installationType: 'slab',
        promisedBy: null,
      },
    ],
    stages: [
      {
        id: 's1',
        jobId: 'j1',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 720,
        requirements: [{ kind: 'excavator', count: 1 }],
        sequence: 1,
      },
      {
        id: 's2',
        jobId: 'j1',
        kind: 'lift',
        name: 'Crane lift',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
      },
      {
        id: 's3',
        jobId: 'j1',
        kind: 'fill',
        name: 'Fill',
        durationMinutes: 180,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 3,
      },
      {
        id: 'elsewhere:1',
        jobId: 'elsewhere',
        kind: 'elsewhere',
        name: 'Busy elsewhere',
        durationMinutes: 60,
        requirements: [],
        sequence: 0,
      },
    ],
    dependencies: [
      { id: 'd1', fromStageId: 's2', toStageId: 's3', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
    ],
    bookings: [
      {
        id: 'b1',
        stageId: 's1',
        resourceId: 'r2',
        start: MON,
        end: MON + 9 * 3_600_000,
        state: 'confirmed',
        installerFirmId: 'f1',
        version: 3,
      },
      {
        id: 'b2',
        stageId: 's2',
        resourceId: 'r1',
        start: MON + 86_400_000,
        end: MON + 86_400_000 + 4 * 3_600_000,
        state: 'declined',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'elsewhere-1',
        stageId: 'elsewhere:1',
        resourceId: 'r3',
        start: MON,
        end: MON + 3_600_000,
        state: 'confirmed',
        installerFirmId: 'elsewhere',
        elsewhere: true,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

describe('rows on the board', () => {
  it('come grouped: own crews, own machines, hired machines, each partner firm, then people', () => {
    const rows = rowsOf(board());
    expect(rows.map((r) => [r.title, groupHeading(r.group)])).toEqual([
      ['Crew Heron', 'Our crews'],
      ['3 t excavator', 'Hired machines'],
      ['Priya', 'Brightspark'],
    ]);
    expect(rows.map((r) => r.group).sort()).toEqual(rows.map((r) => r.group));
    expect(groupOf({ ...board().resources[0]!, category: 'person' }).group).toBe('Our people');
  });

  it("carry each resource's weekly hours as business hours (Monday–Friday 08:00–17:00)", () => {
    const [heron] = rowsOf(board());
    expect(heron!.businessHours).toEqual(
      [1, 2, 3, 4, 5].map((d) => ({ daysOfWeek: [d], startTime: '08:00', endTime: '17:00' })),
    );
  });

  it('put a resource taken off the books in a group of its own, only where it has work in the window, closed to drops', () => {
    const data = board();
    data.resources.push(
      { ...data.resources[0]!, id: 'r4', name: 'Crew Lark', retired: true },
      { ...data.resources[0]!, id: 'r5', name: 'Crew Wren', retired: true },
    );
    // Crew Lark dug on Monday; Crew Wren's only booking loaded was the week before (its job is in play).
    data.bookings.push(
      { ...data.bookings[0]!, id: 'b4', resourceId: 'r4' },
      { ...data.bookings[0]!, id: 'b5', resourceId: 'r5', start: MON - 7 * 86_400_000, end: MON - 6 * 86_400_000 },
    );
    const rows = rowsOf(data);
    expect(rows.map((r) => [r.title, groupHeading(r.group), r.retired])).toEqual([
      ['Crew Heron', 'Our crews', false],
      ['3 t excavator', 'Hired machines', false],
      ['Priya', 'Brightspark', false],
      ['Crew Lark', 'Taken off the books', true],
    ]);
  });

  it('filter by firm, kind and search', () => {
    expect(rowsOf(board(), { firmIds: ['f2'] }).map((r) => r.id)).toEqual(['r3']);
    expect(rowsOf(board(), { kinds: ['excavator'] }).map((r) => r.id)).toEqual(['r2']);
    expect(rowsOf(board(), { search: 'bright' }).map((r) => r.id)).toEqual(['r3']);
  });
});

describe('bookings as events', () => {
  it('show job, stage and state (symbol and class), and leave declined ones off', () => {
    const events = eventsOf(board(), { canEdit: true });
    expect(events.map((e) => e.id)).toEqual(['b1', 'elsewhere-1']);
    expect(events[0]).toMatchObject({
      resourceId: 'r2',
      start: MON,
      title: '✔ TW-1 · Excavate pit',
      editable: true,
      classNames: ['wl-booking', 'wl-state-confirmed'],
    });
    expect(events[0]!.extendedProps).toMatchObject({ bookingId: 'b1', stageId: 's1', jobId: 'j1', state: 'confirmed' });
  });

  it("show another installer's booking only as busy elsewhere, never editable", () => {
    const busy = eventsOf(board(), { canEdit: true }).find((e) => e.id === 'elsewhere-1')!;
    expect(busy).toMatchObject({
      title: 'Busy elsewhere',
      editable: false,
      classNames: ['wl-booking', 'wl-elsewhere'],
    });
  });

  it("are read-only for a role that can't edit", () => {
    expect(eventsOf(board(), { canEdit: false }).every((e) => !e.editable)).toBe(true);
  });

  it('mark a booking with an error and say what is wrong', () => {
    const problems = problemsByBooking([
      {
        kind: 'clash',
        severity: 'error',
        stageIds: ['s1'],
        resourceIds: ['r2'],
        bookingIds: ['b1'],
        message: 'The excavator is booked twice',
      },
    ]);
    const [e] = eventsOf(board(), { canEdit: true, problems });
    expect(e!.title).toBe('⚠ ✔ TW-1 · Excavate pit');
    expect(e!.classNames).toContain('wl-has-problem');
    expect(e!.extendedProps.problems).toEqual(['The excavator is booked twice']);
  });

  it("never show another installer's problems on a busy-elsewhere block", () => {
    // Two of the other installer's bookings overlapping, or one outside the partner's hours, are not this board's business.
    const problems = problemsByBooking([
      {
        kind: 'availability',
        severity: 'error',
        stageIds: ['elsewhere:1'],
        resourceIds: ['r3'],
        bookingIds: ['elsewhere-1'],
        message: 'Priya is not working then',
      },
    ]);
    const busy = eventsOf(board(), { canEdit: true, problems }).find((e) => e.id === 'elsewhere-1')!;
    expect(busy.extendedProps.problems).toEqual([]);
    expect(busy.classNames).toEqual(['wl-booking', 'wl-elsewhere']);
  });

  it('filter by job and state, keeping busy blocks', () => {
    expect(eventsOf(board(), { canEdit: true, filter: { states: ['pencilled'] } }).map((e) => e.id)).toEqual([
      'elsewhere-1',
    ]);
    expect(eventsOf(board(), { canEdit: true, filter: { jobId: 'j1' } }).map((e) => e.id)).toEqual([
      'b1',
      'elsewhere-1',
    ]);
  });
});

describe('shading and the tray', () => {
  it('shade closures on the rows that work to that calendar', () => {
    expect(closuresOf(board())).toEqual([
      {
        id: 'closure-c1-0',
        resourceIds: ['r1', 'r2', 'r3'],
        start: MON + 86_400_000,
        end: MON + 2 * 86_400_000,
        display: 'background',
        classNames: ['wl-closed'],
        title: 'Not working',
      },
    ]);
  });

  it('say why a closure is, where the board was told', () => {
    const data = board();
    data.calendars[0]!.closures = [{ start: MON + 86_400_000, end: MON + 2 * 86_400_000, reason: 'Dentist' }];
    expect(closuresOf(data).map((c) => c.title)).toEqual(['Not working: Dentist']);
  });

  it("shade a hired machine's time on no hire: before its first hire, between hires, all of it with none", () => {
    const data = board();
    const H = 3_600_000,
      D = 86_400_000;
    const hire = (id: string, resourceId: string, onHire: number, offHire: number) => ({
      id,
      resourceId,
      onHire,
      offHire,
      dayRatePence: 14500,
    });
    // A hire Mon 08:00 – Thu 00:00 with a second one inside it, then one from Sat running past the
    // range; a hire of another row, and one that ended before the range, change nothing.
    data.hirePeriods = [
      hire('h2', 'r2', MON + D, MON + 2 * D),
      hire('h1', 'r2', MON + 8 * H, MON + 3 * D),
      hire('h3', 'r2', MON + 5 * D, MON + 9 * D),
      hire('h4', 'r1', MON, MON + D),
      hire('h0', 'r2', MON - 30 * D, MON - 20 * D),
    ];
    const spans = (d: BoardData) => offHireOf(d).map((b) => [b.resourceIds, b.start, b.end, b.classNames, b.title]);
    expect(spans(data)).toEqual([
      [['r2'], data.from, MON + 8 * H, ['wl-off-hire'], 'Off hire'],
      [['r2'], MON + 3 * D, MON + 5 * D, ['wl-off-hire'], 'Off hire'],
    ]);
    data.hirePeriods = [];
    expect(spans(data)).toEqual([[['r2'], data.from, data.to, ['wl-off-hire'], 'Off hire']]);
  });

  it('list unbooked stages per job in dependency order (a declined booking puts a stage back)', () => {
    const tray = trayOf(board(), () => ['s3', 's2']);
    expect(tray.map((t) => [t.job.reference, t.stages.map((s) => s.id)])).toEqual([['TW-1', ['s3', 's2']]]);
  });
});

describe('bank holidays on the board', () => {
  it('shade the whole local day on the rows of that calendar (Christmas Day 2026, England and Wales)', async () => {
    const { localToInstant, dayNumber } = await import('@shared/scheduler/index');
    // gov.uk bank holidays for England and Wales (from memory): Fri 25 Dec 2026, Mon 28 Dec 2026 (Boxing Day
    // substitute), as the server lists them on the calendar; New Year's Day falls outside the range.
    const holidays = [
      { date: '2026-12-25', name: 'Christmas Day' },
      { date: '2026-12-28', name: 'Boxing Day' },
      { date: '2027-01-01', name: "New Year's Day" },
    ];
    const base = board();
    const data = {
      ...base,
      from: Date.UTC(2026, 11, 21),
      to: Date.UTC(2026, 11, 31),
      calendars: base.calendars.map((c) => ({ ...c, holidays })),
    };
    const days = holidaysOf(data, localToInstant, dayNumber);
    expect(days.map((d) => [new Date(d.start).toISOString(), d.name])).toEqual([
      ['2026-12-25T00:00:00.000Z', 'Christmas Day'],
      ['2026-12-28T00:00:00.000Z', 'Boxing Day'],
    ]);
    expect(days.every((d) => d.end - d.start === 86_400_000)).toBe(true);
  });
});

describe("the board's own problems", () => {
  const v = (bookingIds: string[], stageIds: string[], message: string): Violation => ({
    kind: 'clash',
    severity: 'error',
    stageIds,
    resourceIds: ['r3'],
    bookingIds,
    message,
  });

  it('drop a problem that involves only busy-elsewhere blocks and keep every one that names own work', () => {
    const others = v(['elsewhere-1', 'elsewhere-2'], ['elsewhere:1', 'elsewhere:2'], 'Priya is booked twice');
    const mine = v(['b1'], ['s1'], 'Priya is busy elsewhere');
    const mixed = v(['b1', 'elsewhere-1'], ['s1', 'elsewhere:1'], 'both');
    const noIds = v([], [], 'The digger stands idle');
    const data = board();
    data.bookings.push({ ...data.bookings[2]!, id: 'elsewhere-2', stageId: 'elsewhere:2' });
    data.stages.push({ ...data.stages[3]!, id: 'elsewhere:2' });
    expect(ownViolations(data, [others, mine, mixed, noIds]).map((x) => x.message)).toEqual([
      'Priya is busy elsewhere',
      'both',
      'The digger stands idle',
    ]);
  });
});
