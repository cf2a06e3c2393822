import { round, requireNumber, type Computation } from './types.ts';

/** Specific heat capacity of liquid water, kJ/(kg·K): physics (about 4.18–4.19 between 10 and 40 °C). */
export const WATER_SPECIFIC_HEAT_KJ_PER_KG_K = 4.186;
/** A litre of water weighs about 1 kg: physics (0.99–1.00 kg between 4 and 40 °C). */
export const WATER_KG_PER_LITRE = 1;

export interface FillTimeInputs {
  litres: number;
  flowLitresPerMinute: number;
  /** Where the flow came from: measured at the survey, or the firm's default. */
  flowFrom: 'survey' | 'default';
}
export interface FillTime {
  minutesExact: number;
  minutes: number;
  hours: number;
}

/**
 * Time to fill the unit through a hose: litres ÷ flow, rounded up to a quarter of an hour.
 * @example
 * fillTime({ litres: 1500, flowLitresPerMinute: 15, flowFrom: 'default' }).result
 * // { minutesExact: 100, minutes: 105, hours: 1.75 }
 */
export function fillTime(inputs: FillTimeInputs): Computation<FillTimeInputs, FillTime> {
  const { litres, flowLitresPerMinute: flow, flowFrom } = inputs;
  requireNumber('litres', litres);
  requireNumber('flowLitresPerMinute', flow, 0, true);
  const exact = litres / flow;
  const minutes = Math.max(15, Math.ceil(round(exact / 15, 9)) * 15);
  return {
    name: 'Fill time',
    inputs: { ...inputs },
    formula: `${litres} L ÷ ${flow} L/min = ${round(exact, 1)} min → ${minutes} min (rounded up to a quarter of an hour)`,
    result: { minutesExact: round(exact, 1), minutes, hours: round(minutes / 60, 2) },
    unit: 'min',
    notes: [
      flowFrom === 'survey'
        ? 'Flow measured at the survey.'
        : `Flow ${flow} L/min is the firm's default (from memory: a garden tap on mains gives about 10–20 L/min): time a bucket at the survey.`,
      'A second hose on another tap halves it, if the pressure holds.',
    ],
  };
}

export interface HeatUpInputs {
  litres: number;
  startTempC: number;
  targetTempC: number;
  heaterKw: number;
  /** Where the heater power came from: the unit's own figure, or the firm's default. */
  heaterFrom: 'unit' | 'default';
}
export interface HeatUp {
  temperatureRiseK: number;
  energyKJ: number;
  energyKWh: number;
  seconds: number;
  hours: number;
  /** The time to plan for: the seconds rounded up to a quarter of an hour (0 when no heating is needed). */
  minutes: number;
}

/**
 * Time for the unit's heater to bring the fresh fill up to temperature before commissioning:
 * energy = litres × 1 kg/L × 4.186 kJ/(kg·K) × ΔT; time = energy ÷ heater power, planned in quarter hours.
 * Heat lost through the cover, shell and pipes is left out, so the real time is longer: this is the least it can take.
 * @example
 * heatUpTime({ litres: 1500, startTempC: 10, targetTempC: 38, heaterKw: 3, heaterFrom: 'default' }).result
 * // { temperatureRiseK: 28, energyKJ: 175812, energyKWh: 48.837, seconds: 58604, hours: 16.28, minutes: 990 }
 * // (58 604 s = 976.7 min → 990 min, rounded up to a quarter of an hour)
 */
export function heatUpTime(inputs: HeatUpInputs): Computation<HeatUpInputs, HeatUp> {
  const { litres, startTempC: from, targetTempC: to, heaterKw: kw, heaterFrom } = inputs;
  requireNumber('litres', litres);
  requireNumber('heaterKw', kw, 0, true);
  if (!Number.isFinite(from) || !Number.isFinite(to))
    throw new RangeError(`temperatures must be numbers; got ${from} and ${to}`);
  const rise = Math.max(0, to - from);
  const energyKJ = litres * WATER_KG_PER_LITRE * WATER_SPECIFIC_HEAT_KJ_PER_KG_K * rise;
  const seconds = energyKJ / kw; // kJ ÷ kW = s
  const minutes = Math.ceil(round(seconds / 60 / 15, 9)) * 15;
  return {
    name: 'Heat-up time',
    inputs: { ...inputs },
    formula:
      `${litres} L × ${WATER_KG_PER_LITRE} kg/L × ${WATER_SPECIFIC_HEAT_KJ_PER_KG_K} kJ/(kg·K) × (${to} − ${from}) K = ${round(energyKJ, 1)} kJ; ` +
      `÷ ${kw} kW = ${round(seconds, 0)} s = ${round(seconds / 3600, 2)} h → ${minutes} min (rounded up to a quarter of an hour)`,
    result: {
      temperatureRiseK: round(rise),
      energyKJ: round(energyKJ, 1),
      energyKWh: round(energyKJ / 3600),
      seconds: round(seconds, 0),
      hours: round(seconds / 3600, 2),
      minutes,
    },
    unit: 'h',
    notes: [
      'Specific heat of water 4.186 kJ/(kg·K) and 1 kg a litre: physics.',
      'Heat lost through the cover, shell and pipes is left out: with the cover on, expect longer, and longer still in cold weather.',
      "Fill and target temperatures are the firm's (fill from memory: mains water is about 5–15 °C through the year).",
      heaterFrom === 'unit'
        ? "Heater power from the unit's catalogue figures."
        : `Heater ${kw} kW is the firm's default (from memory: many units have a 3 kW heater): the maker's figure wins.`,
      "Some units cannot heat while the jets run, and some heat more slowly on a smaller supply: the maker's manual says.",
    ],
  };
}
