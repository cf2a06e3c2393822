/**
 * What every quantity returns: the inputs it used, the formula in words and symbols, and the
 * result, so a page can show how a figure was reached and a person can check it by hand.
 */
export interface Computation<I extends object, R> {
  /** Short name of the quantity, e.g. "Excavation volume". */
  name: string;
  inputs: I;
  /** The formula as text, with the inputs' values put in. */
  formula: string;
  result: R;
  /** Unit of the result, e.g. "m³"; empty for a decision. */
  unit: string;
  /** Where each default comes from ("common practice, no source", a standard, …). */
  notes: string[];
}

/** Rounds half away from zero to `dp` decimal places, for figures shown to people. */
export function round(value: number, dp = 3): number {
  const f = 10 ** dp;
  // toPrecision(12) first, so a product like 6.25 × 1.15 = 7.18749999… rounds as the 7.1875 it is.
  return (Math.sign(value) * Math.round(Number((Math.abs(value) * f).toPrecision(12)))) / f;
}

/** Throws a RangeError unless `value` is a finite number ≥ `min` (or > `min` when `strict`). */
export function requireNumber(name: string, value: number, min = 0, strict = false): void {
  if (!Number.isFinite(value) || value < min || (strict && value === min)) {
    throw new RangeError(`${name} must be a number ${strict ? '>' : '≥'} ${min}; got ${value}`);
  }
}

/**
 * Rounds `value` up to a whole number of `step`s (what a supplier sells), e.g. 1.56 m³ in 0.25 m³ steps → 1.75.
 * A value already on a step stays there, even after floating-point noise (1.0000000001 → 1).
 */
export function roundUpToStep(value: number, step: number): number {
  requireNumber('step', step, 0, true);
  return round(Math.ceil(round(value / step, 9)) * step, 6);
}
