import { describe, expect, it } from 'vitest';
import { keptStepWords, noticeText, progressTimeWords, stageBookingStatus } from '@/components/job-detail/stage-status';
import { cancelWords, refuseWords } from '@/components/board/request-confirm';
import StageList from '@/components/job-detail/StageList.vue';
import type { JobStage } from '@/api/job-work';
import { useSessionStore } from '@/stores/session';
import { renderHtml } from './render';

const crane = (id: string, state: string, startsAt = '2026-06-09T07:00:00Z') => ({
  id,
  resourceName: '60 t mobile crane',
  startsAt,
  state,
});

describe("the job page's word on a stage's bookings", () => {
  it('counts only bookings that stand as booked', () => {
    expect(stageBookingStatus('14', [crane('31', 'declined')], 'Europe/London').booked).toBe(0);
    expect(
      stageBookingStatus(
        '14',
        [crane('31', 'declined'), { ...crane('32', 'pencilled'), resourceName: 'Crew Heron' }],
        'Europe/London',
      ).booked,
    ).toBe(1);
    expect(stageBookingStatus('14', [], 'Europe/London')).toEqual({
      booked: 0,
      progress: null,
      declined: null,
      rebookLink: null,
    });
  });

  it('says who declined, to book again on the board at that day with the declined booking outlined', () => {
    // 23:30 UTC on 8 June is already 9 June in London (BST).
    expect(
      stageBookingStatus(
        '14',
        [crane('31', 'declined', '2026-06-08T23:30:00Z'), crane('33', 'declined', '2026-06-10T07:00:00Z')],
        'Europe/London',
      ),
    ).toEqual({
      booked: 0,
      progress: null,
      declined: 'Declined by 60 t mobile crane — book again',
      rebookLink: '/board?view=day&date=2026-06-09&job=14&highlight=31%2C33',
    });
  });
});

function stage(id: string, name: string, bookings: JobStage['bookings']): JobStage {
  return {
    id,
    kind: 'lift',
    name,
    sequence: Number(id),
    durationMinutes: 120,
    requirements: [{ kind: 'crane', count: 1 }],
    cure: null,
    notes: null,
    cautions: [],
    after: [],
    bookings,
  };
}
const booking = (id: string, state: string, resourceName = '60 t mobile crane') => ({
  id,
  resourceId: 'r1',
  resourceName,
  resourceKind: 'crane',
  startsAt: '2026-06-09T07:00:00Z',
  endsAt: '2026-06-09T09:00:00Z',
  state,
});
const tags = (html: string) =>
  [...html.matchAll(/<span class="n-tag__content">([\s\S]*?)<\/span>/g)].map((m) =>
    m[1]!.replace(/<[^>]+>/g, '').trim(),
  );

describe('how far a stage has got', () => {
  const progress = (...states: string[]) =>
    stageBookingStatus(
      '14',
      states.map((state, i) => crane(String(i), state)),
      'Europe/London',
    ).progress?.text;

  it("says it in the board's words: confirmed only when every firm on it is, under way once any work starts", () => {
    expect(progress('pencilled')).toBe('✎ Pencilled');
    expect(progress('confirmed', 'confirmed')).toBe('✔ Confirmed');
    expect(progress('confirmed', 'sent', 'declined')).toBe('✉ Asked (1 of 2 confirmed)');
    expect(progress('confirmed', 'pencilled')).toBe('✎ Pencilled');
    expect(progress('done', 'confirmed')).toBe('▶ On site');
    expect(progress('on_site')).toBe('▶ On site');
    expect(progress('done', 'done', 'declined')).toBe('■ Done');
    expect(progress('declined')).toBeUndefined();
  });
});

describe('the stage list on the job page', () => {
  const stages = [
    stage('1', 'Crane lift', [booking('31', 'declined')]),
    stage('2', 'Fill', [booking('32', 'confirmed', 'Crew Heron'), booking('33', 'declined', 'Priya Nair')]),
    stage('3', 'Handover', []),
  ];

  it("labels a declined stage to book again, linked to the board for those who book, and doesn't call it booked", async () => {
    const html = await renderHtml(
      StageList,
      { stages, timeZone: 'Europe/London' },
      {
        path: '/jobs/14',
        before: () => {
          useSessionStore().role = 'scheduler';
        },
      },
    );
    expect(tags(html)).toEqual([
      'Declined by 60 t mobile crane — book again',
      'Declined by Priya Nair — book again',
      '✔ Confirmed',
      'Not booked',
    ]);
    expect(html).toContain('href="/board?view=day&amp;date=2026-06-09&amp;job=14&amp;highlight=31"');
  });

  it('gives crew the words without the link', async () => {
    const html = await renderHtml(
      StageList,
      { stages, timeZone: 'Europe/London' },
      {
        path: '/jobs/14',
        before: () => {
          useSessionStore().role = 'crew';
        },
      },
    );
    expect(tags(html)[0]).toBe('Declined by 60 t mobile crane — book again');
    expect(html).not.toContain('href="/board');
  });
});

