import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  createBoardIndex,
  SchedulerError,
  type Board,
  type Violation,
} from '../../../shared/scheduler/index.js';
import { at, booking, emptyBoard } from './scenario.js';

const NOW = at(2026, 5, 1, 9); // Fri 1 May 2026 09:00 BST

function withBookings(bs: Board['bookings'], patch: Partial<Board> = {}): Board {
  return { ...emptyBoard(), bookings: bs, ...patch };
}
const of = (vs: Violation[], kind: Violation['kind']) => vs.filter((v) => v.kind === kind);

describe('order and lag', () => {
  it('the connection booked before the lift has finished', () => {
    const vs = analyseBoard(
      withBookings([
        booking('b-lift', 'lift', 'crane-1', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
        booking('b-conn', 'connect', 'spark-1', at(2026, 6, 2, 11), at(2026, 6, 2, 14)),
      ]),
      { now: NOW },
    ).violations;
    const lag = of(vs, 'lag');
    expect(lag).toHaveLength(1);
    // 1 working hour after Tue 2 Jun 12:00 = 13:00.
    expect(lag[0]?.message).toBe(
      "'Electrical connect' can't start before Tue 2 Jun 13:00: it must wait 1 working hour after 'Lift' finishes",
    );
    expect(lag[0]?.stageIds).toEqual(['connect', 'lift']);
  });

  it('a plain finish-to-start break is an order error', () => {
    const vs = analyseBoard(
      withBookings([
        booking('b-dig', 'dig', 'ground-1', at(2026, 5, 5, 8), at(2026, 5, 6, 12)),
        booking('b-base', 'base', 'ground-1', at(2026, 5, 6, 9), at(2026, 5, 6, 11), { stageId: 'base' }),
      ]),
      { now: NOW },
    ).violations;
    expect(of(vs, 'order')[0]?.message).toBe(
      "'Base pour' can't start before 'Excavation' has finished (Wed 6 May 12:00)",
    );
  });

  it('elapsed lags run through the weekend', () => {
    const b = withBookings([
      booking('b-lift', 'lift', 'crane-1', at(2026, 6, 5, 8), at(2026, 6, 5, 12)),
      booking('b-conn', 'connect', 'spark-1', at(2026, 6, 8, 8), at(2026, 6, 8, 11)),
    ]);
    b.dependencies = [
      { id: 'd', fromStageId: 'lift', toStageId: 'connect', type: 'FS', lag: { amount: 2, unit: 'elapsed_days' } },
    ];
    expect(of(analyseBoard(b, { now: NOW }).violations, 'lag')).toHaveLength(0);
    b.dependencies = [
      { id: 'd', fromStageId: 'lift', toStageId: 'connect', type: 'FS', lag: { amount: 2, unit: 'working_days' } },
    ];
    expect(of(analyseBoard(b, { now: NOW }).violations, 'lag')).toHaveLength(1);
  });
});

describe('lead time', () => {
  it("a pencilled crane inside its 5 working days' notice is an error; a confirmed one is not", () => {
    const b = withBookings([
      booking('b-lift', 'lift', 'crane-1', at(2026, 5, 7, 8), at(2026, 5, 7, 12), { state: 'pencilled' }),
    ]);
    const lead = of(analyseBoard(b, { now: NOW }).violations, 'lead_time');
    // From Fri 1 May 09:00, 5 working days skipping the bank holiday Mon 4 May:
    // Tue 5 (1), Wed 6 (2), Thu 7 (3), Fri 8 (4), Mon 11 (5) → Mon 11 May 09:00.
    expect(lead[0]?.message).toBe(
      "The crane (crane-1) needs 5 working days' notice from today: the earliest start is Mon 11 May 09:00",
    );
    const ok = withBookings([
      booking('b-lift', 'lift', 'crane-1', at(2026, 5, 7, 8), at(2026, 5, 7, 12), { state: 'confirmed' }),
    ]);
    expect(of(analyseBoard(ok, { now: NOW }).violations, 'lead_time')).toHaveLength(0);
  });
});

describe('resource clash', () => {
  it('the same crew booked twice at once; a declined booking never counts', () => {
    const b = withBookings([
      booking('b1', 'dig', 'ground-1', at(2026, 6, 1, 8), at(2026, 6, 1, 17)),
      booking('b2', 'base', 'ground-1', at(2026, 6, 1, 13), at(2026, 6, 1, 17)),
      booking('b3', 'base', 'ground-1', at(2026, 6, 1, 8), at(2026, 6, 1, 17), { state: 'declined' }),
    ]);
    const clash = of(analyseBoard(b, { now: NOW }).violations, 'clash');
    expect(clash).toHaveLength(1);
    expect(clash[0]?.bookingIds).toEqual(['b1', 'b2']);
    expect(clash[0]?.message).toBe(
      "The groundworks crew (ground-1) is booked for both 'Excavation' and 'Base pour' from Mon 1 Jun 13:00 to Mon 1 Jun 17:00",
    );
  });

  it('touching bookings (one ends as the next starts) do not clash', () => {
    const b = withBookings([
      booking('b1', 'dig', 'ground-1', at(2026, 6, 1, 8), at(2026, 6, 1, 12)),
      booking('b2', 'base', 'ground-1', at(2026, 6, 1, 12), at(2026, 6, 1, 17)),
    ]);
    expect(of(analyseBoard(b, { now: NOW }).violations, 'clash')).toHaveLength(0);
  });
});

describe('across firms', () => {
  it('a partner\'s crane booked by two installers: each sees "busy elsewhere" and nothing of the other job', () => {
    const b = withBookings([booking('mine', 'lift', 'crane-1', at(2026, 6, 2, 8), at(2026, 6, 2, 12))]);
    b.stages = [
      ...b.stages,
      {
        id: 'their-lift',
        jobId: 'job-x',
        kind: 'lift',
        name: 'Lift at Orchard Row',
        durationMinutes: 240,
        requirements: [{ kind: 'crane', count: 1 }],
      },
    ];
    b.jobs = [...b.jobs, { id: 'job-x', firmId: 'installer-2' }];
    b.bookings = [
      ...b.bookings,
      booking('theirs', 'their-lift', 'crane-1', at(2026, 6, 2, 10), at(2026, 6, 2, 14), {
        installerFirmId: 'installer-2',
      }),
    ];
    const cross = of(analyseBoard(b, { now: NOW }).violations, 'cross_firm');
    expect(cross).toHaveLength(2);
    const mine = cross.find((v) => v.stageIds.includes('lift'));
    expect(mine?.message).toBe('The crane (crane-1) is busy elsewhere from Tue 2 Jun 10:00 to Tue 2 Jun 12:00');
    expect(mine?.bookingIds).toEqual(['mine']);
    expect(JSON.stringify(mine)).not.toContain('Orchard');
    expect(JSON.stringify(mine)).not.toContain('their');
    expect(of(analyseBoard(b, { now: NOW }).violations, 'clash')).toHaveLength(0);
  });
});

describe('availability', () => {
  it('a bank holiday, a Saturday and an absence', () => {
    const b = withBookings([
      booking('hol', 'dig', 'ground-1', at(2026, 5, 25, 8), at(2026, 5, 25, 17)),
      booking('sat', 'base', 'crew-a', at(2026, 6, 6, 9), at(2026, 6, 6, 12)),
    ]);
    const vs = of(analyseBoard(b, { now: NOW }).violations, 'availability').filter((v) => v.severity === 'error');
    expect(vs.map((v) => v.message).sort()).toEqual([
      "The groundworks crew (ground-1) isn't working when 'Excavation' finishes (Mon 25 May 17:00: public holiday)",
      "The groundworks crew (ground-1) isn't working when 'Excavation' starts (Mon 25 May 08:00: public holiday)",
      "The install crew (crew-a) isn't working when 'Base pour' finishes (Sat 6 Jun 12:00: outside working hours)",
      "The install crew (crew-a) isn't working when 'Base pour' starts (Sat 6 Jun 09:00: outside working hours)",
    ]);
  });

  it('booked for less work than the stage needs is a warning', () => {
    const b = withBookings([booking('short', 'dig', 'ground-1', at(2026, 6, 1, 8), at(2026, 6, 1, 17))]);
    const w = of(analyseBoard(b, { now: NOW }).violations, 'availability');
    expect(w[0]?.severity).toBe('warning');
    expect(w[0]?.message).toBe(
      "'Excavation' needs 12 h of work but the groundworks crew (ground-1) is booked for 9 h of working time",
    );
  });

  it('a resource absence from its own calendar', () => {
    const b = withBookings([booking('abs', 'connect', 'spark-1', at(2026, 6, 3, 9), at(2026, 6, 3, 12))]);
    b.calendars = [
      ...b.calendars,
      {
        id: 'cal-spark',
        timeZone: 'Europe/London',
        weekly: b.calendars[0]?.weekly ?? [],
        closures: [{ start: at(2026, 6, 3), end: at(2026, 6, 4) }],
      },
    ];
    b.resources = b.resources.map((r) => (r.id === 'spark-1' ? { ...r, calendarId: 'cal-spark' } : r));
    const vs = of(analyseBoard(b, { now: NOW }).violations, 'availability');
    expect(vs[0]?.message).toContain('closed or absent');
  });
});

describe('hire', () => {
  it('a hired excavator booked after off-hire is an error; idle paid days are a warning with the cost', () => {
    const b = withBookings([
      booking('in', 'dig', 'digger-1', at(2026, 5, 5, 8), at(2026, 5, 5, 17)),
      booking('out', 'dig', 'digger-1', at(2026, 5, 11, 8), at(2026, 5, 11, 17)),
    ]);
    const vs = analyseBoard(b, { now: NOW }).violations;
    expect(of(vs, 'hire')).toHaveLength(1);
    expect(of(vs, 'hire')[0]?.bookingIds).toEqual(['out']);
    // Hire 1–8 May: paid working days Fri 1, Tue 5, Wed 6, Thu 7, Fri 8 (Mon 4 is a bank holiday); booked Tue 5.
    const idle = of(vs, 'idle_hire')[0];
    expect(idle?.severity).toBe('warning');
    expect(idle?.details?.idleDays).toEqual(['2026-05-01', '2026-05-06', '2026-05-07', '2026-05-08']);
    expect(idle?.details?.costPence).toBe(60_000);
    expect(idle?.message).toBe(
      'The excavator (digger-1) is on hire but idle on 4 days (Fri 1 May, Wed 6 May, Thu 7 May, Fri 8 May): £600.00 paid for nothing',
    );
  });
});

describe('capacity', () => {
  it('a lift needing two pallet trucks with one booked', () => {
    const b = withBookings([
      booking('c', 'lift', 'crane-1', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
      booking('k', 'lift', 'crew-a', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
      booking('p', 'lift', 'pt-1', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
    ]);
    const cap = of(analyseBoard(b, { now: NOW }).violations, 'capacity');
    expect(cap.map((v) => v.message)).toEqual(["'Lift' needs 2 pallet trucks but 1 is booked"]);
  });
});

describe('one person in two places', () => {
  it('Ria is in crew A and crew B, both booked at once', () => {
    const b = withBookings([
      booking('ka', 'lift', 'crew-a', at(2026, 6, 2, 8), at(2026, 6, 2, 12)),
      booking('kb', 'dig', 'crew-b', at(2026, 6, 2, 11), at(2026, 6, 2, 15)),
    ]);
    const pd = of(analyseBoard(b, { now: NOW }).violations, 'person_double');
    expect(pd).toHaveLength(1);
    expect(pd[0]?.message).toBe(
      "Ria would be in two places from Tue 2 Jun 11:00 to Tue 2 Jun 12:00: with the install crew (crew-a) on 'Lift' and with the install crew (crew-b) on 'Excavation'",
    );
  });
});

describe('cycles', () => {
  it('are reported naming the stages', () => {
    const b = emptyBoard();
    b.dependencies = [
      ...b.dependencies,
      { id: 'back', fromStageId: 'connect', toStageId: 'dig', type: 'FS', lag: { amount: 0, unit: 'working_hours' } },
    ];
    const cyc = of(analyseBoard(b, { now: NOW }).violations, 'cycle');
    expect(cyc[0]?.message).toBe(
      "These stages wait for each other in a circle: 'Base pour' → 'Electrical connect' → 'Excavation' → 'Lift'",
    );
  });
});

describe('bad input', () => {
  it('a booking for a resource not on the board', () => {
    expect(() =>
      createBoardIndex(withBookings([booking('x', 'lift', 'ghost', at(2026, 6, 2, 8), at(2026, 6, 2, 9))]), {
        now: NOW,
      }),
    ).toThrowError(expect.objectContaining({ code: 'unknown_resource' }));
    expect(() =>
      createBoardIndex(withBookings([booking('x', 'lift', 'ghost', at(2026, 6, 2, 8), at(2026, 6, 2, 9))]), {
        now: NOW,
      }),
    ).toThrow(SchedulerError);
  });
  it('a booking that ends before it starts', () => {
    expect(() =>
      createBoardIndex(withBookings([booking('x', 'lift', 'crane-1', at(2026, 6, 2, 9), at(2026, 6, 2, 8))]), {
        now: NOW,
      }),
    ).toThrow(RangeError);
  });
  it('a missing now', () => {
    expect(() => analyseBoard(emptyBoard(), { now: Number.NaN })).toThrow(RangeError);
  });
});
