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
 * ASTM C1074 Nurse–Saul datum temperature, °C.
 *
 * @example
 * DATUM_C // -10
 */
export const DATUM_C = -10;
/**
 * Reference temperature for equivalent age, °C (the ACI curve is read at this temperature).
 *
 * @example
 * REFERENCE_C // 20
 */
export const REFERENCE_C = 20;

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
    throw new RangeError(`A target of ${ratio} of 28-day strength is outside what the ACI 209 curve reaches (0 to ${(1 / ACI_B).toFixed(3)})`);
  }
  return (ACI_A_DAYS * ratio) / (1 - ACI_B * ratio);
}

/** Options for maturity sums. */
export interface MaturityOptions {
  datumC?: number;
  referenceC?: number;
}

function dayFactor(tempC: number, o: MaturityOptions): number {
  const t0 = o.datumC ?? DATUM_C, tr = o.referenceC ?? REFERENCE_C;
  return Math.max(0, tempC - t0) / (tr - t0);
}

/**
 * Nurse–Saul equivalent age (ASTM C1074): te = Σ (Ta − T0)/(Tr − T0) Δt, in days, for the first
 * `elapsedDays` of the temperature list (the last temperature repeats past its end; a part day
 * counts in proportion; temperatures below the datum add nothing).
 *
 * @example
 * equivalentAge([5, 5, 10], 3) // (15 + 15 + 20) / 30 = 1.667 days
 */
export function equivalentAge(dailyMeanTempsC: readonly number[], elapsedDays: number, options: MaturityOptions = {}): number {
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
 * elapsedDaysForEquivalentAge([5], 1) // 2 (each 5 °C day counts 15/30 = half a day)
 */
export function elapsedDaysForEquivalentAge(dailyMeanTempsC: readonly number[], targetDays: number, options: MaturityOptions = {}): number {
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
  pouredAt: Instant;
  releaseAt: Instant;
}

/**
 * When concrete poured (finished) at `pouredAt` reaches the rule's target fraction of 28-day
 * strength. Without temperatures: ACI 209R-92 age. With temperatures: the ACI age is taken as the
 * required Nurse–Saul equivalent age at 20 °C.
 *
 * @example
 * cureRelease(pourEnd, { targetFraction: 0.7 }).elapsedDays // 6.91…
 */
export function cureRelease(pouredAt: Instant, rule: CureRule): CureExplanation {
  const requiredAgeDays = ageForStrengthRatio(rule.targetFraction);
  const temps = rule.dailyMeanTempsC && rule.dailyMeanTempsC.length > 0 ? rule.dailyMeanTempsC.slice() : null;
  const elapsedDays = temps ? elapsedDaysForEquivalentAge(temps, requiredAgeDays) : requiredAgeDays;
  return {
    model: temps ? 'nurse_saul_maturity' : 'aci209_age',
    targetFraction: rule.targetFraction,
    requiredAgeDays,
    assumedTempsC: temps,
    elapsedDays,
    equivalentAgeDays: temps ? equivalentAge(temps, elapsedDays) : elapsedDays,
    pouredAt,
    releaseAt: releaseInstant(pouredAt, elapsedDays),
  };
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
  if (d === undefined) { d = cureRelease(0, rule).elapsedDays; elapsedCache.set(rule, d); }
  return d;
}
