import { describe, expect, it } from 'vitest';
import {
  bookingLine,
  bookingSummary,
  breakable,
  chipMarks,
  stageShortName,
  whenText,
} from '@/components/board/booking-chip';
import type { EventInput } from '@/components/board/board-events';

const MON_8 = Date.UTC(2026, 8, 14, 7); // Monday 14 September 2026, 08:00 in London (BST)
const HOUR = 3_600_000;

function props(overrides: Partial<EventInput['extendedProps']> = {}): EventInput['extendedProps'] {
  return {
    bookingId: 'b1',
    stageId: 's1',
    jobId: 'j1',
    state: 'confirmed',
    elsewhere: false,
    problems: [],
    reference: 'TW-2417',
    stageName: 'Pour reinforced base',
    stageKind: 'base_pour',
    town: 'Otley',
    markers: [],
    ...overrides,
  };
}

describe('stage short names', () => {
  it("use ours for the usual kinds and the first word of the stage's own name otherwise", () => {
    expect(stageShortName('base_pour', 'Pour reinforced base')).toBe('Base');
    expect(stageShortName('electrical_connect', 'Connect and certify')).toBe('Connect');
    expect(stageShortName('pergola', 'Pergola footings')).toBe('Pergola');
  });
});

describe('a booking in words', () => {
  it('reads as reference, stage and town, led by its markers and state', () => {
    expect(bookingLine(props())).toBe('TW-2417 · Pour reinforced base · Otley');
    expect(chipMarks(props({ markers: ['problem', 'proposed'] }))).toBe('⚠ ⇄ ✔');
    expect(chipMarks(props({ state: 'sent', markers: ['overdue'] }))).toBe('◷ ✉');
  });

  it('says when it runs, in the firm’s zone, naming both days when it crosses midnight', () => {
    expect(whenText(MON_8, MON_8 + 5 * HOUR, 'Europe/London')).toBe('Mon 14 Sep 08:00–13:00');
    expect(whenText(MON_8, MON_8 + 28 * HOUR, 'Europe/London')).toBe('Mon 14 Sep 08:00 – Tue 15 Sep 12:00');
  });

  it('tells everything in its tooltip: job, state, time and each marker with the problem itself', () => {
    const lines = bookingSummary(
      props({ markers: ['problem', 'overdue'], problems: ['Millstone gang is booked twice.'] }),
      MON_8,
      MON_8 + 5 * HOUR,
      'Europe/London',
    );
    expect(lines).toEqual([
      'TW-2417 · Pour reinforced base · Otley',
      '✔ Confirmed: the firm said yes',
      'Mon 14 Sep 08:00–13:00',
      '⚠ Problem: Millstone gang is booked twice.',
      '◷ Answer overdue: the partner has not answered by the reminder time',
    ]);
  });

  it("tells nothing of another installer's booking but that it is busy", () => {
    expect(
      bookingSummary(
        props({ elsewhere: true, reference: '', stageName: 'Busy elsewhere', town: '' }),
        MON_8,
        MON_8 + HOUR,
        'Europe/London',
      ),
    ).toEqual(["Busy elsewhere: another installer's booking", 'Mon 14 Sep 08:00–09:00']);
  });
});

describe('names in a narrow chip', () => {
  // British English hyphenation patterns (hyph-en-gb, the ones TeX uses) through the hyphen package.
  it('may break only where a hyphen can show, and read the same when not broken', () => {
    expect(breakable('Harrogate')).toBe('Har\u00ADrog\u00ADate');
    expect(breakable('Commission')).toBe('Com\u00ADmis\u00ADsion');
    expect(breakable('Otley')).toBe('Ot\u00ADley');
    expect(breakable('Fill')).toBe('Fill');
    // A long run with no break in the patterns may break at any letter but its first and last three.
    expect(breakable('Horsforth')).toBe('Hor\u00ADs\u00ADf\u00ADo\u00ADrth');
    expect(breakable('Pool-in-Wharfedale').replace(/\u00AD/g, '')).toBe('Pool-in-Wharfedale');
  });
});
