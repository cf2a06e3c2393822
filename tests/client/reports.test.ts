import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope, ref } from 'vue';
import { fixRequest } from '@shared/reports/fixes';
import { worstProblems } from '@shared/reports/worst';
import type {
  ClashReport,
  ClashRow,
  HirePeriodRow,
  HireReport,
  RiskRow,
  SuggestedFix,
  UtilisationReport,
} from '@shared/reports/types';
import { useReports } from '@/composables/useReports';
import RiskTable from '@/components/reports/RiskTable.vue';
import ClashTable from '@/components/reports/ClashTable.vue';
import HireTable from '@/components/reports/HireTable.vue';
import { fixDoneText } from '@/components/reports/fix-result';
import { stubFetch } from './fake-fetch';
import { renderHtml } from './render';

afterEach(() => {
  vi.unstubAllGlobals();
});
const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

const fix: SuggestedFix = {
  stageId: '41',
  bookingId: '31',
  versions: { 30: 2, 31: 5 },
  moves: [
    {
      bookingId: '30',
      fromResourceId: '9',
      fromResourceName: 'Fix crane',
      fromStart: Date.UTC(2026, 5, 3, 7),
      fromEnd: Date.UTC(2026, 5, 3, 11),
      resourceId: '9',
      resourceName: 'Fix crane',
      start: Date.UTC(2026, 5, 8, 7),
      end: Date.UTC(2026, 5, 8, 11),
      asksPartnerAgain: true,
    },
    {
      bookingId: '31',
      fromResourceId: '12',
      fromResourceName: 'Fix crew A',
      fromStart: Date.UTC(2026, 5, 3, 8),
      fromEnd: Date.UTC(2026, 5, 3, 11),
      resourceId: '13',
      resourceName: 'Fix crew B',
      start: Date.UTC(2026, 5, 8, 8),
      end: Date.UTC(2026, 5, 8, 11),
      asksPartnerAgain: false,
    },
  ],
  resourceId: '13',
  resourceName: 'Fix crew B',
  start: Date.UTC(2026, 5, 8, 8),
  end: Date.UTC(2026, 5, 8, 11),
  date: '2026-06-08',
  extraHireDays: 0,
  extraHirePence: 0,
  floatUsedMinutes: 0,
  delaysJob: false,
  label: 'Move to Fix crew B on Mon 8 Jun 09:00 — no extra cost',
  link: '/board?view=day&date=2026-06-08&q=Fix+crew+B&highlight=31',
};
const risk = (over: Partial<RiskRow>): RiskRow => ({
  jobId: '5',
  reference: 'TW-9102',
  customerName: 'Test Householder',
  siteTown: 'Testbury',
  promisedBy: null,
  promisedDate: null,
  lateByMs: 0,
  floatMinutes: 0,
  reasons: [{ reason: 'short_resourced', label: "'Heavy lift' needs 2 fix crews; 1 is booked" }],
  status: 'blocked',
  statusLabel: "Can't go ahead as booked",
  link: '/board?view=day&date=2026-06-18&job=5',
  ...over,
});

describe('applying a suggested fix', () => {
  it("is the board's own stage move from the stage's new start, with the versions it was worked out from", () => {
    expect(fixRequest(fix)).toEqual({
      path: '/api/stages/41/move',
      // The crane starts the stage (07:00 UTC): every booking shifts by the same time.
      body: {
        startsAt: '2026-06-08T07:00:00.000Z',
        bookingId: '31',
        resourceId: '13',
        versions: { 30: 2, 31: 5 },
        moveDependents: false,
      },
    });
  });

  it('posts it, then reads the reports again', async () => {
    const sent = stubFetch((r) =>
      r.method === 'POST'
        ? { status: 200, body: { bookings: [{ id: '30' }, { id: '31' }], warnings: [] } }
        : {
            status: 200,
            body: { rows: [], periods: [], resources: [], risks: [], perWeek: [], idlePerWeek: [], weeks: [] },
          },
    );
    const scope = effectScope();
    const reports = scope.run(() => useReports(ref({ from: '2026-05-31T23:00:00Z', to: '2026-06-28T23:00:00Z' })))!;
    await flush();
    const readsBefore = sent.filter((r) => r.method === 'GET').length;
    const result = await reports.applyFix(fix);
    expect(sent.filter((r) => r.method === 'POST').map((r) => [r.url, r.body])).toEqual([
      ['/api/stages/41/move', fixRequest(fix).body],
    ]);
    expect(sent.filter((r) => r.method === 'GET').length).toBe(readsBefore + 3);
    expect(fixDoneText(result)).toBe('Fix applied: 2 bookings moved');
    expect(reports.csv('utilisation-summary')).toBe(
      '/api/reports/utilisation-summary.csv?from=2026-05-31T23%3A00%3A00Z&to=2026-06-28T23%3A00%3A00Z',
    );
    scope.stop();
  });
});

