import { describe, expect, it } from 'vitest';
import {
  boardTitle,
  isoWeek,
  mondayOf,
  rangeOf,
  showsWholeDays,
  slotLabels,
  stepDate,
  unitOf,
  VIEW_PARAM,
  workingWindow,
  ZOOM_LEVELS,
} from '@/components/board/board-range';

const DAY = 86_400_000;
/** A slot as the timeline hands it to a label formatter: month counted from 0. */
const slot = (date: string, hour = 0) => {
  const [year, month, day] = date.split('-').map(Number) as [number, number, number];
  return { year, month: month - 1, day, hour };
};

describe('zoom levels', () => {
  it('are a day, a week, a fortnight and a month, each named in the URL', () => {
    expect(ZOOM_LEVELS.map((z) => [z.param, z.label])).toEqual([
      ['day', 'Day'],
      ['week', 'Week'],
      ['fortnight', 'Fortnight'],
      ['month', 'Month'],
    ]);
    for (const z of ZOOM_LEVELS) expect(VIEW_PARAM[z.param]).toBe(z.view);
    expect(unitOf('resourceTimelineFortnight')).toBe('fortnight');
    expect(
      ['resourceTimelineDay', 'resourceTimelineWeek', 'resourceTimelineFortnight', 'resourceTimelineMonth'].map((v) =>
        showsWholeDays(v as never),
      ),
    ).toEqual([false, false, true, true]);
  });
});

describe('stepping', () => {
  it('moves by the range shown', () => {
    expect(stepDate('resourceTimelineDay', '2026-09-14', 1)).toBe('2026-09-15');
    expect(stepDate('resourceTimelineWeek', '2026-09-14', -1)).toBe('2026-09-07');
    expect(stepDate('resourceTimelineFortnight', '2026-09-14', 1)).toBe('2026-09-28');
    expect(stepDate('resourceTimelineMonth', '2026-12-07', 1)).toBe('2027-01-07');
  });

  it('keeps a month step inside the next month from its last days', () => {
    expect(stepDate('resourceTimelineMonth', '2026-01-31', 1)).toBe('2026-02-28');
    expect(stepDate('resourceTimelineMonth', '2026-03-31', -1)).toBe('2026-02-28');
  });
});

describe('the title above the board', () => {
  it('names the days a week or fortnight covers, the month and year once', () => {
    expect(boardTitle('resourceTimelineWeek', '2026-09-09')).toBe('Mon 7 – Sun 13 Sep 2026');
    expect(boardTitle('resourceTimelineWeek', '2026-09-30')).toBe('Mon 28 Sep – Sun 4 Oct 2026');
    expect(boardTitle('resourceTimelineWeek', '2026-12-31')).toBe('Mon 28 Dec 2026 – Sun 3 Jan 2027');
    expect(boardTitle('resourceTimelineFortnight', '2026-09-13')).toBe('Mon 7 – Sun 20 Sep 2026');
  });

  it('names a day and a month in full', () => {
    expect(boardTitle('resourceTimelineDay', '2026-09-14')).toBe('Monday 14 September 2026');
    expect(boardTitle('resourceTimelineMonth', '2026-12-07')).toBe('December 2026');
  });
});

