import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope } from 'vue';
import { awayWords, dayLabel, groupByDay } from '@/components/my-work/my-work';
import { telHref } from '@shared/phone';
import { useMyWork } from '@/composables/useMyWork';
import MyWorkCard from '@/components/my-work/MyWorkCard.vue';
import CrewDaySheet from '@/components/day-sheet/CrewDaySheet.vue';
import { hoursOnDay } from '@/utils/dates';
import type { DaySheet } from '@shared/schemas/day-sheets';
import type { MyWorkItem, MyWorkList } from '@shared/schemas/my-work';
import { stubFetch, type SentRequest } from './fake-fetch';
import { renderHtml } from './render';

afterEach(() => {
  vi.unstubAllGlobals();
});
const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

function item(id: string, day: string, startsAt: string, over: Partial<MyWorkItem> = {}): MyWorkItem {
  return {
    bookingId: id,
    version: 3,
    startsAt,
    endsAt: new Date(Date.parse(startsAt) + 4 * 3_600_000).toISOString(),
    state: 'confirmed',
    side: 'own',
    day,
    actions: [],
    resource: { id: '7', name: 'Crew Heron', kind: 'install_crew', category: 'crew', firmName: 'Tideway Hot Tubs' },
    stage: { id: `s${id}`, kind: 'excavation', name: 'Excavate pit' },
    job: { id: '12', reference: 'TW-2407', unitName: 'Solway 7', installationType: 'in_ground', unitFacing: null },
    site: {
      address: 'The Old Barn, Hall Lane',
      town: 'Bramhope',
      postcode: 'LS16 9AS',
      accessNotes: 'Side gate 900 mm',
    },
    contacts: [
      { role: 'Customer', name: 'Ellie Fairburn', phone: '07700 900106' },
      { role: 'Installer office', name: 'Tideway Hot Tubs', phone: '0113 496 0001' },
    ],
    alongside: [],
    unitArrives: null,
    cautions: ['Locate buried services before digging.', 'Follow local codes and licensed practice.'],
    ...over,
  };
}

describe('the day list', () => {
  it('puts today first, counts work still running from yesterday as today, and names the days', () => {
    const list: MyWorkList = {
      away: [],
      hours: [],
      today: '2026-06-01',
      timeZone: 'Europe/London',
      items: [
        item('3', '2026-06-03', '2026-06-03T07:00:00Z'),
        item('2', '2026-06-02', '2026-06-02T07:00:00Z'),
        item('1', '2026-06-01', '2026-06-01T07:00:00Z'),
        item('0', '2026-05-29', '2026-05-29T07:00:00Z'), // a dig still under way
      ],
    };
    expect(groupByDay(list).map((g) => [g.label, g.items.map((i) => i.bookingId)])).toEqual([
      ['Today', ['0', '1']],
      ['Tomorrow', ['2']],
      ['Wednesday 3 June', ['3']],
    ]);
    expect(dayLabel('2026-06-08', '2026-06-01')).toBe('Monday 8 June');
  });

  it("starts with today, empty, when the work is on later days (a Saturday before Monday's), and lists no day at all with no work", () => {
    const saturday: MyWorkList = {
      away: [],
      hours: [],
      today: '2026-06-06',
      timeZone: 'Europe/London',
      items: [item('4', '2026-06-08', '2026-06-08T07:00:00Z')],
    };
    expect(groupByDay(saturday).map((g) => [g.day, g.label, g.items.map((i) => i.bookingId)])).toEqual([
      ['2026-06-06', 'Today', []],
      ['2026-06-08', 'Monday 8 June', ['4']],
    ]);
    expect(groupByDay({ ...saturday, items: [] })).toEqual([]);
  });

  it("puts the reader's time away on each day it covers, in words, with the time where it is part of a day", () => {
    const list: MyWorkList = {
      hours: [],
      away: [
        {
          resourceName: 'Crew Heron',
          from: '2026-06-02',
          to: '2026-06-03',
          fromTime: null,
          toTime: null,
          reason: 'Holiday',
        },
        {
          resourceName: null,
          from: '2026-06-03',
          to: '2026-06-03',
          fromTime: null,
          toTime: null,
          reason: 'Training day',
        },
        {
          resourceName: 'Connor Reid',
          from: '2026-06-04',
          to: '2026-06-05',
          fromTime: '14:00',
          toTime: '10:30',
          reason: 'Dentist',
        },
      ],
      today: '2026-06-01',
      timeZone: 'Europe/London',
      items: [
        item('1', '2026-06-01', '2026-06-01T07:00:00Z'),
        item('2', '2026-06-02', '2026-06-02T07:00:00Z'),
        item('3', '2026-06-03', '2026-06-03T07:00:00Z'),
        item('4', '2026-06-04', '2026-06-04T07:00:00Z'),
        item('5', '2026-06-05', '2026-06-05T07:00:00Z'),
      ],
    };
    expect(groupByDay(list).map((g) => [g.day, g.away.map((a) => awayWords(a, g.day))])).toEqual([
      ['2026-06-01', []],
      ['2026-06-02', ['Crew Heron is marked away (Holiday)']],
      ['2026-06-03', ['Crew Heron is marked away (Holiday)', 'The firm is closed (Training day)']],
      ['2026-06-04', ['Connor Reid is marked away from 14:00 (Dentist)']],
      ['2026-06-05', ['Connor Reid is marked away until 10:30 (Dentist)']],
    ]);
    expect(awayWords({ ...list.away[2]!, to: '2026-06-04', fromTime: '09:00', toTime: '12:00' }, '2026-06-04')).toBe(
      'Connor Reid is marked away 09:00–12:00 (Dentist)',
    );
  });

  it('dials a phone number without its spaces', () => {
    expect(telHref('0113 496 0001')).toBe('tel:01134960001');
  });
});

