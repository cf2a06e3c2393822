import { describe, expect, it } from 'vitest';
import { createSSRApp, h } from 'vue';
import { renderToString } from 'vue/server-renderer';
import type { BoardData } from '@shared/board-data';
import BoardDayList from '@/components/board/BoardDayList.vue';
import { dayBounds, dayListOf } from '@/components/board/day-list';
import { eventsOf, problemsByBooking, rowsOf } from '@/components/board/board-events';
import { WEEK, HOUR, boardJob } from './board-week';

// Tuesday 15 September 2026 in London (BST, UTC+1): local midnight is 23:00 UTC the day before.
const TUE = Date.UTC(2026, 8, 14, 23);
const at = (hour: number, minute = 0) => TUE + hour * HOUR + minute * 60_000;

/** Two crews, a machine and a partner's electrician; the day has bookings on three of them. */
function board(): BoardData {
  return {
    from: TUE - 48 * HOUR,
    to: TUE + 72 * HOUR,
    now: TUE,
    firmId: 'f1',
    calendars: [{ id: 'c1', timeZone: 'Europe/London', weekly: WEEK }],
    resources: [
      {
        id: 'heron',
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
        id: 'otter',
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
        id: 'digger',
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
        id: 'priya',
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
      boardJob({ installationType: 'in_ground' }),
      {
        id: 'j2',
        firmId: 'f1',
        reference: 'TW-2420',
        customerName: 'B Customer',
        siteTown: 'Pool-in-Wharfedale',
        status: 'planned',
        installationType: 'slab',
        promisedBy: null,
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
        id: 'lift',
        jobId: 'j1',
        kind: 'lift',
        name: 'Crane lift into pit',
        durationMinutes: 240,
        requirements: [],
        sequence: 4,
      },
      { id: 'fill', jobId: 'j1', kind: 'fill', name: 'Fill', durationMinutes: 180, requirements: [], sequence: 5 },
      {
        id: 'dig',
        jobId: 'j2',
        kind: 'excavation',
        name: 'Excavate pit',
        durationMinutes: 720,
        requirements: [],
        sequence: 1,
      },
      {
        id: 'connect',
        jobId: 'j2',
        kind: 'electrical_connect',
        name: 'Connect and certify',
        durationMinutes: 240,
        requirements: [],
        sequence: 6,
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
      // Out of time order on purpose: the list sorts them.
      {
        id: 'b-fill',
        stageId: 'fill',
        resourceId: 'heron',
        start: at(13),
        end: at(16),
        state: 'pencilled',
        installerFirmId: 'f1',
        version: 1,
      },
      {
        id: 'b-lift',
        stageId: 'lift',
        resourceId: 'heron',
        start: at(8),
        end: at(12),
        state: 'confirmed',
        installerFirmId: 'f1',
        version: 1,
      },
      // Began yesterday, ends this afternoon.
      {
        id: 'b-dig',
        stageId: 'dig',
        resourceId: 'digger',
        start: at(-16),
        end: at(12, 30),
        state: 'on_site',
        installerFirmId: 'f1',
        version: 2,
      },
      {
        id: 'b-connect',
        stageId: 'connect',
        resourceId: 'priya',
        start: at(9),
        end: at(13),
        state: 'sent',
        installerFirmId: 'f1',
        version: 1,
        overdue: true,
      },
      {
        id: 'elsewhere-1',
        stageId: 'elsewhere:1',
        resourceId: 'priya',
        start: at(14),
        end: at(16),
        state: 'confirmed',
        installerFirmId: 'elsewhere',
        elsewhere: true,
      },
      // Tomorrow: not on Tuesday's list.
      {
        id: 'b-later',
        stageId: 'fill',
        resourceId: 'otter',
        start: at(32),
        end: at(35),
        state: 'confirmed',
        installerFirmId: 'f1',
        version: 1,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

function inputs(outlined: string[] = []) {
  const data = board();
  const problems = problemsByBooking([
    {
      kind: 'clash',
      severity: 'error',
      stageIds: ['fill'],
      resourceIds: ['heron'],
      bookingIds: ['b-fill'],
      message: 'Crew Heron is booked twice',
    },
  ]);
  // What the board's filter adds for a report's `highlight=` link (useBoardFilter).
  const events = eventsOf(data, { canEdit: true, problems }).map((e) =>
    outlined.includes(e.id) ? { ...e, classNames: [...e.classNames, 'wl-pointed'] } : e,
  );
  return { rows: rowsOf(data), events };
}

describe('the day list', () => {
  it("bounds the firm's day by its own midnight", () => {
    expect(dayBounds('2026-09-15', 'Europe/London')).toEqual({ start: TUE, end: TUE + 24 * HOUR });
    expect(dayBounds('2026-12-15', 'Europe/London').start).toBe(Date.UTC(2026, 11, 15)); // GMT in winter
  });

  it('gives each busy resource, group by group, its bookings of the day in time order', () => {
    const { rows, events } = inputs();
    const list = dayListOf(rows, events, '2026-09-15', 'Europe/London');
    expect(
      list.groups.map((g) => [
        g.heading,
        g.resources.map((r) => [
          r.title,
          r.bookings.map((b) => `${b.time} ${b.reference} ${b.stage} ${b.town} ${b.state}`),
        ]),
      ]),
    ).toEqual([
      [
        'Our crews',
        [
          [
            'Crew Heron',
            ['08:00–12:00 TW-2417 Crane lift into pit Otley ✔ Confirmed', '13:00–16:00 TW-2417 Fill Otley ✎ Pencilled'],
          ],
        ],
      ],
      [
        'Our machines',
        [['1.5 t excavator', ['Mon 14 08:00 – 12:30 TW-2420 Excavate pit Pool-in-Wharfedale ▶ On site']]],
      ],
      [
        'Brightspark',
        [
          [
            'Priya',
            [
              '09:00–13:00 TW-2420 Connect and certify Pool-in-Wharfedale ✉ Asked',
              '14:00–16:00  Busy elsewhere  Busy elsewhere',
            ],
          ],
        ],
      ],
    ]);
    expect(list.free.map((r) => r.title)).toEqual(['Crew Otter']);
  });

  it('carries markers and problems, and leaves busy-elsewhere blocks unopenable and unmovable', () => {
    const { rows, events } = inputs();
    const heron = dayListOf(rows, events, '2026-09-15', 'Europe/London').groups[0]!.resources[0]!;
    expect(heron.bookings[1]).toMatchObject({
      markers: [{ key: 'problem', symbol: '⚠', label: 'Problem' }],
      problems: ['Crew Heron is booked twice'],
      editable: true,
    });
    const priya = dayListOf(rows, events, '2026-09-15', 'Europe/London').groups[2]!.resources[0]!;
    expect(priya.bookings[0]!.markers.map((m) => m.label)).toEqual(['Answer overdue']);
    expect(priya.bookings[1]).toMatchObject({ elsewhere: true, editable: false, stateClass: 'wl-elsewhere' });
  });
});

describe('BoardDayList', () => {
  async function render(canEdit: boolean, outlined: string[] = []): Promise<string> {
    const { rows, events } = inputs(outlined);
    return renderToString(
      createSSRApp({
        render: () => h(BoardDayList, { rows, events, date: '2026-09-15', timeZone: 'Europe/London', canEdit }),
      }),
    );
  }
  const text = (html: string) =>
    html
      .replace(/<!--[\s\S]*?-->/g, '')
      .replace(/<[^>]+>/g, ' ')
      .replace(/\s+/g, ' ')
      .trim();

  it('shows resource names, then each booking with time, job, stage, town and state', async () => {
    const html = await render(true);
    expect(text(html)).toContain(
      'Our crews Crew Heron install crew 08:00–12:00 TW-2417 · Crane lift into pit Otley ✔ Confirmed',
    );
    expect(text(html)).toContain('13:00–16:00 TW-2417 · Fill Otley ✎ Pencilled · ⚠ Problem Crew Heron is booked twice');
    expect(text(html)).toContain(
      'Priya electrician 09:00–13:00 TW-2420 · Connect and certify Pool-in-Wharfedale ✉ Asked · ◷ Answer overdue',
    );
    expect(text(html)).toContain('Nothing booked on 1 row Crew Otter');
    // Each booking draws with its state's edge and its markers' classes.
    const classes = /<li class="([^"]+)"[^>]*data-booking-id="b-fill"/.exec(html)?.[1]?.split(' ').sort();
    expect(classes).toEqual(['day-list__booking', 'wl-booking', 'wl-has-problem', 'wl-state-pencilled']);
  });

  it('opens a job from a booking with a named button, and offers a move only where the reader may edit', async () => {
    const html = await render(true);
    expect(html).toContain('aria-label="08:00–12:00. TW-2417 · Crane lift into pit · Otley. Confirmed. Open the job."');
    // On site bookings stay put; busy elsewhere is neither opened nor moved.
    expect(html.match(/>\s*Move…\s*</g)).toHaveLength(3);
    expect(html).not.toMatch(/<button[^>]*>\s*<span class="day-list__time"[^>]*>14:00–16:00/);
    expect((await render(false)).match(/>\s*Move…\s*</g)).toBeNull();
  });

  it("outlines the bookings a report's link points at, and says so in words", async () => {
    const html = await render(true, ['b-fill', 'b-connect']);
    const outlined = [...html.matchAll(/<li class="([^"]+)"[^>]*data-booking-id="([^"]+)"/g)]
      .filter((m) => m[1]!.split(' ').includes('wl-pointed'))
      .map((m) => m[2]);
    expect(outlined).toEqual(['b-fill', 'b-connect']);
    expect(text(html)).toContain(
      '13:00–16:00 TW-2417 · Fill Otley ✎ Pencilled · ⚠ Problem Crew Heron is booked twice Outlined by the link',
    );
    expect(html).toContain(
      'aria-label="13:00–16:00. TW-2417 · Fill · Otley. Pencilled. Problem. Crew Heron is booked twice. Outlined by the link. Open the job."',
    );
    expect(text(await render(true))).not.toContain('Outlined by the link');
  });
});