describe('the report tables', () => {
  it('never call a job with a stage short of resources "on time"', async () => {
    const html = await renderHtml(RiskTable, { rows: [risk({})], currentYear: 2026 });
    expect(html).toContain('<td data-label="Promised by">—</td>');
    const promised = await renderHtml(RiskTable, { rows: [risk({ promisedDate: '2026-07-24' })], currentYear: 2026 });
    expect(promised).toContain('<td data-label="Promised by">Fri 24 Jul</td>');
    expect(html).toContain('<td data-label="Status" class="risk--blocked">Can&#39;t go ahead as booked</td>');
    expect(html).not.toContain('on time');
  });

  it('link a clash to both sides on the board and offer each fix for preview', async () => {
    const row: ClashRow = {
      id: 'clash:1',
      kind: 'clash',
      kindLabel: 'Resource double-booked',
      bookingIds: ['30', '31'],
      date: '2026-06-03',
      from: 0,
      to: 1,
      message: 'Fix crew A is booked for both',
      jobIds: ['5'],
      jobReferences: ['TW-9101'],
      stageId: '41',
      stageName: 'Lift',
      resourceNames: ['Fix crew A'],
      costPence: 0,
      link: '/board?view=day&date=2026-06-03&q=Fix+crew+A&highlight=30%2C31',
      fixes: [fix],
    };
    const html = await renderHtml(ClashTable, { rows: [row], currentYear: 2026 });
    expect(html).toContain('<td data-label="Date">Wed 3 Jun</td>');
    expect(html).toContain('href="/board?view=day&amp;date=2026-06-03&amp;q=Fix+crew+A&amp;highlight=30%2C31"');
    expect(html).toContain('aria-label="Preview: Move to Fix crew B on Mon 8 Jun 09:00 — no extra cost"');
  });

  it('put a job that cannot go ahead among the worst problems when nothing is late', () => {
    const clashes = { rows: [], perWeek: [] } as unknown as ClashReport;
    const hire = { periods: [] } as unknown as HireReport;
    const utilisation = { risks: [risk({})] } as unknown as UtilisationReport;
    expect(worstProblems(clashes, hire, utilisation).map((p) => [p.source, p.title])).toEqual([
      ['blocked_job', "Can't go ahead as booked: TW-9102, Testbury"],
    ]);
  });

  it('name the idle machine under its "Idle hire" tag without saying idle hire twice', () => {
    const clashes = { rows: [], perWeek: [] } as unknown as ClashReport;
    const hire = {
      periods: [
        {
          resourceName: '3 t excavator (hired)',
          idleCostPence: 130_500,
          idleDays: ['2026-06-04'],
          paidDays: 17,
          dayRatePence: 14_500,
          onHire: 0,
          onHireDate: '2026-06-01',
          link: '/board',
          suggestions: [],
        },
      ],
    } as unknown as HireReport;
    const [idle] = worstProblems(clashes, hire, { risks: [] } as unknown as UtilisationReport);
    expect([idle?.source, idle?.title, idle?.detail]).toEqual([
      'idle_hire',
      '3 t excavator (hired)',
      '1 of 17 paid days with nothing booked: £1,305.00 at £145.00 a day',
    ]);
  });

  it('say how many days a late job has to win back, in words that read right for one day or more', () => {
    const clashes = { rows: [], perWeek: [] } as unknown as ClashReport;
    const hire = { periods: [] } as unknown as HireReport;
    const late = (lateByMs: number) =>
      worstProblems(clashes, hire, {
        risks: [risk({ status: 'late', lateByMs, reasons: [] })],
      } as unknown as UtilisationReport)[0]?.fixes[0];
    // Part of a day counts as a whole one to win back.
    expect(late(3_600_000)).toMatch(/^1 day to win back: /);
    expect(late(42 * 86_400_000)).toMatch(/^42 days to win back: /);
  });
});

describe('the hire table', () => {
  const period = (bookingsOutsideHire: number): HirePeriodRow => ({
    id: '3',
    resourceId: '12',
    resourceName: '3 t excavator (hired)',
    supplierFirmId: '4',
    supplierName: 'Test Plant Hire',
    status: 'approved',
    version: 1,
    onHire: 0,
    offHire: 1,
    onHireDate: '2026-06-01',
    offHireDate: '2027-01-08',
    dayRatePence: 14_500,
    deliveryPence: 0,
    collectionPence: 0,
    paidDays: 5,
    bookedDays: 3,
    idleDays: ['2026-06-04', '2026-06-05'],
    idleCostPence: 29_000,
    totalCostPence: 72_500,
    bookingsOutsideHire,
    suggestions: [],
    link: '/board?view=week&date=2026-06-01',
  });

  it('shows the hire dates as the firm reads them, the year only when it is not this one', async () => {
    const html = await renderHtml(HireTable, { rows: [period(0)], canApprove: false, busyId: null, currentYear: 2026 });
    expect(html).toContain('<td data-label="On hire">Mon 1 Jun</td>');
    expect(html).toContain('<td data-label="Off hire">Fri 8 Jan 2027</td>');
  });

  it("says each hire's status in words, and offers Approve only while it waits and Change dates until it ends", async () => {
    const html = (status: HirePeriodRow['status']) =>
      renderHtml(HireTable, { rows: [{ ...period(0), status }], canApprove: true, busyId: null, currentYear: 2026 });
    const waiting = await html('requested');
    expect(waiting).toContain('Waiting for approval');
    expect(waiting).toContain('>Approve<');
    expect(waiting).toContain('Change dates…');
    const approved = await html('approved');
    expect(approved).toContain('Approved');
    expect(approved).not.toContain('>Approve<');
    const ended = await html('ended');
    expect(ended).toContain('Ended: gone back');
    expect(ended).not.toContain('Change dates…');
  });

  it('counts the bookings outside the hire in words that read right for one or more', async () => {
    const html = (n: number) =>
      renderHtml(HireTable, { rows: [period(n)], canApprove: false, busyId: null, currentYear: 2026 });
    expect(await html(1)).toContain('1 booking outside the hire');
    expect(await html(2)).toContain('2 bookings outside the hire');
    expect(await html(0)).not.toContain('outside the hire');
  });
});
