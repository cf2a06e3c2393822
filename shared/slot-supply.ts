import { EARTHING_ARRANGEMENTS, type EarthingArrangement } from './quantities/supply.ts';

/**
 * What an electrician needs to quote for and prepare a spa's supply, as one set of facts every
 * output shows the same way (the e-mailed request, the answer page, the partner's slot list): the
 * unit's load from its model data, and the house's supply as the survey recorded it.
 */

/**
 * The nominal single-phase voltage the load in kW is worked out at: 230 V, the nominal low-voltage
 * supply of IEC 60038 used in the UK and Europe (from memory). Elsewhere the firm's electrician
 * reads the amps, which are the unit's own figures.
 */
export const NOMINAL_VOLTS = 230;

export interface SlotSupply {
  /** The unit's dedicated supplies, amps each, as the unit model lists them; empty when not known. */
  circuitAmps: number[];
  totalAmps: number;
  /** totalAmps × NOMINAL_VOLTS, in kW to one decimal place; null when the amps are not known. */
  loadKw: number | null;
  /** The house's main fuse as recorded at the survey. */
  mainFuseAmps: number | null;
  earthing: EarthingArrangement | null;
  /** The run from the consumer unit to the spa position, as measured at the survey. */
  cableRunM: number | null;
  /** Where the consumer unit is, in the surveyor's words ("Garage, left of the door"). */
  consumerUnitLocation: string | null;
  /** Whether the job has been surveyed at all (else "not recorded" says why). */
  surveyed: boolean;
}

/** The survey's supply fields as the database row holds them (decimals may arrive as strings). */
export interface SurveySupplyRow {
  mainFuseAmps: number | null;
  earthingArrangement: string | null;
  consumerUnitDistanceM: number | string | null;
  consumerUnitLocation?: string | null;
}

const numberOrNull = (v: number | string | null | undefined): number | null => {
  if (v === null || v === undefined || v === '') return null;
  const n = Number(v);
  return Number.isFinite(n) ? n : null;
};

/**
 * The supply facts of one job, from its unit's supplies and its survey (either may be missing).
 * @example
 * slotSupply([{ amps: 32 }, { amps: 16 }], { mainFuseAmps: 100, earthingArrangement: 'TN-C-S', consumerUnitDistanceM: '14.50' })
 * // { circuitAmps: [32, 16], totalAmps: 48, loadKw: 11, mainFuseAmps: 100, earthing: 'TN-C-S', cableRunM: 14.5, consumerUnitLocation: null, surveyed: true }
 */
export function slotSupply(
  unitSupplies: readonly { amps: number }[] | null,
  survey: SurveySupplyRow | null,
): SlotSupply {
  const circuitAmps = (unitSupplies ?? []).map((s) => Number(s.amps)).filter((a) => Number.isFinite(a) && a > 0);
  const totalAmps = circuitAmps.reduce((sum, a) => sum + a, 0);
  const earthing = (EARTHING_ARRANGEMENTS as readonly string[]).includes(survey?.earthingArrangement ?? '')
    ? (survey!.earthingArrangement as EarthingArrangement)
    : null;
  return {
    circuitAmps,
    totalAmps,
    loadKw: totalAmps > 0 ? Math.round((totalAmps * NOMINAL_VOLTS) / 100) / 10 : null,
    mainFuseAmps: numberOrNull(survey?.mainFuseAmps),
    earthing,
    cableRunM: numberOrNull(survey?.consumerUnitDistanceM),
    consumerUnitLocation: survey?.consumerUnitLocation?.trim() || null,
    surveyed: survey !== null,
  };
}

const EARTHING_WORDS: Record<EarthingArrangement, string> = {
  'TN-C-S': 'TN-C-S (PME)',
  'TN-S': 'TN-S',
  TT: 'TT (earth electrode at the house)',
  unknown: 'the surveyor could not tell: please establish it on site',
};

const NOT_RECORDED = 'not recorded at the survey';

/** Said once in place of the house's four supply facts when nobody has surveyed the site yet. */
export const NOT_SURVEYED_LINE =
  'House supply: the site has not been surveyed yet; its main fuse, earthing, consumer unit and cable run will show here once it has';

/**
 * The supply facts as lines of plain text, the same in every output. Before the survey the house's
 * facts are one line saying so, not four saying the same thing.
 * @example
 * supplyLines(slotSupply([{ amps: 32 }], null))[0] // 'Unit load: 32 A (one dedicated supply), about 7.4 kW at 230 V'
 */
export function supplyLines(s: SlotSupply): string[] {
  const load =
    s.circuitAmps.length === 0
      ? "Unit load: not in the unit's data; ask the installer"
      : `Unit load: ${s.circuitAmps.map((a) => `${a} A`).join(' + ')}${s.circuitAmps.length > 1 ? ` = ${s.totalAmps} A` : ''} (${s.circuitAmps.length === 1 ? 'one dedicated supply' : `${s.circuitAmps.length} dedicated supplies`}), about ${s.loadKw!.toFixed(1)} kW at ${NOMINAL_VOLTS} V`;
  if (!s.surveyed) return [load, NOT_SURVEYED_LINE];
  return [
    load,
    `Main fuse: ${s.mainFuseAmps === null ? NOT_RECORDED : `${s.mainFuseAmps} A`}`,
    `Earthing: ${s.earthing === null ? NOT_RECORDED : EARTHING_WORDS[s.earthing]}`,
    `Consumer unit: ${s.consumerUnitLocation ?? NOT_RECORDED}`,
    `Cable run from the consumer unit to the spa: ${s.cableRunM === null ? NOT_RECORDED : `${s.cableRunM} m`}`,
  ];
}