describe('the range loaded for a view', () => {
  it('covers the shown days with a day either side', () => {
    const week = rangeOf('resourceTimelineWeek', '2026-09-16');
    expect([week.from, week.to]).toEqual([Date.UTC(2026, 8, 13), Date.UTC(2026, 8, 22)]);
    const fortnight = rangeOf('resourceTimelineFortnight', '2026-09-16');
    expect([fortnight.from, fortnight.to]).toEqual([Date.UTC(2026, 8, 13), Date.UTC(2026, 8, 28) + DAY]);
    const month = rangeOf('resourceTimelineMonth', '2026-02-10');
    expect([month.from, month.to]).toEqual([Date.UTC(2026, 1, 1) - DAY, Date.UTC(2026, 2, 1) + DAY]);
    expect(mondayOf('2026-09-20')).toBe('2026-09-14');
  });

  it('stops at the years work is planned in (2000–2100), where the API stops', () => {
    // The week of Wed 29 Dec 2100 runs to Sun 2 Jan 2101: loaded up to the end of 2100.
    const last = rangeOf('resourceTimelineWeek', '2100-12-29');
    expect([last.from, last.to]).toEqual([Date.UTC(2100, 11, 26), Date.UTC(2101, 0, 1) - 1]);
    // The week of Sat 1 Jan 2000 began on Mon 27 Dec 1999: loaded from the start of 2000.
    const first = rangeOf('resourceTimelineWeek', '2000-01-01');
    expect([first.from, first.to]).toEqual([Date.UTC(2000, 0, 1), Date.UTC(2000, 0, 4)]);
  });
});

describe('ISO week numbers', () => {
  // ISO 8601: weeks start on Monday and week 1 holds the year's first Thursday, so 2026 (starting
  // on a Thursday) has 53 weeks and 2020's last week runs into 2021.
  it.each([
    ['2026-01-01', 1],
    ['2026-06-01', 23],
    ['2026-12-31', 53],
    ['2027-01-01', 53],
    ['2027-01-04', 1],
    ['2024-12-30', 1],
    ['2021-01-03', 53],
    ['2021-01-04', 1],
  ])('%s is in week %i', (date, week) => {
    const { year, month, day } = slot(date);
    expect(isoWeek(year, month, day)).toBe(week);
  });
});

describe('header labels', () => {
  it('split a week into days and their morning and afternoon', () => {
    const [days, halves] = slotLabels('resourceTimelineWeek');
    expect(days!(slot('2026-09-07', 6))).toBe('Mon 7 Sep');
    expect([halves!(slot('2026-09-07', 6)), halves!(slot('2026-09-07', 12))]).toEqual(['am', 'pm']);
  });

  it('give a fortnight and a month week numbers over whole weekday names, never a lone letter', () => {
    const [week, day] = slotLabels('resourceTimelineFortnight');
    expect(week!(slot('2026-09-09'))).toBe('Week 37 · 7–13 Sep');
    expect(week!(slot('2026-09-30'))).toBe('Week 40 · 28 Sep – 4 Oct');
    expect([day!(slot('2026-09-08')), day!(slot('2026-09-10'))]).toEqual(['Tue 8', 'Thu 10']);
    const [, monthDay] = slotLabels('resourceTimelineMonth');
    expect(monthDay!(slot('2026-09-12'))).toBe('Sat\n12');
  });

  it('read hours in a day', () => {
    expect(slotLabels('resourceTimelineDay')[0]!(slot('2026-09-07', 7))).toBe('07:00');
  });
});

describe('the hours the timeline shows', () => {
  const calendar = (ranges: [number, number][]) => ({ weekly: [[], ranges, ranges, ranges, ranges, ranges, []] });

  it('cover every calendar: whole hours for a day, a morning and afternoon of equal length for a week', () => {
    // 08:00–17:00 and an electricians' 07:30–16:30: the afternoon needs 5 h, so halves of 6 h (5 does not divide a day).
    expect(workingWindow([calendar([[480, 1020]]), calendar([[450, 990]])])).toEqual({
      day: { start: '07:00', end: '17:00' },
      week: { start: '06:00', end: '18:00', half: '06:00' },
    });
    expect(workingWindow([calendar([[540, 900]])])).toEqual({
      day: { start: '09:00', end: '15:00' },
      week: { start: '09:00', end: '15:00', half: '03:00' },
    });
  });

  it('fall back to a working day of 08:00–17:00 without calendars, and never pass midnight', () => {
    expect(workingWindow([]).day).toEqual({ start: '08:00', end: '17:00' });
    expect(workingWindow([calendar([[0, 1440]])]).week).toEqual({ start: '00:00', end: '24:00', half: '12:00' });
  });
});
