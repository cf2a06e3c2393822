import { describe, expect, it } from 'vitest';
import { cureRelease, DATUM_C, equivalentAge, REFERENCE_C } from '../../shared/scheduler/index.js';

describe('the cure constants', () => {
  it('count above a 0 °C datum (ASTM C1074 working default) towards a 23 °C reference (ACI 209R-92 standard moist curing)', () => {
    expect(DATUM_C).toBe(0);
    expect(REFERENCE_C).toBe(23);
  });
});

describe('a cold week after a November pour, Nurse–Saul equivalent age (ASTM C1074) at the 0 °C datum, worked by hand', () => {
  // Source of the method: ASTM C1074, temperature–time factor M(t) = Σ (Ta − T0) Δt and equivalent
  // age te = Σ (Ta − T0) / (Ts − T0) Δt, with T0 = 0 °C (its recommended default datum) and Ts = 23 °C
  // (the ACI 209R-92 curve's standard moist curing).
  // Daily means from the pour's day: 9.2, 6.9, 4.6, 2.3, 0, −2 °C, then 4.6 °C on.
  // M over the first six days = 9.2 + 6.9 + 4.6 + 2.3 + 0 + 0 (−2 is below the datum) = 23 °C·days,
  // so te = 23 / 23 = 1.0 day. From day 6 each day adds 4.6 / 23 = 0.2 day.
  // 70% of 28-day strength (ACI 209R-92): t = 4·0.7 / (1 − 0.85·0.7) = 6.913580 days of equivalent age.
  // Still needed after day 6: 5.913580 days at 0.2 a day = 29.567901 days, so 35.567901 days elapsed.
  // Poured until Mon 2 Nov 2026 15:00 UTC: + 35 d = 7 Dec 15:00, + 0.567901 d (13 h 37.8 min) = 8 Dec 04:37.8 → 04:38.
  const temps = [9.2, 6.9, 4.6, 2.3, 0, -2, 4.6];
  const rule = {
    targetFraction: 0.7,
    dailyMeanTempsC: temps,
    fromForecast: [true, true, true, true, true, false, false],
    temperatureSource: 'forecast' as const,
    temperaturePlace: 'Thornby Wold',
    seasonalBasis: 'a test table',
    temperaturesFrom: '2026-11-02',
  };
  const poured = Date.UTC(2026, 10, 2, 15, 0);

  it('six cold days add one day of equivalent age', () => expect(equivalentAge(temps, 6)).toBeCloseTo(1, 12));
  it('releases 35.568 days after the pour, at 04:38 on 8 December', () => {
    const ex = cureRelease(poured, rule);
    expect(ex.model).toBe('nurse_saul_maturity');
    expect(ex.elapsedDays).toBeCloseTo(35.567901, 6);
    expect(ex.equivalentAgeDays).toBeCloseTo(6.91358, 6);
    expect(ex.releaseAt).toBe(Date.UTC(2026, 11, 8, 4, 38));
  });
  it('at the older −10 °C datum and 20 °C reference the same week would release about 21 days too soon', () => {
    // (9.2+10)/30 + (6.9+10)/30 + (4.6+10)/30 + (2.3+10)/30 + 10/30 + 8/30 = 81/30 = 2.7 days in six days,
    // then 14.6/30 = 0.48667 a day: 6 + (6.913580 − 2.7) / 0.48667 = 6 + 8.6580 = 14.658 days.
    expect(cureRelease(poured, { ...rule, datumC: -10, referenceC: 20 }).elapsedDays).toBeCloseTo(14.658, 3);
  });
  it('a firm or mix datum of its own is used and shown', () => {
    // Datum −5 °C, reference 23 °C: the first six days add (14.2 + 11.9 + 9.6 + 7.3 + 5 + 3) / 28 = 51/28 = 1.82143,
    // then (4.6 + 5) / 28 = 0.34286 a day: 6 + (6.913580 − 1.82143) / 0.34286 = 6 + 14.85210 = 20.85210 days.
    const ex = cureRelease(poured, { ...rule, datumC: -5 });
    expect(ex.elapsedDays).toBeCloseTo(20.8521, 4);
    expect(ex.datumC).toBe(-5);
    expect(ex.summary).toContain('datum -5 °C, reference 23 °C');
  });
  it('names the temperatures it used and where each came from', () => {
    const ex = cureRelease(poured, rule);
    expect(ex.temperatureSource).toBe('forecast');
    expect(ex.forecastDays).toBe(5);
    expect(ex.summary).toBe(
      '70% of 28-day strength needs 6.9 days at 23 °C (ACI 209R-92, standard moist curing); ' +
        'Nurse–Saul equivalent age (ASTM C1074, datum 0 °C, reference 23 °C) with daily mean air temperatures from 2026-11-02: ' +
        'the weather forecast for Thornby Wold 9.2, 6.9, 4.6, 2.3, 0.0 °C, ' +
        'then the seasonal assumption (a test table, an assumption) -2.0, 4.6 (× 30) °C: released after 35.6 days.',
    );
  });
});

describe('what the explanation says without a forecast', () => {
  const poured = Date.UTC(2026, 5, 2, 12, 0);
  it('all seasonal: says there is no forecast on file and that the figures are an assumption', () => {
    // June's seasonal 13.7 °C: 13.7/23 = 0.595652 a day; 6.913580 / 0.595652 = 11.60674 days.
    const ex = cureRelease(poured, {
      targetFraction: 0.7,
      dailyMeanTempsC: [13.7],
      temperatureSource: 'seasonal',
      temperaturePlace: 'Addingham',
      seasonalBasis: 'UK monthly mean',
    });
    expect(ex.elapsedDays).toBeCloseTo(11.60674, 5);
    expect(ex.temperatureSource).toBe('seasonal');
    expect(ex.forecastDays).toBe(0);
    expect(ex.summary).toContain(
      'no forecast for Addingham on file, so the seasonal assumption (UK monthly mean, an assumption) 13.7 (× 12) °C',
    );
  });
  it('no temperatures at all: the plain ACI 209 age at the 23 °C reference, said so', () => {
    const ex = cureRelease(poured, { targetFraction: 0.7 });
    expect(ex.temperatureSource).toBe('reference');
    expect(ex.elapsedDays).toBeCloseTo(6.91358, 6);
    expect(ex.summary).toContain('no site temperatures, so the base is taken to cure as at 23 °C');
  });
});
