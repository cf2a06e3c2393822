import { afterEach, describe, expect, it, vi } from 'vitest';
import type { BoardData } from '@shared/board-data';
import { createBoardIndex } from '@shared/scheduler/index';
import { toEngineBoard } from '@shared/board-data';
import { HOLD_LONGEST_MS, useDragCheck } from '@/composables/useDragCheck';
import { dependentsChoice } from '@/components/board/move-options';
import { declinedItems, newlyDeclined } from '@/components/board/declines';
import { eventsOf } from '@/components/board/board-events';
import { blockingLaterStage, floatText, isCritical, lateText } from '@/components/board/job-panel';
import { addWorkingMinutes, resourceCalendarOf } from '@shared/scheduler/index';
import { WEEK, MON } from './board-week';

const H = 3_600_000;
const DAY = 24 * H;

/**
 * One job: the lift (Crew Heron, Monday morning), then the fill the same afternoon (Crew Otter) and,
 * a fortnight on, Brightspark's electrician connects it (sent, awaiting an answer). A dig needs an
 * excavator and a dumper; only the excavator is booked.
 */
function board(): BoardData {
  return {
    from: MON - DAY,
    to: MON + 21 * DAY,
    now: MON - DAY,
    firmId: 'f1',
    calendars: [{ id: 'c1', timeZone: 'Europe/London', weekly: WEEK.map((d) => d.map(([a, b]) => [a, b] as const)) }],
    resources: [
      {
        id: 'r-heron',
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
        id: 'r-otter',
        firmId: 'f1',
        category: 'crew',
        kind: 'install_crew',
        calendarId: 'c1',
        name: 'Crew Otter',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
      {
        id: 'r-exc',
        firmId: 'f1',
        category: 'machine',
        kind: 'excavator',
        calendarId: 'c1',
        name: '1.5 t excavator',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
      {
        id: 'r-dump',
        firmId: 'f1',
        category: 'machine',
        kind: 'dumper',
        calendarId: 'c1',
        name: 'Tracked dumper',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
      {
        id: 'r-priya',
        firmId: 'f2',
        category: 'person',
        kind: 'electrician',
        calendarId: 'c1',
        name: 'Priya Nair',
        firmName: 'Brightspark Electrical',
        firmKind: 'electrical',
        ownership: 'partner',
      },
    ],
    jobs: [
      {
        id: 'j1',
        firmId: 'f1',
        reference: 'TW-2420',
        customerName: 'Ruth Okonjo',
        siteTown: 'Burley',
        status: 'planned',
        installationType: 'in_ground',
        promisedBy: MON + 60 * DAY,
      },
    ],
    stages: [
      {
        id: 's-lift',
        jobId: 'j1',
        kind: 'lift',
        name: 'Crane lift',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 1,
      },
      {
        id: 's-fill',
        jobId: 'j1',
        kind: 'fill',
        name: 'Fill',
        durationMinutes: 180,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
      },
      {
        id: 's-con',
        jobId: 'j1',
        kind: 'electrical_connect',
        name: 'Connect and certify',
        durationMinutes: 240,
        requirements: [{ kind: 'electrician', count: 1 }],
        sequence: 3,
      },
      {
        id: 's-dig',
        jobId: 'j1',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 300,
        requirements: [
          { kind: 'excavator', count: 1 },
          { kind: 'dumper', count: 1 },
        ],
        sequence: 0,
      },
    ],
    dependencies: [
      { id: 'd1', fromStageId: 's-lift', toStageId: 's-fill', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
      { id: 'd2', fromStageId: 's-lift', toStageId: 's-con', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
    ],
    bookings: [
      {
        id: 'b-lift',
        stageId: 's-lift',
        resourceId: 'r-heron',
        start: MON,
        end: MON + 4 * H,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'b-fill',
        stageId: 's-fill',
        resourceId: 'r-otter',
        start: MON + 5 * H,
        end: MON + 8 * H,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'b-con',
        stageId: 's-con',
        resourceId: 'r-priya',
        start: MON + 14 * DAY,
        end: MON + 14 * DAY + 4 * H,
        state: 'sent',
        installerFirmId: 'f1',
        version: 2,
      },
      {
        id: 'b-dig',
        stageId: 's-dig',
        resourceId: 'r-exc',
        start: MON - 7 * DAY,
        end: MON - 7 * DAY + 5 * H,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}
const indexOf = (data: BoardData) => createBoardIndex(toEngineBoard(data), { now: data.now });

describe('moving a stage with the stages after it', () => {
  it('offers only this, those within the next 7 days, or all; defaults to the least that keeps the plan, and lists the partner asked again', () => {
    const data = board();
    // The lift a working day later: Tuesday 08:00.
    const model = dependentsChoice(data, indexOf(data), { stageId: 's-lift', start: MON + DAY });
    const [none, within, all] = model.options;
    expect(model.dependents).toBe(2);
    // Alone, the lift would end after the fill has started.
    expect(none!.breaks.join(' ')).toMatch(/'Fill'/);
    expect(within).toMatchObject({ stageIds: ['s-fill'], partner: [], breaks: [] });
    expect(all!.stageIds.sort()).toEqual(['s-con', 's-fill']);
    expect(all!.partner).toEqual([
      expect.objectContaining({
        bookingId: 'b-con',
        firmName: 'Brightspark Electrical',
        resourceName: 'Priya Nair',
        stageName: 'Connect and certify',
        state: 'sent',
      }),
    ]);
    expect(model.recommended).toBe('within');
  });

  it('defaults to only this when that keeps the plan', () => {
    const data = board();
    // An hour earlier on Monday: the fill and the connection still come after it.
    expect(dependentsChoice(data, indexOf(data), { stageId: 's-lift', start: MON - H }).recommended).toBe('none');
  });
});

describe('the drag check', () => {
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('refuses a resource of the wrong kind before the drop, in the words the server uses', () => {
    const data = board();
    const drag = useDragCheck(() => indexOf(data));
    const v = drag.evaluate({ stageId: 's-lift', start: MON + 2 * DAY, resourceId: 'r-priya' });
    expect(v).toMatchObject({
      allowed: false,
      reasons: ["Priya Nair is an electrician; 'Crane lift' needs install crew."],
    });
  });

  it('adds a resource to a partly booked stage at the time the stage is booked for, wherever it is dropped', () => {
    const data = board();
    const drag = useDragCheck(() => indexOf(data));
    const v = drag.evaluate({ stageId: 's-dig', start: MON + 2 * DAY, resourceId: 'r-dump' });
    expect(v).toMatchObject({ allowed: true, joins: true, start: MON - 7 * DAY });
  });

  it('rebooks a declined booking where it is dropped', () => {
    const data = board();
    data.bookings[2] = { ...data.bookings[2]!, state: 'declined' };
    const drag = useDragCheck(() => indexOf(data));
    const v = drag.evaluate({
      stageId: 's-con',
      bookingId: 'b-con',
      start: MON + 15 * DAY,
      oldStart: MON + 14 * DAY,
      resourceId: 'r-priya',
      oldResourceId: 'r-priya',
    });
    expect(v).toMatchObject({ allowed: true, rebooks: true, start: MON + 15 * DAY });
  });

  it('shows its reason while dragging and nothing once the button is up, though the drop is checked again', () => {
    vi.stubGlobal('window', { addEventListener: vi.fn(), removeEventListener: vi.fn() });
    const data = board();
    const drag = useDragCheck(() => indexOf(data));
    const probe = { stageId: 's-lift', start: MON + 2 * DAY, resourceId: 'r-priya' };
    drag.start();
    drag.check(probe);
    expect(drag.shown.value?.allowed).toBe(false);
    drag.stop();
    // What the drop handler runs: the same verdict, and the box stays gone.
    expect(drag.evaluate(probe).allowed).toBe(false);
    expect(drag.shown.value).toBeNull();
  });

  it('has the stage in hand from the button going down, before any verdict, until it comes up', () => {
    const win = new EventTarget();
    vi.stubGlobal('window', win);
    const drag = useDragCheck(() => indexOf(board()));
    expect(drag.inHand()).toBe(false);
    drag.start();
    // Picked up, not yet over a row: no verdict, but in hand (the live board holds its reloads).
    expect(drag.verdict.value).toBeNull();
    expect(drag.inHand()).toBe(true);
    win.dispatchEvent(new Event('pointerup'));
    expect(drag.inHand()).toBe(false);
    // A touch the browser takes over (a scroll) ends it too.
    drag.start();
    win.dispatchEvent(new Event('pointercancel'));
    expect(drag.inHand()).toBe(false);
    // A drop handled by the board itself.
    drag.start();
    drag.stop();
    expect(drag.inHand()).toBe(false);
  });

  it('lets the live board go after a minute when the button came up where the page could not see it', () => {
    vi.stubGlobal('window', new EventTarget());
    const drag = useDragCheck(() => indexOf(board()));
    const t0 = Date.now();
    drag.start();
    expect(drag.inHand(t0 + HOLD_LONGEST_MS - 1_000)).toBe(true);
    expect(drag.inHand(t0 + HOLD_LONGEST_MS + 1_000)).toBe(false);
  });

  it('names the job of a clash the filters hide, while dragging', () => {
    const data = board();
    data.jobs.push({
      id: 'j2',
      firmId: 'f1',
      reference: 'TW-2423',
      customerName: 'Beth Garside',
      siteTown: 'Wetherby',
      status: 'planned',
      installationType: 'slab',
      promisedBy: null,
    });
    data.stages.push({
      id: 's-other',
      jobId: 'j2',
      kind: 'fill',
      name: 'Fill',
      durationMinutes: 180,
      requirements: [{ kind: 'install_crew', count: 1 }],
      sequence: 1,
    });
    data.bookings.push({
      id: 'b-other',
      stageId: 's-other',
      resourceId: 'r-heron',
      start: MON + 2 * DAY,
      end: MON + 2 * DAY + 3 * H,
      state: 'pencilled',
      installerFirmId: 'f1',
      version: 1,
    });
    const drag = useDragCheck(() => indexOf(data), undefined, {
      hiddenNote: (ids) => (ids.includes('b-other') ? '(TW-2423 is hidden by the filters)' : ''),
    });
    const v = drag.evaluate({
      stageId: 's-fill',
      bookingId: 'b-fill',
      start: MON + 2 * DAY,
      oldStart: MON + 5 * H,
      resourceId: 'r-heron',
      oldResourceId: 'r-otter',
    });
    expect(v.allowed).toBe(false);
    expect(v.cited).toContain('b-other');
    expect(v.reasons[0]).toMatch(/'Fill' on TW-2420 and 'Fill' on TW-2423 .*\(TW-2423 is hidden by the filters\)$/);
  });
});

describe('declines', () => {
  it('stay on the board as events, marked declined', () => {
    const data = board();
    data.bookings[2] = { ...data.bookings[2]!, state: 'declined', declined: { at: MON - DAY, via: 'link' } };
    const event = eventsOf(data, { canEdit: true, declined: true }).find((e) => e.id === 'b-con');
    expect(event).toMatchObject({
      editable: true,
      classNames: expect.arrayContaining(['wl-state-declined']),
      extendedProps: { state: 'declined' },
    });
    expect(eventsOf(data, { canEdit: true }).map((e) => e.id)).not.toContain('b-con');
  });

  it('are listed for the scheduler with who declined and how, and told once when they arrive', () => {
    const before = board();
    const after = board();
    after.bookings[2] = {
      ...after.bookings[2]!,
      state: 'declined',
      version: 3,
      declined: { at: MON - DAY, via: 'link', reason: 'Not free that day' },
    };
    expect(newlyDeclined(before, after)).toEqual(['b-con']);
    expect(newlyDeclined(after, after)).toEqual([]);
    expect(declinedItems(after)).toEqual([
      {
        bookingId: 'b-con',
        stageId: 's-con',
        jobId: 'j1',
        stageName: 'Connect and certify',
        jobReference: 'TW-2420',
        resourceName: 'Priya Nair',
        firmName: 'Brightspark Electrical',
        start: MON + 14 * DAY,
        declinedAt: MON - DAY,
        via: 'link',
        reason: 'Not free that day',
        canSendAgain: true,
      },
    ]);
  });
});

describe('the job panel', () => {
  it('calls a stage critical only with no time to spare', () => {
    const path = { criticalStageIds: ['s-lift'] };
    expect([
      isCritical(path, 's-lift', 0),
      isCritical(path, 's-lift', -60),
      isCritical(path, 's-lift', 3240),
      isCritical(path, 's-fill', 0),
      isCritical(path, 's-lift', null),
    ]).toEqual([true, true, false, false, false]);
  });

  it('counts days in words that agree with the number', () => {
    expect([floatText(540), floatText(3240), floatText(-540), floatText(0), lateText(DAY), lateText(2 * DAY)]).toEqual([
      '1 working day spare',
      '6 working days spare',
      '1 working day late',
      'no slack',
      'Finishes 1 day after the promised date',
      'Finishes 2 days after the promised date',
    ]);
  });

  it('names the later stage that leaves no room, when the slot finder finds none', () => {
    const data = board();
    data.bookings = data.bookings.filter((b) => b.id !== 'b-lift');
    const index = indexOf(data);
    const add = (rid: string, t: number, m: number) => addWorkingMinutes(resourceCalendarOf(index, rid), t, m);
    // The lift could start Monday 08:00 at the earliest; the fill is booked for Monday 13:00, before it could be done.
    const blocking = blockingLaterStage(data, index, 's-lift', MON + 3 * H, 'install_crew', 'Europe/London', add);
    expect(blocking).toMatchObject({ stageId: 's-fill', name: 'Fill' });
    expect(blocking!.message).toMatch(
      /^'Fill' is booked for .+, before 'Crane lift' could be done \(.+ at the earliest\): move it later first\.$/,
    );
    expect(blockingLaterStage(data, index, 's-lift', MON - DAY, 'install_crew', 'Europe/London', add)).toBeNull();
  });
});
