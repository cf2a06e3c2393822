import { DAY_MS } from './time-zone.js';
import type { CureRule, Instant } from './types.js';

/**
 * ACI 209R-92 constant a (days), moist-cured normal Portland cement (type I): f(t)/f28 = t / (a + b t).
 *
 * @example
 * ACI_A_DAYS // 4
 */
export const ACI_A_DAYS = 4;
/**
 * ACI 209R-92 constant β for the same concrete.
 *
 * @example
 * ACI_B // 0.85
 */
export const ACI_B = 0.85;
/**
 * Nurse–Saul datum temperature, °C: ASTM C1074 asks for it to be found for the mix and recommends
 * 0 °C as the working default when it is not (−10 °C is Saul's older value). A firm may set its
 * own (firm settings), and a stage's cure rule may carry its mix's own (`CureRule.datumC`).
 *
 * @example
 * DATUM_C // 0
 */
export const DATUM_C = 0;
/**
 * Reference temperature for equivalent age, °C: the ACI 209R-92 curve is for standard moist curing
 * at about 23 °C, so an equivalent age is counted at 23 °C.
 *
 * @example
 * REFERENCE_C // 23
 */
export const REFERENCE_C = 23;

/**
 * Fraction of 28-day strength at an age in days, ACI 209R-92: t / (4 + 0.85 t).
 *
 * @example
 * strengthRatioAtAge(7) // 0.7035…
 */
export function strengthRatioAtAge(ageDays: number): number {
  if (!(ageDays >= 0)) throw new RangeError('Age must be zero or more days');
  return ageDays / (ACI_A_DAYS + ACI_B * ageDays);
}

/**
 * Age in days at which a strength fraction is reached: t = 4r / (1 − 0.85r).
 *
 * @example
 * ageForStrengthRatio(0.7) // 6.91… days
 */
export function ageForStrengthRatio(ratio: number): number {
  if (!(ratio > 0 && ratio < 1 / ACI_B)) {
    throw new RangeError(
      `A target of ${ratio} of 28-day strength is outside what the ACI 209 curve reaches (0 to ${(1 / ACI_B).toFixed(3)})`,
    );
  }
  return (ACI_A_DAYS * ratio) / (1 - ACI_B * ratio);
}

/** Options for maturity sums. */
export interface MaturityOptions {
  datumC?: number;
  referenceC?: number;
}

function dayFactor(tempC: number, o: MaturityOptions): number {
  const t0 = o.datumC ?? DATUM_C,
    tr = o.referenceC ?? REFERENCE_C;
  if (!(tr > t0)) throw new RangeError(`The reference temperature (${tr} °C) must be above the datum (${t0} °C)`);
  return Math.max(0, tempC - t0) / (tr - t0);
}

/**
 * Nurse–Saul equivalent age (ASTM C1074): te = Σ (Ta − T0)/(Tr − T0) Δt, in days, for the first
 * `elapsedDays` of the temperature list (the last temperature repeats past its end; a part day
 * counts in proportion; temperatures below the datum add nothing).
 *
 * @example
 * equivalentAge([5, 5, 10], 3) // (5 + 5 + 10) / 23 = 0.870 days (datum 0 °C, reference 23 °C)
 */
export function equivalentAge(
  dailyMeanTempsC: readonly number[],
  elapsedDays: number,
  options: MaturityOptions = {},
): number {
  if (dailyMeanTempsC.length === 0) throw new RangeError('At least one daily temperature is needed');
  if (!(elapsedDays >= 0)) throw new RangeError('Elapsed days must be zero or more');
  let te = 0;
  for (let d = 0; d < elapsedDays; d++) {
    const temp = dailyMeanTempsC[Math.min(d, dailyMeanTempsC.length - 1)] as number;
    te += dayFactor(temp, options) * Math.min(1, elapsedDays - d);
  }
  return te;
}

/**
 * Elapsed days until the equivalent age reaches `targetDays`.
 *
 * @example
 * elapsedDaysForEquivalentAge([5], 1) // 4.6 (each 5 °C day counts 5/23 of a day)
 */
