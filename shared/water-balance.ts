/**
 * Water balance at commissioning: the firm's target ranges for the readings a crew takes after the
 * fill (pH, total alkalinity, and the sanitiser's level), each with where the range comes from, and
 * what a commissioning record still lacks before the stage may be marked done.
 *
 * The default ranges are the trade's usual figures for hot tubs: common practice, no source. A firm
 * may set its own (firm settings `water_targets`), naming where its figures come from — for
 * example the spa-pool guidance of its health and safety authority or the unit maker's manual.
 * Pure: used by the server's gate and by the crew's page alike.
 */

export const SANITISER_KINDS = ['chlorine', 'bromine'] as const;
export type SanitiserKind = (typeof SANITISER_KINDS)[number];

/** Where a range comes from when nobody has named a published source. */
export const COMMON_PRACTICE = 'common practice, no source';

export interface TargetRange {
  min: number;
  max: number;
  /** What the reading is measured in ('' for pH). */
  unit: string;
  /** Where the figures come from: a named publication, or {@link COMMON_PRACTICE}. */
  source: string;
}

export interface WaterTargets {
  ph: TargetRange;
  totalAlkalinityPpm: TargetRange;
  freeChlorinePpm: TargetRange;
  brominePpm: TargetRange;
}

/**
 * The defaults every firm starts with. Each is the usual hot-tub figure, common practice, no
 * source: pH 7.2–7.8, total alkalinity 80–120 ppm, free chlorine 3–5 ppm, bromine 4–6 ppm.
 */
export const DEFAULT_WATER_TARGETS: WaterTargets = {
  ph: { min: 7.2, max: 7.8, unit: '', source: COMMON_PRACTICE },
  totalAlkalinityPpm: { min: 80, max: 120, unit: 'ppm', source: COMMON_PRACTICE },
  freeChlorinePpm: { min: 3, max: 5, unit: 'ppm', source: COMMON_PRACTICE },
  brominePpm: { min: 4, max: 6, unit: 'ppm', source: COMMON_PRACTICE },
};

/**
 * A firm's targets: its own ranges where it set them, the defaults otherwise. A stored range that
 * is not a well-formed min ≤ max pair is ignored rather than trusted.
 *
 * @example
 * waterTargetsOf({ ph: { min: 7.0, max: 7.6, unit: '', source: 'the maker’s manual' } }).ph.max // 7.6
 */
export function waterTargetsOf(stored: unknown): WaterTargets {
  const out: WaterTargets = { ...DEFAULT_WATER_TARGETS };
  if (!stored || typeof stored !== 'object') return out;
  for (const key of Object.keys(DEFAULT_WATER_TARGETS) as (keyof WaterTargets)[]) {
    const r = (stored as Record<string, unknown>)[key] as Partial<TargetRange> | undefined;
    if (
      r &&
      typeof r.min === 'number' &&
      typeof r.max === 'number' &&
      Number.isFinite(r.min) &&
      Number.isFinite(r.max) &&
      r.min <= r.max
    ) {
      out[key] = {
        min: r.min,
        max: r.max,
        unit: DEFAULT_WATER_TARGETS[key].unit,
        source: typeof r.source === 'string' && r.source.trim() ? r.source.trim() : COMMON_PRACTICE,
      };
    }
  }
  return out;
}

/** The range the sanitiser reading is checked against. */
export function sanitiserRange(targets: WaterTargets, kind: SanitiserKind): TargetRange {
  return kind === 'bromine' ? targets.brominePpm : targets.freeChlorinePpm;
}

export type ReadingVerdict = 'missing' | 'low' | 'in-range' | 'high';

/**
 * A reading against its range.
 *
 * @example
 * readingVerdict(7.9, DEFAULT_WATER_TARGETS.ph) // 'high'
 * readingVerdict(null, DEFAULT_WATER_TARGETS.ph) // 'missing'
 */
export function readingVerdict(value: number | null | undefined, range: TargetRange): ReadingVerdict {
  if (value === null || value === undefined || !Number.isFinite(value)) return 'missing';
  if (value < range.min) return 'low';
  if (value > range.max) return 'high';
  return 'in-range';
}

/** A range in words: "7.2–7.8" or "80–120 ppm". */
export function rangeText(range: TargetRange): string {
  return `${range.min}–${range.max}${range.unit ? ` ${range.unit}` : ''}`;
}