describe('the confirmations before refusing a proposal or cancelling a request', () => {
  const resource = { name: '60 t mobile crane', firmName: 'Fellside Crane Hire' };
  const start = Date.UTC(2026, 5, 9, 7);

  it('say the partner is e-mailed and that it cannot be undone', () => {
    const refuse = refuseWords(
      { start, proposal: { start: Date.UTC(2026, 5, 10, 12), end: Date.UTC(2026, 5, 10, 15) } },
      resource,
      'Europe/London',
    );
    expect(refuse).toEqual({
      title: 'Refuse the proposed time?',
      content:
        "Fellside Crane Hire proposed Wed 10 Jun 13:00. Refusing keeps 60 t mobile crane on Tue 9 Jun 08:00 and asks them by e-mail to confirm that time again. This can't be undone.",
      yes: 'Refuse and ask again',
      no: 'Keep the proposal open',
    });
    const cancel = cancelWords({ start, state: 'confirmed' }, resource, 'Europe/London');
    expect(cancel.title).toBe('Cancel the request to Fellside Crane Hire?');
    expect(cancel.content).toBe(
      "Fellside Crane Hire has confirmed 60 t mobile crane on Tue 9 Jun 08:00. Cancelling tells them by e-mail, with a calendar cancellation; the booking stays on the board as pencilled. This can't be undone: to ask them again, send the request again (they will have to confirm again).",
    );
    expect(cancelWords({ start, state: 'sent' }, resource, 'Europe/London').content).toMatch(
      /^Fellside Crane Hire has been asked for 60 t mobile crane on Tue 9 Jun 08:00\. .* send the request again\.$/,
    );
  });
});

describe('the notice a stage needs, in words', () => {
  it('says how many working days, whose notice and why, and where it counts from', () => {
    expect(
      noticeText({
        workingDays: 10,
        countedFrom: 'now',
        resourceKind: 'crane',
        reason: 'time for a site visit and a lift plan',
      }),
    ).toBe("10 working days' notice for the crane (time for a site visit and a lift plan), counted from booking");
    expect(noticeText({ workingDays: 35, countedFrom: 'order', reason: "the maker's lead time" })).toBe(
      "35 working days' notice (the maker's lead time), counted from the order date",
    );
    expect(noticeText({ workingDays: 1, countedFrom: 'now' })).toBe("1 working day's notice, counted from booking");
  });
});

describe('when the crew were on site', () => {
  // A dig booked Mon 1 Jun 08:00–12:00 BST (UTC+1 in June).
  const dig = { startsAt: '2026-06-01T07:00:00Z', arrivedAt: '2026-06-01T07:10:00Z', doneAt: '2026-06-01T10:40:00Z' };
  it('says the times on the booking’s day, with the day on another, and only as far as it has got', () => {
    expect(progressTimeWords({ ...dig, state: 'on_site', doneAt: null }, 'Europe/London')).toBe('since 08:10');
    expect(progressTimeWords({ ...dig, state: 'done' }, 'Europe/London')).toBe('from 08:10, done at 11:40');
    // Finished next morning (a dig that may continue next working day).
    expect(progressTimeWords({ ...dig, state: 'done', doneAt: '2026-06-02T08:05:00Z' }, 'Europe/London')).toBe(
      'from 08:10, done at Tue 2 Jun 09:05',
    );
    // Taken back to on site: the old "done" no longer counts.
    expect(progressTimeWords({ ...dig, state: 'on_site' }, 'Europe/London')).toBe('since 08:10');
    expect(progressTimeWords({ ...dig, state: 'confirmed' }, 'Europe/London')).toBeNull();
    expect(progressTimeWords({ ...dig, state: 'on_site', arrivedAt: null, doneAt: null }, 'Europe/London')).toBeNull();
    // Marked done before times were kept for on site: what is known.
    expect(progressTimeWords({ ...dig, state: 'done', arrivedAt: null }, 'Europe/London')).toBe('done at 11:40');
  });
});

describe('a step kept on this phone, on the job page', () => {
  const mark = (action: 'arrive' | 'finish' | 'undo-arrive', markedAt: string, bookingId = '41') => ({
    bookingId,
    action,
    version: 3,
    markedAt,
    label: 'Excavate pit · TW-2407',
  });
  it("is said on its own booking with the time it was marked, in the firm's zone, each in order", () => {
    const marks = [mark('arrive', '2026-06-01T07:59:00Z'), mark('arrive', '2026-06-01T08:15:00Z', '42')];
    expect(keptStepWords('41', marks, 'Europe/London')).toBe('on this phone, not sent yet: marked on site at 08:59');
    expect(keptStepWords('41', [...marks, mark('finish', '2026-06-01T10:40:00Z')], 'Europe/London')).toBe(
      'on this phone, not sent yet: marked on site at 08:59, then marked done at 11:40',
    );
    expect(keptStepWords('43', marks, 'Europe/London')).toBeNull();
  });
});
