import { describe, expect, it } from 'vitest';
import type { BoardData } from '@shared/board-data';
import { boardVisibility, hiddenCited, hiddenNote, NO_FILTER } from '@/components/board/board-search';
import { trayGroups, needsText } from '@/components/board/tray';
import { WEEK, MON } from './board-week';

const H = 3_600_000;

/** Two jobs: TW-2417 in Otley (dig booked on the excavator, lift on Crew Heron), TW-2423 in Wetherby (dig on the dumper only). */
function board(): BoardData {
  return {
    from: MON - H,
    to: MON + 7 * 24 * H,
    now: MON - 24 * H,
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
        id: 'j17',
        firmId: 'f1',
        reference: 'TW-2417',
        customerName: 'Freya Lund',
        siteTown: 'Otley',
        sitePostcode: 'LS21 3QP',
        status: 'planned',
        installationType: 'in_ground',
        promisedBy: MON + 20 * 24 * H,
      },
      {
        id: 'j23',
        firmId: 'f1',
        reference: 'TW-2423',
        customerName: 'Beth Garside',
        siteTown: 'Wetherby',
        sitePostcode: 'LS22 6XN',
        status: 'planned',
        installationType: 'in_ground',
        promisedBy: MON + 30 * 24 * H,
      },
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
        id: 's17-dig',
        jobId: 'j17',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 300,
        requirements: [
          { kind: 'excavator', count: 1 },
          { kind: 'dumper', count: 1 },
        ],
        sequence: 1,
      },
      {
        id: 's17-lift',
        jobId: 'j17',
        kind: 'lift',
        name: 'Crane lift',
        durationMinutes: 240,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
      },
      {
        id: 's17-con',
        jobId: 'j17',
        kind: 'electrical_connect',
        name: 'Connect and certify',
        durationMinutes: 240,
        requirements: [{ kind: 'electrician', count: 1 }],
        sequence: 3,
      },
      {
        id: 's23-dig',
        jobId: 'j23',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 300,
        requirements: [
          { kind: 'excavator', count: 1 },
          { kind: 'dumper', count: 1 },
        ],
        sequence: 1,
      },
      {
        id: 's23-fill',
        jobId: 'j23',
        kind: 'fill',
        name: 'Fill',
        durationMinutes: 180,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: 2,
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
    dependencies: [],
    bookings: [
      {
        id: 'b17-dig',
        stageId: 's17-dig',
        resourceId: 'r-exc',
        start: MON,
        end: MON + 5 * H,
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'b17-lift',
        stageId: 's17-lift',
        resourceId: 'r-heron',
        start: MON + 48 * H,
        end: MON + 52 * H,
        state: 'confirmed',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'b23-dig',
        stageId: 's23-dig',
        resourceId: 'r-dump',
        start: MON,
        end: MON + 5 * H,
        state: 'sent',
        installerFirmId: 'f1',
        version: 2,
      },
      {
        id: 'elsewhere-1',
        stageId: 'elsewhere:1',
        resourceId: 'r-priya',
        start: MON,
        end: MON + H,
        state: 'confirmed',
        installerFirmId: 'elsewhere',
        elsewhere: true,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

const order = (data: BoardData) => () => data.stages.map((s) => s.id);
const sorted = (ids: Iterable<string>) => [...ids].sort();

describe('the search box', () => {
  it('finds a job by its reference: the rows it is booked on, its bookings, and only its stages in the tray', () => {
    const data = board();
    const v = boardVisibility(data, { ...NO_FILTER, q: 'TW-2417' });
    expect(sorted(v.rows)).toEqual(['r-exc', 'r-heron']);
    expect(sorted(v.bookings)).toEqual(['b17-dig', 'b17-lift']);
    expect(
      trayGroups(data, order(data), v.trayStage).map((g) => [g.job.reference, g.stages.map((s) => s.stage.id)]),
    ).toEqual([['TW-2417', ['s17-dig', 's17-con']]]);
  });

  it('finds a job by its customer, its town or its postcode, whatever the case or spacing', () => {
    const data = board();
    for (const q of ['beth garside', 'Wetherby', 'ls22 6xn', 'LS226XN']) {
      const v = boardVisibility(data, { ...NO_FILTER, q });
      expect([q, sorted(v.bookings)]).toEqual([q, ['b23-dig']]);
      expect([q, trayGroups(data, order(data), v.trayStage).map((g) => g.job.reference)]).toEqual([q, ['TW-2423']]);
    }
  });

  it("finds a resource by its name: its row and every job's bookings on it; the tray keeps the stages that need its kind", () => {
    const data = board();
    const v = boardVisibility(data, { ...NO_FILTER, q: 'tracked dumper' });
    expect(sorted(v.rows)).toEqual(['r-dump']);
    expect(sorted(v.bookings)).toEqual(['b23-dig']);
    expect(trayGroups(data, order(data), v.trayStage).flatMap((g) => g.stages.map((s) => s.stage.id))).toEqual([
      's17-dig',
      's23-dig',
    ]);
  });

  it('takes several words, each found in the job or the resource', () => {
    const v = boardVisibility(board(), { ...NO_FILTER, q: 'otley heron' });
    expect(sorted(v.bookings)).toEqual(['b17-lift']);
    expect(sorted(v.rows)).toEqual(['r-heron']);
  });

  it('shows nothing, tray included, when nothing matches', () => {
    const data = board();
    const v = boardVisibility(data, { ...NO_FILTER, q: 'TW-9999' });
    expect([v.rows.size, v.bookings.size, trayGroups(data, order(data), v.trayStage).length, v.filtering]).toEqual([
      0,
      0,
      0,
      true,
    ]);
  });

  it("without a search shows every row and booking (another installer's block too)", () => {
    const v = boardVisibility(board(), NO_FILTER);
    expect(v.rows.size).toBe(4);
    expect(sorted(v.bookings)).toEqual(['b17-dig', 'b17-lift', 'b23-dig', 'elsewhere-1']);
    expect(v.filtering).toBe(false);
  });
});

describe('the job and state filters', () => {
  it('narrow the bookings and the tray to the job, and keep every row', () => {
    const data = board();
    const v = boardVisibility(data, { ...NO_FILTER, jobId: 'j23' });
    expect(sorted(v.bookings)).toEqual(['b23-dig', 'elsewhere-1']);
    expect(v.rows.size).toBe(4);
    expect(trayGroups(data, order(data), v.trayStage).map((g) => g.job.reference)).toEqual(['TW-2423']);
    expect(sorted(boardVisibility(data, { ...NO_FILTER, state: 'confirmed' }).bookings)).toEqual([
      'b17-lift',
      'elsewhere-1',
    ]);
  });

  it('never hide a booking a refusal cites: it is named by its job, and shown once revealed, with its row', () => {
    const data = board();
    const filters = { ...NO_FILTER, jobId: 'j17', firmId: 'f2' };
    const v = boardVisibility(data, filters);
    const hidden = hiddenCited(data, v, ['b17-dig', 'b23-dig', 'elsewhere-1']);
    expect(hidden).toEqual([
      { bookingId: 'b17-dig', jobId: 'j17', reference: 'TW-2417' },
      { bookingId: 'b23-dig', jobId: 'j23', reference: 'TW-2423' },
    ]);
    expect(hiddenNote(hidden)).toBe('(TW-2417, TW-2423 are hidden by the filters)');
    const shown = boardVisibility(data, filters, new Set(['b23-dig']));
    expect(shown.bookings.has('b23-dig')).toBe(true);
    expect(shown.rows.has('r-dump')).toBe(true);
    expect(hiddenCited(data, shown, ['b23-dig'])).toEqual([]);
  });
});

describe('the tray', () => {
  it('keeps a stage that is only partly booked, saying what it still needs', () => {
    const data = board();
    const [g17] = trayGroups(data, order(data));
    const dig = g17!.stages.find((s) => s.stage.id === 's17-dig')!;
    expect(dig).toMatchObject({ short: [{ kind: 'dumper', count: 1 }], bookedCount: 1, startsAt: MON });
    expect(needsText(dig.short)).toBe('needs 1 dumper');
    expect(g17!.stages.map((s) => s.stage.id)).not.toContain('s17-lift');
  });

  it('shows a decline beside the stage it puts back', () => {
    const data = board();
    data.bookings.push({
      id: 'b17-con',
      stageId: 's17-con',
      resourceId: 'r-priya',
      start: MON + 72 * H,
      end: MON + 76 * H,
      state: 'declined',
      installerFirmId: 'f1',
      version: 3,
    });
    const con = trayGroups(data, order(data))[0]!.stages.find((s) => s.stage.id === 's17-con')!;
    expect(con).toMatchObject({
      short: [{ kind: 'electrician', count: 1 }],
      bookedCount: 0,
      declinedBy: ['Brightspark Electrical'],
    });
  });
});

describe('counting what a stage still needs', () => {
  it('counts kinds whose label is a plural or a pair in words that read right', async () => {
    const { countOfKind } = await import('@/components/board/tray');
    expect(countOfKind(1, 'dumper')).toBe('1 dumper');
    expect(countOfKind(2, 'pallet_truck')).toBe('2 pallet trucks');
    expect(countOfKind(1, 'rollers')).toBe('1 set of rollers');
    expect(countOfKind(1, 'spoil_removal')).toBe('1 skip or grab lorry');
    expect(countOfKind(2, 'spoil_removal')).toBe('2 skips or grab lorries');
  });
});