describe('a card', () => {
  it("shows the street, postcode, site contact, the office's phone and the cautions", async () => {
    const html = await renderHtml(MyWorkCard, {
      item: item('1', '2026-06-01', '2026-06-01T07:00:00Z', { actions: ['arrive'] }),
      timeZone: 'Europe/London',
      day: '2026-06-01',
      busy: false,
      canSurvey: true,
    });
    expect(html).toContain('The Old Barn, Hall Lane');
    expect(html).toContain('LS16 9AS');
    expect(html).toContain('Site contact:</span> Ellie Fairburn</span><a href="tel:07700900106"');
    expect(html).toContain('Installer office:</span> Tideway Hot Tubs</span><a href="tel:01134960001"');
    expect(html).toContain('<li>Locate buried services before digging.</li>');
    expect(html.split('Follow local codes and licensed practice.').length - 1).toBe(1); // said once, not twice
    expect(html).toContain('08:00–12:00 · Excavate pit');
    expect(html).toContain('In-ground');
  });

  it('says when the unit arrives on the placement it comes before, the day too when that is the day before', async () => {
    const placement = (unitArrives: MyWorkItem['unitArrives']) =>
      renderHtml(MyWorkCard, {
        item: item('2', '2026-06-08', '2026-06-08T09:00:00Z', {
          stage: { id: 's2', kind: 'placement', name: 'Place in the pit' },
          unitArrives,
        }),
        timeZone: 'Europe/London',
        day: '2026-06-08',
        busy: false,
        canSurvey: false,
      });
    const carrow = { firmName: 'Carrow Haulage' };
    expect(await placement({ startsAt: '2026-06-08T07:00:00Z', endsAt: '2026-06-08T09:00:00Z', ...carrow })).toContain(
      'The unit arrives 08:00–10:00 on Carrow Haulage’s lorry',
    );
    expect(await placement({ startsAt: '2026-06-05T14:00:00Z', endsAt: '2026-06-05T16:00:00Z', ...carrow })).toContain(
      'The unit arrives Fri 5 Jun 15:00–17:00 on Carrow Haulage’s lorry',
    );
    expect(await placement(null)).not.toContain('The unit arrives');
  });

  it('offers only the steps the server says may be marked now', async () => {
    const render = (actions: MyWorkItem['actions']) =>
      renderHtml(MyWorkCard, {
        item: item('1', '2026-06-01', '2026-06-01T07:00:00Z', { actions }),
        timeZone: 'Europe/London',
        day: '2026-06-01',
        busy: false,
        canSurvey: false,
      });
    const buttons = (html: string) =>
      [...html.matchAll(/<span class="n-button__content">(?:<!--\[-->)?([^<]*)/g)].map((m) => m[1]);
    expect(buttons(await render([]))).toEqual([]);
    expect(buttons(await render(['arrive']))).toEqual(['On site']);
    expect(buttons(await render(['finish', 'undo-arrive']))).toEqual(['Done', 'Not on site yet']);
  });
});

describe('hours of work that runs over a night', () => {
  // A dig from Mon 14 Dec 2026 08:00 to Tue 15 Dec 13:00 (GMT: the clocks went back on 25 Oct).
  const dig = { startsAt: '2026-12-14T08:00:00Z', endsAt: '2026-12-15T13:00:00Z' };

  it('name the other day, on the day it starts and on the day it ends', () => {
    const [start, end] = [Date.parse(dig.startsAt), Date.parse(dig.endsAt)];
    expect(hoursOnDay(start, end, '2026-12-14', 'Europe/London')).toBe('08:00 – Tue 15 13:00');
    expect(hoursOnDay(start, end, '2026-12-15', 'Europe/London')).toBe('Mon 14 08:00 – 13:00');
    expect(hoursOnDay(start, Date.parse('2026-12-14T12:00:00Z'), '2026-12-14', 'Europe/London')).toBe('08:00–12:00');
    // Midnight in London, not UTC: in June a 23:30 UTC start is 00:30 the next day.
    expect(
      hoursOnDay(Date.parse('2026-06-07T23:30:00Z'), Date.parse('2026-06-08T03:30:00Z'), '2026-06-08', 'Europe/London'),
    ).toBe('00:30–04:30');
  });

  it('read the same on a card of My work and on a day sheet', async () => {
    const card = await renderHtml(MyWorkCard, {
      item: item('4', '2026-12-14', dig.startsAt, { endsAt: dig.endsAt }),
      timeZone: 'Europe/London',
      day: '2026-12-15',
      busy: false,
      canSurvey: false,
    });
    expect(card).toContain('Mon 14 08:00 – 13:00 · Excavate pit');
    const visit = item('4', '2026-12-14', dig.startsAt, { endsAt: dig.endsAt });
    const sheet: DaySheet = { date: '2026-12-15', resource: visit.resource, visits: [visit] };
    const html = await renderHtml(CrewDaySheet, { sheet, timeZone: 'Europe/London', dateLabel: 'Tuesday 15 December' });
    expect(html).toContain('Mon 14 08:00 – 13:00 · Excavate pit');
    // The day sheet's numbers call as the card's do (digits only in the link).
    expect(html).toContain('<a href="tel:07700900106">07700 900106</a>');
  });
});

describe('marking progress', () => {
  const list: MyWorkList = {
    away: [],
    hours: [],
    today: '2026-06-01',
    timeZone: 'Europe/London',
    items: [item('41', '2026-06-01', '2026-06-01T07:00:00Z', { actions: ['arrive'] })],
  };
  function serve(): SentRequest[] {
    return stubFetch((r) =>
      r.method === 'GET'
        ? { status: 200, body: list }
        : { status: 200, body: { id: '41', state: 'on_site', version: 4 } },
    );
  }

  it('asks first, sends the step with the version it was shown, then offers an Undo that takes it back', async () => {
    const sent = serve();
    const announced: { text: string; undo: (() => Promise<void>) | null }[] = [];
    const questions: string[] = [];
    const scope = effectScope();
    const work = scope.run(() =>
      useMyWork({
        confirm: async (q) => {
          questions.push(q.title);
          return true;
        },
        announce: (text, undo) => announced.push({ text, undo }),
        problem: (e) => {
          throw e;
        },
      }),
    )!;
    await flush();
    expect(await work.mark(work.groups.value[0]!.items[0]!, 'arrive')).toBe(true);
    expect(questions).toEqual(['Mark that you are on site now?']);
    const posts = () => sent.filter((r) => r.method === 'POST').map((r) => [r.url, r.body]);
    expect(posts()).toEqual([['/api/bookings/41/progress', { action: 'arrive', version: 3 }]]);
    expect(announced[0]!.text).toBe('Excavate pit: marked on site');
    // Undo from the version the server just saved (4), through the same route.
    await announced[0]!.undo!();
    expect(posts()[1]).toEqual(['/api/bookings/41/progress', { action: 'undo-arrive', version: 4 }]);
    expect(announced[1]).toEqual({ text: 'Excavate pit: no longer on site', undo: null });
    scope.stop();
  });

  it('sends nothing when the question is answered no', async () => {
    const sent = serve();
    const scope = effectScope();
    const work = scope.run(() =>
      useMyWork({ confirm: async () => false, announce: () => undefined, problem: () => undefined }),
    )!;
    await flush();
    expect(await work.mark(work.groups.value[0]!.items[0]!, 'arrive')).toBe(false);
    expect(sent.filter((r) => r.method === 'POST')).toEqual([]);
    scope.stop();
  });
  it('shows the list as it is now when the step was marked meanwhile (an answer lost, or another phone)', async () => {
    const onSite = { ...list, items: [{ ...list.items[0]!, state: 'on_site' as const, version: 4, actions: [] }] };
    let gets = 0;
    const sent = stubFetch((r) => {
      if (r.method === 'GET') return { status: 200, body: gets++ === 0 ? list : onSite };
      return { status: 409, body: { title: 'This booking was changed since you loaded it', code: 'stale-version' } };
    });
    const problems: unknown[] = [];
    const scope = effectScope();
    const work = scope.run(() =>
      useMyWork({ confirm: async () => true, announce: () => undefined, problem: (e) => problems.push(e) }),
    )!;
    await flush();
    expect(await work.mark(work.groups.value[0]!.items[0]!, 'arrive')).toBe(false);
    expect(problems).toHaveLength(1);
    expect(sent.filter((r) => r.method === 'GET')).toHaveLength(2);
    expect(work.groups.value[0]!.items[0]!.state).toBe('on_site');
    scope.stop();
  });

  it('does not load again for a refusal of another kind', async () => {
    const sent = stubFetch((r) =>
      r.method === 'GET' ? { status: 200, body: list } : { status: 422, body: { title: 'Not yet' } },
    );
    const scope = effectScope();
    const work = scope.run(() =>
      useMyWork({ confirm: async () => true, announce: () => undefined, problem: () => undefined }),
    )!;
    await flush();
    expect(await work.mark(work.groups.value[0]!.items[0]!, 'arrive')).toBe(false);
    expect(sent.filter((r) => r.method === 'GET')).toHaveLength(1);
    scope.stop();
  });
});
