import { describe, expect, it } from 'vitest';
import {
  COMMON_PRACTICE,
  DEFAULT_WATER_TARGETS,
  commissioningGaps,
  readingVerdict,
  waterTargetsOf,
  type CommissioningFacts,
} from '../../shared/water-balance.ts';

const ALL_TICKED = { pumpsPrimed: true, pumpsTested: true, heaterWorking: true, lightsWorking: true, noLeaks: true };
const complete: CommissioningFacts = {
  checks: ALL_TICKED,
  ph: 7.4,
  totalAlkalinityPpm: 100,
  sanitiserPpm: 4,
  sanitiserKind: 'chlorine',
  notes: null,
  photoCount: 1,
};

describe('the default target ranges', () => {
  it('are the usual hot-tub figures, each marked as common practice with no source', () => {
    // pH 7.2–7.8, total alkalinity 80–120 ppm, free chlorine 3–5 ppm, bromine 4–6 ppm: common practice, no source.
    expect(DEFAULT_WATER_TARGETS).toEqual({
      ph: { min: 7.2, max: 7.8, unit: '', source: 'common practice, no source' },
      totalAlkalinityPpm: { min: 80, max: 120, unit: 'ppm', source: 'common practice, no source' },
      freeChlorinePpm: { min: 3, max: 5, unit: 'ppm', source: 'common practice, no source' },
      brominePpm: { min: 4, max: 6, unit: 'ppm', source: 'common practice, no source' },
    });
  });
});

describe('a reading against its range', () => {
  it('is in range at both ends, and low or high just outside', () => {
    const ph = DEFAULT_WATER_TARGETS.ph;
    expect([7.19, 7.2, 7.5, 7.8, 7.81].map((v) => readingVerdict(v, ph))).toEqual([
      'low',
      'in-range',
      'in-range',
      'in-range',
      'high',
    ]);
    expect(readingVerdict(null, ph)).toBe('missing');
    expect(readingVerdict(Number.NaN, ph)).toBe('missing');
  });
});

describe("a firm's own ranges", () => {
  it('replace the defaults where well formed, keeping their source, and never a reversed range', () => {
    const t = waterTargetsOf({
      ph: { min: 7.0, max: 7.6, source: "the unit maker's manual" },
      brominePpm: { min: 6, max: 4 },
      totalAlkalinityPpm: { min: 90, max: 110 },
    });
    expect(t.ph).toEqual({ min: 7.0, max: 7.6, unit: '', source: "the unit maker's manual" });
    expect(t.brominePpm).toEqual(DEFAULT_WATER_TARGETS.brominePpm);
    expect(t.totalAlkalinityPpm.source).toBe(COMMON_PRACTICE);
    expect(waterTargetsOf(null)).toEqual(DEFAULT_WATER_TARGETS);
  });
});

describe('what a commissioning record still lacks', () => {
  it('is nothing when every check is ticked, the readings are in range and there is a photo', () => {
    expect(commissioningGaps(complete, DEFAULT_WATER_TARGETS)).toEqual([]);
  });

  it('names each missing item in plain words', () => {
    const gaps = commissioningGaps(
      {
        ...complete,
        checks: { ...ALL_TICKED, heaterWorking: false, noLeaks: false },
        ph: null,
        totalAlkalinityPpm: null,
        sanitiserKind: null,
        photoCount: 0,
      },
      DEFAULT_WATER_TARGETS,
    );
    expect(gaps).toEqual([
      'Not ticked: heater working.',
      'Not ticked: no leaks at unions, valves and the cabinet.',
      'Say which sanitiser is used (chlorine or bromine).',
      'No pH reading.',
      'No total alkalinity reading.',
      'No photo: add at least one photo of the running unit.',
    ]);
  });

  it('flags a reading out of range until the notes say what was done about it', () => {
    const bromine = { ...complete, sanitiserKind: 'bromine' as const, sanitiserPpm: 3.5 };
    // 3.5 ppm is within chlorine's 3–5 but below bromine's 4–6.
    expect(commissioningGaps(bromine, DEFAULT_WATER_TARGETS)).toEqual([
      "Bromine 3.5 is below the firm's range (4–6 ppm): bring it into range, or say in the notes what was done about it.",
    ]);
    expect(
      commissioningGaps(
        { ...bromine, notes: 'Dosed; householder to re-test tomorrow before use.' },
        DEFAULT_WATER_TARGETS,
      ),
    ).toEqual([]);
    expect(commissioningGaps({ ...bromine, notes: '   ' }, DEFAULT_WATER_TARGETS)).toHaveLength(1);
  });
});