export function elapsedDaysForEquivalentAge(
  dailyMeanTempsC: readonly number[],
  targetDays: number,
  options: MaturityOptions = {},
): number {
  if (dailyMeanTempsC.length === 0) throw new RangeError('At least one daily temperature is needed');
  let te = 0;
  for (let d = 0; ; d++) {
    const last = d >= dailyMeanTempsC.length - 1;
    const f = dayFactor(dailyMeanTempsC[Math.min(d, dailyMeanTempsC.length - 1)] as number, options);
    if (te + f >= targetDays) return d + (f === 0 ? 0 : (targetDays - te) / f);
    if (last && f === 0) throw new RangeError('At these temperatures the concrete never reaches the target strength');
    te += f;
  }
}

/**
 * The release instant for a pour and a cure length, rounded up to the whole minute so a booking
 * can start exactly at release.
 *
 * @example
 * releaseInstant(Date.UTC(2026, 4, 5, 15), 1) // Date.UTC(2026, 4, 6, 15)
 */
export function releaseInstant(pouredAt: Instant, elapsedDays: number): Instant {
  return Math.ceil((pouredAt + elapsedDays * DAY_MS) / 60_000) * 60_000;
}

/** What a cure rule means for a pour, in words and numbers. */
export interface CureExplanation {
  model: 'aci209_age' | 'nurse_saul_maturity';
  targetFraction: number;
  /** Age (days) at which ACI 209 reaches the target; with temperatures, as an equivalent age. */
  requiredAgeDays: number;
  /** Temperatures assumed, day 0…; null for the plain elapsed-age model. */
  assumedTempsC: number[] | null;
  /** Calendar days from the end of the pour to release. */
  elapsedDays: number;
  /** Equivalent age at release (equals elapsedDays without temperatures). */
  equivalentAgeDays: number;
  /** The Nurse–Saul datum and the reference temperature used, °C. */
  datumC: number;
  referenceC: number;
  /**
   * `forecast` or `seasonal` as the rule says; `stated`: temperatures on the rule with no source
   * named; `reference`: no temperatures, the curve's own 23 °C.
   */
  temperatureSource: 'forecast' | 'seasonal' | 'stated' | 'reference';
  /** Of the days up to the release, how many came from the forecast (0 unless the source is `forecast`). */
  forecastDays: number;
  temperaturePlace: string | null;
  /** Day 0 of the temperatures (ISO date), when known. */
  temperaturesFrom: string | null;
  /** The whole reasoning in words: target, curve, datum, reference, temperatures used and their source. */
  summary: string;
  pouredAt: Instant;
  releaseAt: Instant;
}

const oneDecimal = (n: number) => (Math.round(n * 10) / 10).toFixed(1);
/** "12.0, 11.0, 13.7 (× 10)": equal days in a row are counted, not repeated. */
function listOf(temps: readonly number[]): string {
  const out: [string, number][] = [];
  for (const t of temps) {
    const v = oneDecimal(t),
      last = out[out.length - 1];
    if (last?.[0] === v) last[1]++;
    else out.push([v, 1]);
  }
  return out.map(([v, n]) => (n > 1 ? `${v} (× ${n})` : v)).join(', ');
}

/** The explanation's sentence: which temperatures, from where, and what they made of the cure. */
function cureSummary(rule: CureRule, ex: Omit<CureExplanation, 'summary'>): string {
  const pct = Math.round(rule.targetFraction * 100);
  const curve = `${pct}% of 28-day strength needs ${oneDecimal(ex.requiredAgeDays)} days at ${ex.referenceC} °C (ACI 209R-92, standard moist curing)`;
  const temps = ex.assumedTempsC;
  if (!temps)
    return `${curve}; no site temperatures, so the base is taken to cure as at ${ex.referenceC} °C: released after ${oneDecimal(ex.elapsedDays)} days.`;
  const place = ex.temperaturePlace ? ` for ${ex.temperaturePlace}` : '';
  const seasonal = `the seasonal assumption${rule.seasonalBasis ? ` (${rule.seasonalBasis}, an assumption)` : ''}`;
  // The days that counted, day 0 up to the release (the last temperature repeats past the list's end),
  // in runs of one source each.
  const runs: { kind: 'forecast' | 'seasonal' | 'stated'; temps: number[] }[] = [];
  for (let d = 0; d < Math.max(1, Math.ceil(ex.elapsedDays)); d++) {
    const i = Math.min(d, temps.length - 1);
    const forecast = rule.fromForecast?.[i] ?? ex.temperatureSource === 'forecast';
    const kind = ex.temperatureSource === 'stated' ? 'stated' : forecast ? 'forecast' : 'seasonal';
    const last = runs[runs.length - 1];
    if (last?.kind === kind) last.temps.push(temps[i] as number);
    else runs.push({ kind, temps: [temps[i] as number] });
  }
  const words = runs
    .map((r, n) => {
      const then = n > 0 ? 'then ' : '';
      if (r.kind === 'forecast') return `${then}the weather forecast${place} ${listOf(r.temps)} °C`;
      if (r.kind === 'seasonal')
        return `${then}${n === 0 && ex.temperatureSource === 'seasonal' ? `no forecast${place} on file, so ` : ''}${seasonal} ${listOf(r.temps)} °C`;
      return `${listOf(r.temps)} °C${place}`;
    })
    .join(', ');
  const from = ex.temperaturesFrom ? ` from ${ex.temperaturesFrom}` : '';
  return `${curve}; Nurse–Saul equivalent age (ASTM C1074, datum ${ex.datumC} °C, reference ${ex.referenceC} °C) with daily mean air temperatures${from}: ${words}: released after ${oneDecimal(ex.elapsedDays)} days.`;
}

