import { describe, expect, it } from 'vitest';
import {
  ageForStrengthRatio,
  analyseBoard,
  cureRelease,
  elapsedDaysForEquivalentAge,
  equivalentAge,
  strengthRatioAtAge,
} from '../../../shared/scheduler/index.js';
import { at, booking, emptyBoard } from './scenario.js';

describe('ACI 209R-92 strength with age, moist-cured normal Portland cement: f(t)/f28 = t / (4 + 0.85 t)', () => {
  // Source: ACI 209R-92, eq. 2-1 with a = 4.0, β = 0.85 (moist cured, type I cement).
  it('3 days: 3 / (4 + 2.55) = 0.458', () => expect(strengthRatioAtAge(3)).toBeCloseTo(0.458, 3));
  it('7 days: 7 / 9.95 = 0.7035', () => expect(strengthRatioAtAge(7)).toBeCloseTo(0.7035, 4));
  it('28 days: 28 / 27.8 = 1.007', () => expect(strengthRatioAtAge(28)).toBeCloseTo(1.007, 3));
  it('solves for the age: 70% needs t = 4·0.7 / (1 − 0.85·0.7) = 2.8 / 0.405 = 6.914 days', () => {
    expect(ageForStrengthRatio(0.7)).toBeCloseTo(6.9136, 4);
    expect(strengthRatioAtAge(ageForStrengthRatio(0.7))).toBeCloseTo(0.7, 12);
  });
  it('refuses a target the curve never reaches (1/0.85 = 1.176)', () => {
    expect(() => ageForStrengthRatio(1.2)).toThrow(RangeError);
  });
});

describe('Nurse–Saul maturity (ASTM C1074, datum 0 °C, reference 23 °C), worked by hand', () => {
  // ASTM C1074 recommends a datum of 0 °C where the mix's own is not known; the ACI 209R-92 curve is
  // for standard moist curing at about 23 °C, so equivalent ages are counted at 23 °C.
  // Temperatures 5, 5, 10 °C, then 10 °C repeated:
  // day factors (5 − 0) / (23 − 0) = 5/23 = 0.21739, 0.21739, and 10/23 = 0.43478.
  // After 3 days te = 20/23 = 0.86957 days.
  // 70% needs an equivalent age of 6.91358 days, i.e. 6.91358 × 23 = 159.01235 °C·days above the datum;
  // 20 of them come in the first 3 days, the other 139.01235 at 10 °C·days a day take 13.90123 days
  // more, so 3 + 13.90123 = 16.90123 elapsed days. (With the older −10 °C datum and 20 °C reference the
  // same temperatures gave 10.87 days: the old constants made a cold base cure too soon.)
  const temps = [5, 5, 10];
  it('equivalent age after 3 days is 20/23 = 0.870 days', () =>
    expect(equivalentAge(temps, 3)).toBeCloseTo(20 / 23, 10));
  it('part days count in proportion: after 1.5 days, (5 + 2.5)/23 = 0.326', () =>
    expect(equivalentAge(temps, 1.5)).toBeCloseTo(7.5 / 23, 10));
  it('70% is reached after 16.901 elapsed days', () =>
    expect(elapsedDaysForEquivalentAge(temps, ageForStrengthRatio(0.7))).toBeCloseTo(16.90123, 5));
  it('cold below the datum adds nothing, and a frozen forecast never releases', () => {
    // −15 °C counts 0; 20 °C counts 20/23.
    expect(equivalentAge([-15, 20], 2)).toBeCloseTo(20 / 23, 10);
    // −1 °C is below the 0 °C datum (it would still have counted 9/30 a day at the older −10 °C datum).
    expect(() => elapsedDaysForEquivalentAge([-1], 1)).toThrow(RangeError);
  });
  it("a datum and reference of the caller's own are honoured: datum −10, reference 20 gives (5 + 10)/30 = 0.5 a day at 5 °C", () => {
    expect(equivalentAge([5], 2, { datumC: -10, referenceC: 20 })).toBeCloseTo(1, 10);
  });

  it('explains itself: target, temperatures, datum, reference, ages and the release instant', () => {
    const poured = Date.UTC(2026, 2, 2, 16, 0);
    const ex = cureRelease(poured, { targetFraction: 0.7, dailyMeanTempsC: temps });
    expect(ex.model).toBe('nurse_saul_maturity');
    expect(ex.assumedTempsC).toEqual([5, 5, 10]);
    expect(ex.datumC).toBe(0);
    expect(ex.referenceC).toBe(23);
    expect(ex.requiredAgeDays).toBeCloseTo(6.91358, 5);
    expect(ex.elapsedDays).toBeCloseTo(16.90123, 5);
    expect(ex.equivalentAgeDays).toBeCloseTo(6.91358, 5);
    // 16.90123 days = 16 d 21 h 37 min 47 s after 2 Mar 16:00 → 19 Mar 13:37:47, rounded up to 13:38.
    expect(ex.releaseAt).toBe(Date.UTC(2026, 2, 19, 13, 38));
    expect(ex.summary).toContain('datum 0 °C, reference 23 °C');
  });
});

describe('when the base has not cured', () => {
  it('the lift booked too soon is refused in plain words', () => {
    const board = emptyBoard();
    board.bookings = [
      booking('b-base', 'base', 'ground-1', at(2026, 5, 5, 12), at(2026, 5, 5, 16)),
      booking('b-lift', 'lift', 'crane-1', at(2026, 5, 11, 8), at(2026, 5, 11, 12)),
    ];
    const cure = analyseBoard(board, { now: at(2026, 4, 1) }).violations.filter((v) => v.kind === 'cure');
    // Poured until Tue 5 May 16:00 BST; + 6.914 days = Tue 12 May 13:55:33, rounded up to 13:56.
    expect(cure).toHaveLength(1);
    expect(cure[0]?.message).toBe(
      "'Lift' can't start before the base has cured: 70% strength is reached at Tue 12 May 13:56",
    );
    expect(cure[0]?.severity).toBe('error');
    expect(cure[0]?.details?.releaseAt).toBe(at(2026, 5, 12, 13, 56));
  });
});
