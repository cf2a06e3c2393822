import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope } from 'vue';
import type { BoardData } from '@shared/board-data';
import { analyseBoard } from '@shared/scheduler/index';
import { toEngineBoard, ownViolations } from '@shared/board-data';
import { useBoard } from '@/composables/useBoard';
import { useDragCheck } from '@/composables/useDragCheck';
import { useBoardFilter } from '@/composables/useBoardFilter';
import { boardAnalysisOf, boardIndexOf } from '@/components/board/engine-view';
import { stubFetch } from './fake-fetch';
import { WEEK, HOUR, MON, boardJob } from './board-week';

// Every build of the engine's index, wherever it is asked for (the board's composables or the
// engine's own analyseBoard, which imports the same module).
const built = vi.hoisted(() => ({ count: 0 }));
vi.mock('@shared/scheduler/board-index', async (importOriginal) => {
  const real = await importOriginal<typeof import('@shared/scheduler/board-index')>();
  return {
    ...real,
    createBoardIndex: (...args: Parameters<typeof real.createBoardIndex>) => {
      built.count += 1;
      return real.createBoardIndex(...args);
    },
  };
});

afterEach(() => {
  vi.unstubAllGlobals();
  built.count = 0;
});

/** Two crews; a job of a dig and a base pour, the dig booked Monday, the pour waiting in the tray. */
function board(): BoardData {
  return {
    from: MON - 8 * HOUR,
    to: MON + 7 * 24 * HOUR,
    now: MON - 24 * HOUR,
    firmId: 'f1',
    calendars: [
      { id: 'c1', timeZone: 'Europe/London', weekly: WEEK, holidays: [{ date: '2026-12-25', name: 'Christmas Day' }] },
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
        category: 'crew',
        kind: 'install_crew',
        calendarId: 'c1',
        name: 'Crew Kestrel',
        firmName: 'Tideway',
        firmKind: 'installer',
        ownership: 'owned',
      },
    ],
    jobs: [boardJob()],
    stages: [
      {
        id: 'dig',
        jobId: 'j1',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 1,
      },
      {
        id: 'base',
        jobId: 'j1',
        kind: 'base_pour',
        name: 'Pour base',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
      },
    ],
    dependencies: [
      { id: 'd1', fromStageId: 'dig', toStageId: 'base', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
    ],
    bookings: [
      {
        id: 'b1',
        stageId: 'dig',
        resourceId: 'r1',
        start: MON,
        end: MON + 4 * HOUR,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

/** What the board page holds: its data, the drag check and the rows, events and tray, unfiltered. */
function boardPage() {
  const scope = effectScope();
  const parts = scope.run(() => {
    const b = useBoard();
    const drag = useDragCheck(() => b.index.value);
    const shown = useBoardFilter({
      data: () => b.data.value,
      index: () => b.index.value,
      filters: () => ({ firm: '', kind: '', job: '', state: '', q: '' }),
      problems: () => new Map(),
      canEdit: () => true,
      revealed: () => new Set(),
      selectedStage: () => null,
    });
    return { b, drag, shown };
  })!;
  return { scope, ...parts };
}

describe("the board's engine index", () => {
  it('is built once per load, and serves the analysis, the tray and every drag check', async () => {
    const loads: string[] = [];
    stubFetch((request) => {
      loads.push(request.url);
      return { status: 200, body: board() };
    });
    const { scope, b, drag, shown } = boardPage();
    await b.load({ from: MON - 8 * HOUR, to: MON + 7 * 24 * HOUR });
    expect(loads).toHaveLength(1);

    // What the board page reads after a load: the analysis, the rows, events and tray, and drag checks.
    expect(b.analysis.value?.errorCount).toBe(0);
    expect(shown.tray.value.flatMap((t) => t.stages.map((s) => s.stage.id))).toEqual(['base']);
    expect(shown.rows.value.map((r) => r.id).sort()).toEqual(['r1', 'r2']);
    for (let hour = 0; hour < 20; hour += 1)
      drag.evaluate({
        stageId: 'dig',
        bookingId: 'b1',
        start: MON + 24 * HOUR + hour * 1800_000,
        oldStart: MON,
        resourceId: 'r2',
        oldResourceId: 'r1',
      });
    // The pour before the dig is done: refused, from the same index.
    expect(drag.evaluate({ stageId: 'base', start: MON, resourceId: 'r2' }).allowed).toBe(false);
    expect(built.count).toBe(1);

    // A saved write changes the data: one new index, again shared.
    b.merge([{ ...board().bookings[0]!, start: MON + 24 * HOUR, end: MON + 28 * HOUR, version: 2 }]);
    expect(b.analysis.value?.errorCount).toBe(0);
    expect(drag.evaluate({ stageId: 'base', start: MON + 28 * HOUR, resourceId: 'r2' }).allowed).toBe(true);
    expect(built.count).toBe(2);

    await b.load();
    expect(b.analysis.value?.violations).toEqual([]);
    expect(built.count).toBe(3);
    scope.stop();
  });

  it('never lets a load asked for before a saved write put the stage just booked back in the tray', async () => {
    const pour = {
      id: 'b2',
      stageId: 'base',
      resourceId: 'r2',
      start: MON + 24 * HOUR,
      end: MON + 28 * HOUR,
      state: 'pencilled' as const,
      installerFirmId: 'f1',
      version: 1,
    };
    // The server's board: without the pour until it is saved.
    let saved = false;
    const answers: ((body: BoardData) => void)[] = [];
    const sent = stubFetch(
      () =>
        new Promise((resolve) => {
          answers.push((body) => resolve({ status: 200, body }));
        }),
    );
    const { scope, b, shown } = boardPage();
    const serverBoard = () => ({ ...board(), bookings: [...board().bookings, ...(saved ? [pour] : [])] });
    const first = b.load({ from: MON - 8 * HOUR, to: MON + 7 * 24 * HOUR });
    answers.shift()!(serverBoard());
    await first;
    const tray = () => shown.tray.value.flatMap((t) => t.stages.map((s) => s.stage.id));
    expect(tray()).toEqual(['base']);

    // The live board reloads (another change elsewhere) as the pour is dropped: the reload is asked
    // for first, the drop's write is saved and merged, then the reload's answer (from before) comes.
    const reload = b.load();
    await vi.waitFor(() => expect(answers).toHaveLength(1));
    saved = true;
    b.merge([pour]);
    expect(tray()).toEqual([]);
    answers.shift()!({ ...board() });
    // Not shown: the board is asked again, and shows the server's board as it now is.
    await vi.waitFor(() => expect(answers).toHaveLength(1));
    expect(tray()).toEqual([]);
    answers.shift()!(serverBoard());
    await reload;
    expect(sent.filter((r) => r.url.includes('/api/board'))).toHaveLength(3);
    expect(b.data.value?.bookings.map((x) => x.id)).toEqual(['b1', 'b2']);
    expect(tray()).toEqual([]);
    scope.stop();
  });

  it("gives the same analysis as the engine's own analyseBoard", () => {
    const data = board();
    data.bookings.push({
      id: 'b2',
      stageId: 'base',
      resourceId: 'r1',
      start: MON + HOUR,
      end: MON + 5 * HOUR,
      state: 'pencilled',
      installerFirmId: 'f1',
      version: 1,
    });
    const ours = boardAnalysisOf(data, boardIndexOf(data, true));
    const engine = analyseBoard(toEngineBoard(data), { now: data.now, seesAllBookings: true });
    // The pour overlaps the dig on Crew Heron and starts before it ends: a clash and an order error.
    expect(ours.violations.map((v) => v.kind).sort()).toEqual(['clash', 'order']);
    expect(ours.violations).toEqual(ownViolations(data, engine.violations));
    expect(ours.criticalPaths).toEqual(engine.criticalPaths);
    expect([ours.errorCount, ours.warningCount]).toEqual([engine.errorCount, engine.warningCount]);
  });
});
