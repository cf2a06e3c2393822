import { describe, expect, it } from 'vitest';
import {
  ageForStrengthRatio, analyseBoard, cureRelease, elapsedDaysForEquivalentAge, equivalentAge, strengthRatioAtAge,
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

describe('Nurse–Saul maturity (ASTM C1074, datum −10 °C, reference 20 °C), worked by hand', () => {
  // Temperatures 5, 5, 10 °C, then 10 °C repeated:
  // day factors (5 − (−10)) / (20 − (−10)) = 15/30 = 0.5, 0.5, and 20/30 = 0.6667.
  // After 3 days te = 0.5 + 0.5 + 0.6667 = 1.6667 days.
  // 70% needs an equivalent age of 6.91358 days: remaining 6.91358 − 1.66667 = 5.24691,
  // at 0.6667 per day = 7.87037 days more, so 3 + 7.87037 = 10.87037 elapsed days.
  const temps = [5, 5, 10];
  it('equivalent age after 3 days is 1.667 days', () => expect(equivalentAge(temps, 3)).toBeCloseTo(5 / 3, 10));
  it('part days count in proportion: after 1.5 days, 0.5 + 0.25 = 0.75', () => expect(equivalentAge(temps, 1.5)).toBeCloseTo(0.75, 10));
  it('70% is reached after 10.870 elapsed days', () => expect(elapsedDaysForEquivalentAge(temps, ageForStrengthRatio(0.7))).toBeCloseTo(10.87037, 5));
  it('cold below the datum adds nothing, and a frozen forecast never releases', () => {
    expect(equivalentAge([-15, 20], 2)).toBeCloseTo(1, 10);
    expect(() => elapsedDaysForEquivalentAge([-12], 1)).toThrow(RangeError);
  });

  it('explains itself: target, temperatures, ages and the release instant', () => {
    const poured = Date.UTC(2026, 2, 2, 16, 0);
    const ex = cureRelease(poured, { targetFraction: 0.7, dailyMeanTempsC: temps });
    expect(ex.model).toBe('nurse_saul_maturity');
    expect(ex.assumedTempsC).toEqual([5, 5, 10]);
    expect(ex.requiredAgeDays).toBeCloseTo(6.91358, 5);
    expect(ex.elapsedDays).toBeCloseTo(10.87037, 5);
    expect(ex.equivalentAgeDays).toBeCloseTo(6.91358, 5);
    // 10.87037 days = 10 d 20 h 53 min 20 s after 2 Mar 16:00 → 13 Mar 12:53:20, rounded up to 12:54.
    expect(ex.releaseAt).toBe(Date.UTC(2026, 2, 13, 12, 54));
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
    expect(cure[0]?.message).toBe("'Lift' can't start before the base has cured: 70% strength is reached at Tue 12 May 13:56");
    expect(cure[0]?.severity).toBe('error');
    expect(cure[0]?.details?.releaseAt).toBe(at(2026, 5, 12, 13, 56));
  });
});