/** Of the days up to the release, those the forecast gave (all of them when the rule marks none). */
function forecastDaysUsed(length: number, elapsedDays: number, fromForecast: readonly boolean[] | undefined): number {
  let n = 0;
  for (let d = 0; d < Math.max(1, Math.ceil(elapsedDays)); d++)
    if (fromForecast?.[Math.min(d, length - 1)] ?? true) n++;
  return n;
}

/**
 * When concrete poured (finished) at `pouredAt` reaches the rule's target fraction of 28-day
 * strength. Without temperatures: the ACI 209R-92 age (the curve's own 23 °C). With temperatures:
 * the ACI age is taken as the required Nurse–Saul equivalent age at the reference temperature
 * (23 °C unless the rule says), counted above the datum (0 °C unless the rule says).
 *
 * @example
 * cureRelease(pourEnd, { targetFraction: 0.7 }).elapsedDays // 6.91…
 */
export function cureRelease(pouredAt: Instant, rule: CureRule): CureExplanation {
  const requiredAgeDays = ageForStrengthRatio(rule.targetFraction);
  const temps = rule.dailyMeanTempsC && rule.dailyMeanTempsC.length > 0 ? rule.dailyMeanTempsC.slice() : null;
  const options: MaturityOptions = { datumC: rule.datumC ?? DATUM_C, referenceC: rule.referenceC ?? REFERENCE_C };
  const elapsedDays = temps ? elapsedDaysForEquivalentAge(temps, requiredAgeDays, options) : requiredAgeDays;
  const ex: Omit<CureExplanation, 'summary'> = {
    model: temps ? 'nurse_saul_maturity' : 'aci209_age',
    targetFraction: rule.targetFraction,
    requiredAgeDays,
    assumedTempsC: temps,
    elapsedDays,
    equivalentAgeDays: temps ? equivalentAge(temps, elapsedDays, options) : elapsedDays,
    datumC: options.datumC as number,
    referenceC: options.referenceC as number,
    temperatureSource: temps ? (rule.temperatureSource ?? 'stated') : 'reference',
    forecastDays:
      temps && rule.temperatureSource === 'forecast'
        ? forecastDaysUsed(temps.length, elapsedDays, rule.fromForecast)
        : 0,
    temperaturePlace: rule.temperaturePlace ?? null,
    temperaturesFrom: rule.temperaturesFrom ?? null,
    pouredAt,
    releaseAt: releaseInstant(pouredAt, elapsedDays),
  };
  return { ...ex, summary: cureSummary(rule, ex) };
}

const elapsedCache = new WeakMap<CureRule, number>();

/**
 * Elapsed days from the end of a pour to its release under a cure rule, cached per rule object
 * (the checks ask for it once per link).
 *
 * @example
 * cureElapsedDays({ targetFraction: 0.7 }) // 6.9136…
 */
export function cureElapsedDays(rule: CureRule): number {
  let d = elapsedCache.get(rule);
  if (d === undefined) {
    d = cureRelease(0, rule).elapsedDays;
    elapsedCache.set(rule, d);
  }
  return d;
}
