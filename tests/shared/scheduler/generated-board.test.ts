// The benchmark's generated board, small enough to check by hand: 3 installs (30 stages) on 28
// resources, seed 1, all booked (bench/generate.ts). Every expected value below was worked out by
// hand from the board's bookings (listed beside each), England and Wales hours Mon–Fri 08:00–17:00
// (resources 0–6 and 21–27), Scotland Mon–Sat 07:30–12:00 and 13:00–17:30, Northern Ireland
// Mon–Fri 08:00–16:30, and the gov.uk bank holidays of 2026–27 (e.g. Mon 31 Aug 2026 in England).
// The full analysis was rewritten for speed; these figures pin what it must still say.
import { describe, expect, it } from 'vitest';
import {
  analyseBoard,
  compareViolations,
  formatInstant,
  violationKey,
  type Violation,
} from '../../../shared/scheduler/index.js';
import { BENCH_NOW, generateBoard, prng } from '../../../bench/generate.js';

const { board } = generateBoard(3, 28, 1, 0);
const analysis = analyseBoard(board, { now: BENCH_NOW });
const local = (t: number) => formatInstant(t, 'Europe/London');

describe('full analysis of a small generated board', () => {
  it('finds the five split stages, the declined fill and three idle hires, nothing else', () => {
    const kinds: Record<string, number> = {};
    for (const v of analysis.violations) kinds[v.kind] = (kinds[v.kind] ?? 0) + 1;
    expect(kinds).toEqual({ split: 5, unbooked_predecessor: 1, idle_hire: 3 });
    expect(analysis.errorCount).toBe(6);
    expect(analysis.warningCount).toBe(3);
    // The split ones: first fix Fri 15:00 → Mon 10:00 (twice), fill Mon 16:00 → Tue 10:00, commission Tue 15:00 → Wed 10:00 (twice).
    expect(analysis.violations.filter((v) => v.kind === 'split').map((v) => v.stageIds[0])).toEqual([
      'job-0-s4',
      'job-0-s7',
      'job-0-s9',
      'job-2-s4',
      'job-2-s9',
    ]);
  });

  it('says where a split stage fits: 4 h booked Tue 28 Jul 15:00 to Wed 10:00 starts by 13:00 or from Wed 08:00', () => {
    // 15:00–17:00 Tuesday (2 h) + 08:00–10:00 Wednesday (2 h): two days. 17:00 − 4 h = 13:00.
    const v = analysis.violations.find((x) => x.kind === 'split' && x.stageIds[0] === 'job-0-s9') as Violation;
    expect(v.message).toBe(
      "'commission' would be split over two working days (Tue 28 Jul 15:00 to Wed 29 Jul 10:00): its 4 h must be done within one working day — start by 13:00 or from Wed 29 Jul 08:00",
    );
    expect(local(v.details?.latestStartThatDay as number)).toBe('Tue 28 Jul 13:00');
    expect(local(v.details?.earliestStart as number)).toBe('Wed 29 Jul 08:00');
  });

  it('holds the connection back behind the declined fill: lift ends Mon 16:00, fill Tue 08:00–11:00, + 2 working hours = 13:00', () => {
    const v = analysis.violations.find((x) => x.kind === 'unbooked_predecessor') as Violation;
    expect(v.stageIds).toEqual(['job-2-s6', 'job-2-s7', 'job-2-s8']);
    expect(v.message).toBe(
      "'electrical connect' can't start before about Tue 6 Oct 13:00: 'fill' (not booked yet) needs 3 h and then 2 working hours first; it can't start itself before about Tue 6 Oct 08:00 (after 'lift')",
    );
  });

  it('counts the idle days of the three excavators on hire for 400 days from Mon 5 Jan 2026 08:00', () => {
    // Paid days run to Mon 8 Feb 2027 (Tue 9 Feb's hours start at or after 08:00 off-hire, except
    // Scotland's 07:30). England: 286 weekdays − 8 bank holidays = 278, less 5 booked days
    // (10–12 Aug, 14–15 Sep) = 273. Northern Ireland: 286 − 10 = 276. Scotland, Mon–Sat:
    // 344 days − 9 bank holidays = 335. At £70.00 a day.
    const idle = analysis.violations
      .filter((v) => v.kind === 'idle_hire')
      .map((v) => [
        v.resourceIds[0],
        v.details?.idleDays && (v.details.idleDays as string[]).length,
        v.details?.costPence,
      ]);
    expect(idle).toEqual([
      ['res-12', 335, 33_500 * 70],
      ['res-19', 276, 27_600 * 70],
      ['res-5', 273, 27_300 * 70],
    ]);
  });

  it("gives job 1's critical path on England's calendar, across the August bank holiday", () => {
    const job = analysis.criticalPaths.find((j) => j.jobId === 'job-1');
    expect(job && [local(job.start), local(job.finish), job.lateByMs, job.floatMinutes]).toEqual([
      'Mon 10 Aug 13:00',
      'Thu 3 Sep 15:00',
      0,
      2040,
    ]);
    const timing = (id: string) => job?.stages.find((s) => s.stageId === id);
    // Commission Thu 3 Sep 11:00–15:00, promised Wed 9 Sep 13:00: LS 09:00; float Thu 6 h + 3 days + 1 h = 2040 min.
    const commission = timing('job-1-s9');
    expect(
      commission && [
        local(commission.ls),
        commission.totalFloatMinutes,
        commission.freeFloatMinutes,
        commission.critical,
      ],
    ).toEqual(['Wed 9 Sep 09:00', 2040, 2040, true]);
    // Walls (960 min) Thu 27 Aug 13:00 → Tue 1 Sep 11:00 with Mon 31 Aug off; the first fix may start with
    // them (SS) no later than Mon 7 Sep 09:00, so walls finish by Tue 8 Sep 16:00; float 240 + 540 + 0 + 4 × 540 + 60 = 3000.
    const walls = timing('job-1-s3');
    expect(
      walls && [walls.durationMinutes, local(walls.ls), local(walls.lf), walls.totalFloatMinutes, walls.critical],
    ).toEqual([960, 'Mon 7 Sep 09:00', 'Tue 8 Sep 16:00', 3000, false]);
    // Base poured Wed 12 Aug 09:00–13:00, walls start Thu 27 Aug 13:00: free float 240 + 10 × 540 + 300 = 5940.
    expect(timing('job-1-s2')?.freeFloatMinutes).toBe(5940);
    expect(job?.criticalStageIds).toEqual(['job-1-s4', 'job-1-s5', 'job-1-s6', 'job-1-s7', 'job-1-s8', 'job-1-s9']);
  });
});

describe('violation order', () => {
  it('sorts exactly as the violation keys compare, also with ids holding the separators', () => {
    const rnd = prng(7);
    const bits = ['a', 'b', ',', '|', 'ab', 'a,', 'a|b', ''];
    const pick = <T>(l: readonly T[]) => l[Math.floor(rnd() * l.length)] as T;
    const ids = () => Array.from({ length: Math.floor(rnd() * 3) }, () => pick(bits) + (rnd() < 0.5 ? pick(bits) : ''));
    const make = (): Violation => ({
      kind: pick(['clash', 'cross_firm', 'cure', 'cycle', 'hire', 'idle_hire'] as const),
      severity: pick(['error', 'warning'] as const),
      stageIds: ids(),
      resourceIds: ids(),
      bookingIds: ids(),
      message: pick(bits) + pick(bits),
    });
    let wrong = 0;
    for (let i = 0; i < 20_000; i++) {
      const a = make(),
        b = make();
      const ka = violationKey(a),
        kb = violationKey(b);
      if (Math.sign(compareViolations(a, b)) !== (ka < kb ? -1 : ka > kb ? 1 : 0)) wrong++;
    }
    expect(wrong).toBe(0);
  });
});
