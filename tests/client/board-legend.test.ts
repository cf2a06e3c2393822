import { describe, expect, it } from 'vitest';
import { createSSRApp, h } from 'vue';
import { renderToString } from 'vue/server-renderer';
import type { BoardData } from '@shared/board-data';
import type { BookingState } from '@shared/scheduler/index';
import BoardLegend from '@/components/board/BoardLegend.vue';
import {
  BOARD_BLOCKS,
  BOOKING_MARKERS,
  STATE_LABELS,
  closuresOf,
  eventsOf,
  offHireOf,
  problemsByBooking,
} from '@/components/board/board-events';
import { chipMarks } from '@/components/board/booking-chip';
import { WEEK, HOUR, MON, boardJob } from './board-week';

const STATES: BookingState[] = ['pencilled', 'sent', 'confirmed', 'declined', 'on_site', 'done'];

/** A board with a booking in every state, every marker, a busy-elsewhere block, a closure, a holiday and a hired machine off hire. */
function everything(): BoardData {
  return {
    from: MON - 24 * HOUR,
    to: MON + 7 * 24 * HOUR,
    now: MON,
    firmId: 'f1',
    calendars: [
      {
        id: 'c1',
        timeZone: 'Europe/London',
        weekly: WEEK,
        closures: [{ start: MON + 48 * HOUR, end: MON + 72 * HOUR }],
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
    ],
    jobs: [
      boardJob({ reference: 'TW-1' }),
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
      ...STATES.map((s, i) => ({
        id: `s-${s}`,
        jobId: 'j1',
        kind: 'fill',
        name: 'Fill',
        durationMinutes: 60,
        requirements: [{ kind: 'install_crew', count: 1 }],
        sequence: i,
      })),
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
      ...STATES.map((state, i) => ({
        id: `b-${state}`,
        stageId: `s-${state}`,
        resourceId: 'r1',
        start: MON + i * HOUR,
        end: MON + (i + 1) * HOUR,
        state,
        installerFirmId: 'f1',
        version: 1,
        ...(state === 'sent' ? { overdue: true } : {}),
        ...(state === 'confirmed' ? { proposal: { start: MON + 30 * HOUR, end: MON + 31 * HOUR } } : {}),
      })),
      {
        id: 'elsewhere-1',
        stageId: 'elsewhere:1',
        resourceId: 'r1',
        start: MON + 8 * HOUR,
        end: MON + 9 * HOUR,
        state: 'confirmed',
        installerFirmId: 'elsewhere',
        elsewhere: true,
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  };
}

async function legendHtml(): Promise<string> {
  return renderToString(createSSRApp({ render: () => h(BoardLegend) }));
}

/** The key's items, each as its data-key and its text. */
function items(html: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const m of html.matchAll(/<li[^>]*data-key="([^"]+)"[^>]*>([\s\S]*?)<\/li>/g))
    out.set(
      m[1]!,
      m[2]!
        .replace(/<[^>]+>/g, ' ')
        .replace(/&#39;/g, "'")
        .replace(/&amp;/g, '&')
        .replace(/\s+/g, ' ')
        .trim(),
    );
  return out;
}

describe('the key to the board', () => {
  it('lists every booking state with its symbol, its own edge class and what it means', async () => {
    const html = await legendHtml();
    const key = items(html);
    for (const [state, s] of Object.entries(STATE_LABELS)) {
      expect(key.get(`state-${state}`)).toBe(`${s.symbol} ${s.label} : ${s.description}`);
      expect(html).toMatch(new RegExp(`data-key="state-${state}"[^>]*>\\s*<span class="[^"]*wl-state-${state}`));
    }
  });

  it('lists every marker and block with its symbol and class', async () => {
    const html = await legendHtml();
    const key = items(html);
    for (const [name, m] of Object.entries(BOOKING_MARKERS)) {
      expect(key.get(`marker-${name}`)).toBe(`${m.symbol} ${m.label} : ${m.description}`);
      expect(html).toMatch(new RegExp(`data-key="marker-${name}"[^>]*>\\s*<span class="[^"]*${m.className}`));
    }
    for (const [name, b] of Object.entries(BOARD_BLOCKS)) {
      expect(key.get(`block-${name}`)).toBe(`${b.label} : ${b.description}`);
      expect(html).toMatch(new RegExp(`data-key="block-${name}"[^>]*>\\s*<span class="[^"]*${b.className}`));
    }
    expect(key.get('outside-hours')).toBe('Outside working hours');
    expect(key.get('now')).toBe('Now');
  });

  it('covers every class and symbol the board draws, so nothing on it goes unexplained', async () => {
    const data = everything();
    const problems = problemsByBooking([
      {
        kind: 'clash',
        severity: 'error',
        stageIds: ['s-pencilled'],
        resourceIds: ['r1'],
        bookingIds: ['b-pencilled'],
        message: 'Crew Heron is booked twice',
      },
    ]);
    const events = eventsOf(data, { canEdit: true, problems, declined: true });
    const blocks = [
      ...closuresOf(data, [{ calendarId: 'c1', start: MON + 96 * HOUR, end: MON + 120 * HOUR, name: 'A holiday' }]),
      ...offHireOf(data),
    ];
    const classes = new Set([...events, ...blocks].flatMap((e) => e.classNames).filter((c) => c !== 'wl-booking'));
    const symbols = new Set(events.flatMap((e) => chipMarks(e.extendedProps).split(' ')).filter(Boolean));
    // The fixture reaches every state, marker and block the board can draw.
    expect([...classes].sort()).toEqual([
      'wl-closed',
      'wl-elsewhere',
      'wl-has-problem',
      'wl-holiday',
      'wl-off-hire',
      'wl-overdue',
      'wl-proposed',
      'wl-state-confirmed',
      'wl-state-declined',
      'wl-state-done',
      'wl-state-on_site',
      'wl-state-pencilled',
      'wl-state-sent',
    ]);
    const html = await legendHtml();
    const explained = [...items(html).values()].join(' ');
    for (const c of classes) expect(html, c).toMatch(new RegExp(`class="[^"]*\\b${c}\\b`));
    for (const s of symbols) expect(explained, s).toContain(s);
  });
});
