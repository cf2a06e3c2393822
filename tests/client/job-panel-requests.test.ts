import { describe, expect, it } from 'vitest';
import type { BoardData } from '@shared/board-data';
import JobPanel from '@/components/board/JobPanel.vue';
import PartnerRequests from '@/components/board/PartnerRequests.vue';
import { boardAnalysisOf, boardIndexOf } from '@/components/board/engine-view';
import { renderHtml } from './render';
import { HOUR, MON, boardJob, WEEK_BOARD } from './board-week';

/**
 * An invented job of one stage, the electrical connection, booked on the installer's own labourer
 * (pencilled) and on a partner firm's electrician (asked): the electrician is the partner's.
 */
function board(): BoardData {
  const res = (id: string, name: string, kind: string, firmId: string, firmName: string, own: boolean) => ({
    id,
    firmId,
    category: 'person' as const,
    kind,
    calendarId: 'c1',
    name,
    firmName,
    firmKind: own ? 'installer' : 'electrical',
    ownership: own ? ('owned' as const) : ('partner' as const),
  });
  return {
    ...WEEK_BOARD,
    resources: [
      res('mate', 'Dev Holt', 'labourer', 'f1', 'Tideway', true),
      res('spark', 'Rhian Vale', 'electrician', 'f5', 'Larkspur Electrical', false),
    ],
    jobs: [boardJob({ reference: 'TW-7002' })],
    stages: [
      {
        id: 'connect',
        jobId: 'j1',
        kind: 'electrical_connect',
        name: 'Connect and certify',
        durationMinutes: 240,
        requirements: [
          { kind: 'electrician', count: 1 },
          { kind: 'labourer', count: 1 },
        ],
        sequence: 1,
      },
    ],
    dependencies: [],
    bookings: [
      {
        id: 'b1',
        stageId: 'connect',
        resourceId: 'spark',
        start: MON + 48 * HOUR,
        end: MON + 52 * HOUR,
        state: 'sent',
        version: 2,
        installerFirmId: 'f1',
      },
      {
        id: 'b2',
        stageId: 'connect',
        resourceId: 'mate',
        start: MON + 48 * HOUR,
        end: MON + 52 * HOUR,
        state: 'pencilled',
        version: 1,
        installerFirmId: 'f1',
      },
    ],
    hirePeriods: [],
    leadTimeRules: [],
  } as BoardData;
}

const text = (html: string) => html.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
const count = (s: string, part: string) => s.split(part).length - 1;
/** The job panel's text for the job on this board, as the scheduler sees it. */
async function panel(data: BoardData): Promise<string> {
  const index = boardIndexOf(data, true);
  return text(
    await renderHtml(JobPanel, {
      jobId: 'j1',
      data,
      index,
      analysis: boardAnalysisOf(data, index),
      timeZone: 'Europe/London',
      canEdit: true,
    }),
  );
}

describe("a partner's booking on the job panel", () => {
  it('is listed once, as a request, with what can be done with it: cancel the request or take it off', async () => {
    const html = await panel(board());
    expect(count(html, 'Rhian Vale')).toBe(1);
    expect(html).toContain('Rhian Vale (Larkspur Electrical): ✉ Asked Cancel request… Take off');
    // The installer's own person stays in the stage's own list.
    expect(count(html, 'Dev Holt')).toBe(1);
    expect(html).toContain('Dev Holt · Pencilled Take off');
  });

  it('says the day a partner declined', async () => {
    const data = board();
    data.bookings[0] = { ...data.bookings[0]!, state: 'declined', declined: { at: MON + 3 * HOUR } } as never;
    const html = text(
      await renderHtml(PartnerRequests, { stageId: 'connect', data, timeZone: 'Europe/London', canEdit: true }),
    );
    expect(html).toContain('Rhian Vale (Larkspur Electrical): ✖ Declined Mon 14 Sep 11:00 Send again Take off');
  });

  it("says when the partner's people were on site, where the panel knows it", async () => {
    const data = board();
    data.bookings[0] = { ...data.bookings[0]!, state: 'on_site' } as never;
    const html = text(
      await renderHtml(PartnerRequests, {
        stageId: 'connect',
        data,
        timeZone: 'Europe/London',
        canEdit: true,
        progress: (b: { id: string }) => (b.id === 'b1' ? 'since 08:10' : null),
      }),
    );
    expect(html).toContain('Rhian Vale (Larkspur Electrical): ▶ On site · since 08:10');
    expect(html).not.toContain('Dev Holt');
  });

  it('offers no slot to move to, nor taking off, once the work on the stage has started', async () => {
    expect(await panel(board())).toContain('Find a slot');
    const started = board();
    started.bookings = started.bookings.map((b) => ({
      ...b,
      state: b.resourceId === 'mate' ? 'on_site' : 'confirmed',
    }));
    const html = await panel(started);
    // The server refuses to move an on-site booking (the booking state machine): the panel doesn't offer it.
    expect(html).not.toContain('Find a slot');
    expect(html).toContain('Dev Holt · On site');
    expect(html).not.toContain('Dev Holt · On site Take off');
  });
});