/** The checks the trade does at commissioning, in the order they are done, with their words. */
export const COMMISSIONING_CHECKS = [
  { key: 'pumpsPrimed', label: 'Pumps primed (air let out, water flowing)' },
  { key: 'pumpsTested', label: 'Pumps tested on every speed' },
  { key: 'heaterWorking', label: 'Heater working (water warming)' },
  { key: 'lightsWorking', label: 'Lights working' },
  { key: 'noLeaks', label: 'No leaks at unions, valves and the cabinet' },
] as const;
export type CommissioningCheck = (typeof COMMISSIONING_CHECKS)[number]['key'];

/** A commissioning record as the gate reads it. */
export interface CommissioningFacts {
  checks: Record<CommissioningCheck, boolean>;
  ph: number | null;
  totalAlkalinityPpm: number | null;
  sanitiserPpm: number | null;
  sanitiserKind: SanitiserKind | null;
  /** Why a reading out of range is acceptable for now (what was done about it). */
  notes: string | null;
  photoCount: number;
}

/** One reading of a record with its range and verdict, for the page and the gate. */
export interface ReadingCheck {
  key: 'ph' | 'totalAlkalinityPpm' | 'sanitiserPpm';
  label: string;
  value: number | null;
  range: TargetRange;
  verdict: ReadingVerdict;
}

/** The three readings of a record, each against the firm's range. */
export function readingChecks(
  r: Pick<CommissioningFacts, 'ph' | 'totalAlkalinityPpm' | 'sanitiserPpm' | 'sanitiserKind'>,
  targets: WaterTargets,
): ReadingCheck[] {
  const sanitiser = sanitiserRange(targets, r.sanitiserKind ?? 'chlorine');
  return [
    { key: 'ph', label: 'pH', value: r.ph, range: targets.ph, verdict: readingVerdict(r.ph, targets.ph) },
    {
      key: 'totalAlkalinityPpm',
      label: 'Total alkalinity',
      value: r.totalAlkalinityPpm,
      range: targets.totalAlkalinityPpm,
      verdict: readingVerdict(r.totalAlkalinityPpm, targets.totalAlkalinityPpm),
    },
    {
      key: 'sanitiserPpm',
      label: r.sanitiserKind === 'bromine' ? 'Bromine' : 'Free chlorine',
      value: r.sanitiserPpm,
      range: sanitiser,
      verdict: readingVerdict(r.sanitiserPpm, sanitiser),
    },
  ];
}

/** A label inside a sentence: its first letter small, the rest as written ("pH" stays "pH", not "ph"). */
const inSentence = (label: string) => label.charAt(0).toLowerCase() + label.slice(1);

/**
 * What a record still lacks before commissioning may be marked done, in plain words (empty when
 * complete): every check ticked, each reading taken and within range or explained in the notes,
 * the sanitiser's kind, and at least one photo.
 *
 * @example
 * commissioningGaps(null, DEFAULT_WATER_TARGETS)[0] // 'Nothing is recorded yet: fill in the commissioning record.'
 */
export function commissioningGaps(r: CommissioningFacts | null, targets: WaterTargets): string[] {
  if (!r) return ['Nothing is recorded yet: fill in the commissioning record.'];
  const gaps: string[] = [];
  for (const c of COMMISSIONING_CHECKS)
    if (!r.checks[c.key]) gaps.push(`Not ticked: ${inSentence(c.label.replace(/ \(.*\)$/, ''))}.`);
  if (!r.sanitiserKind) gaps.push('Say which sanitiser is used (chlorine or bromine).');
  const explained = Boolean(r.notes && r.notes.trim());
  for (const reading of readingChecks(r, targets)) {
    if (reading.verdict === 'missing') gaps.push(`No ${inSentence(reading.label)} reading.`);
    else if (reading.verdict !== 'in-range' && !explained) {
      gaps.push(
        `${reading.label} ${reading.value} is ${reading.verdict === 'low' ? 'below' : 'above'} the firm's range (${rangeText(reading.range)}): bring it into range, or say in the notes what was done about it.`,
      );
    }
  }
  if (r.photoCount < 1) gaps.push('No photo: add at least one photo of the running unit.');
  return gaps;
}
