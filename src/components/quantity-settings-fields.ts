/**
 * The firm's quantity settings as a form: every figure behind a job's quantities, grouped as a groundworker
 * thinks of them, in words and units a firm recognises, and the patch a save sends (only what differs
 * from Waterline's defaults is kept as the firm's own).
 */
import {
  BLOCK_LAYINGS,
  EXCAVATOR_SIZES,
  GROUND_TYPES,
  type QuantityOverrides,
  type QuantitySettings,
} from '@shared/quantities/settings';
import { wallThicknessFor } from '@shared/quantities/blocks';
import { QuantitySettingsPatch } from '@shared/schemas/firm-settings';
import { fieldSentence } from '@/utils/problem';
import { humanise } from '@/utils/labels';

type NumberKey = {
  [K in keyof QuantitySettings]: QuantitySettings[K] extends number ? K : never;
}[keyof QuantitySettings];
type ChoiceKey = 'blockLaying' | 'defaultExcavator';
type RecordKey = 'excavatorRatesM3PerHour' | 'groundRateFactors';

/** One control: a number, a choice, or one entry of a per-excavator or per-ground table. `path` is its key on the form. */
export type SettingField =
  | { kind: 'number'; path: NumberKey; key: NumberKey; label: string; step: number }
  | { kind: 'choice'; path: ChoiceKey; key: ChoiceKey; label: string; options: { value: string; label: string }[] }
  | { kind: 'entry'; path: string; key: RecordKey; entry: string; label: string; step: number };
export interface SettingGroup {
  key: string;
  title: string;
  fields: SettingField[];
}

const num = (key: NumberKey, label: string, step = 1): SettingField => ({
  kind: 'number',
  path: key,
  key,
  label,
  step,
});
const GROUND_WORDS: Record<string, string> = { sand_gravel: 'sand and gravel', made_ground: 'made ground' };

/** Every setting in QuantitySettings appears once here (a test checks it). */
export const SETTING_GROUPS: SettingGroup[] = [
  {
    key: 'dig',
    title: 'The dig',
    fields: [
      num('perimeterGapMm', 'Service gap round the unit (mm each side)', 10),
      num('serviceSideGapMm', 'Gap at the equipment end (mm)', 10),
      num('workingRoomMm', 'Working room outside the walls (mm each side)', 10),
      num('semiRecessedDepthFraction', 'Semi-recessed: share of the unit below ground', 0.05),
      {
        kind: 'choice',
        path: 'defaultExcavator',
        key: 'defaultExcavator',
        label: 'Excavator unless the survey says',
        options: EXCAVATOR_SIZES.map((s) => ({ value: s, label: `${s} excavator` })),
      },
      ...EXCAVATOR_SIZES.map((s): SettingField => ({
        kind: 'entry',
        path: `excavatorRatesM3PerHour.${s}`,
        key: 'excavatorRatesM3PerHour',
        entry: s,
        label: `Digging rate, ${s} excavator (m³ an hour)`,
        step: 0.1,
      })),
      ...GROUND_TYPES.map((g): SettingField => ({
        kind: 'entry',
        path: `groundRateFactors.${g}`,
        key: 'groundRateFactors',
        entry: g,
        label: `Digging rate × for ${GROUND_WORDS[g] ?? g}`,
        step: 0.05,
      })),
    ],
  },
  {
    key: 'base',
    title: 'Base, sub-base and walls',
    fields: [
      num('baseThicknessMm', 'Base thickness (mm)', 10),
      num('concreteWasteFraction', 'Concrete waste allowance (0.05 = 5 %)', 0.01),
      num('concreteOrderStepM3', 'Concrete order step (m³)', 0.05),
      num('subBaseMm', 'Sub-base thickness (mm)', 10),
      num('subBaseDensityTPerM3', 'Sub-base compacted density (t/m³)', 0.05),
      num('subBaseOrderStepT', 'Sub-base order step (t)', 0.5),
      num('blockLengthMm', 'Block length (mm)'),
      num('blockHeightMm', 'Block height (mm)'),
      num('blockThicknessMm', 'Block thickness (mm)'),
      num('jointMm', 'Mortar joint (mm)'),
      {
        kind: 'choice',
        path: 'blockLaying',
        key: 'blockLaying',
        label: 'Walls laid',
        options: BLOCK_LAYINGS.map((l) => ({
          value: l,
          label: l === 'flat' ? 'Flat (wall = block height)' : 'On edge (wall = block thickness)',
        })),
      },
    ],
  },
  {
    key: 'spoil',
    title: 'Spoil',
    fields: [
      num('bulkingFactor', 'Bulking factor (loose ÷ dug)', 0.05),
      num('spoilDensityTPerM3', 'Loose wet soil (t/m³)', 0.05),
      num('skipVolumeM3', 'Skip volume (m³)', 0.1),
      num('skipPayloadT', 'Skip weight limit (t)', 0.5),
      num('grabLorryVolumeM3', 'Grab-lorry load (m³)', 0.5),
      num('grabLorryPayloadT', 'Grab-lorry payload (t)', 0.5),
    ],
  },
  {
    key: 'access',
    title: 'Access and moving in',
    fields: [
      num('accessWidthAllowanceMm', 'Width allowance on the route (mm)', 10),
      num('dollyHeightMm', 'Dolly height (mm)', 10),
      num('uprightRaiseMm', 'Upright raise on skates (mm)', 10),
      num('maxDollyDryWeightKg', 'Heaviest unit on a dolly (kg dry)', 10),
      num('moveCrew', 'People to move a unit in'),
      num('moveExtraCrewOnSteps', 'Extra people when there are steps'),
      num('moveMinutes', 'Minutes to move in on the level', 5),
      num('moveMinutesPerStep', 'Minutes each step adds'),
    ],
  },
  {
    key: 'water',
    title: 'Filling and heating',
    fields: [
      num('hoseFlowLitresPerMinute', 'Hose flow unless measured (litres a minute)', 0.5),
      num('heaterKw', 'Heater power unless the unit says (kW)', 0.5),
      num('fillWaterTempC', 'Fill water temperature (°C)'),
      num('targetWaterTempC', 'Temperature before commissioning (°C)'),
    ],
  },
  {
    key: 'supply',
    title: 'Electrics',
    fields: [num('supplyCheckFraction', 'Supply check above (share of the main fuse, 0.5 = 50 %)', 0.05)],
  },
];

/** Every control of the form. */
export const SETTING_FIELDS: SettingField[] = SETTING_GROUPS.flatMap((g) => g.fields);

export type FormValues = Record<string, number | string | null>;

/** A control's value in a set of settings. */
export function fieldValue(f: SettingField, s: QuantitySettings): number | string {
  return f.kind === 'entry' ? ((s[f.key] as Record<string, number>)[f.entry] ?? 0) : s[f.key];
}

/** The form's values for a set of settings, by each control's path. */
export function formValues(s: QuantitySettings): FormValues {
  return Object.fromEntries(SETTING_FIELDS.map((f) => [f.path, fieldValue(f, s)]));
}

/** How many controls differ from the saved settings. */
export function changedCount(values: FormValues, saved: QuantitySettings): number {
  return SETTING_FIELDS.filter((f) => values[f.path] !== fieldValue(f, saved)).length;
}

/**
 * The patch to save: the firm's present overrides, with each control set where it differs from the default
 * and dropped where it equals it. An empty number box counts as the default.
 * @example settingsPatch({ ...formValues(DEFAULT_QUANTITY_SETTINGS), concreteOrderStepM3: 0.5 }, {}, DEFAULT_QUANTITY_SETTINGS)
 * // { concreteOrderStepM3: 0.5 }
 */
export function settingsPatch(
  values: FormValues,
  overrides: QuantityOverrides,
  defaults: QuantitySettings,
): QuantitySettingsPatch {
  const out: Record<string, unknown> = { ...overrides };
  const entries: Record<RecordKey, Record<string, number | undefined>> = {
    excavatorRatesM3PerHour: { ...(overrides.excavatorRatesM3PerHour ?? {}) },
    groundRateFactors: { ...(overrides.groundRateFactors ?? {}) },
  };
  for (const f of SETTING_FIELDS) {
    const v = values[f.path];
    const same = v === null || v === '' || v === fieldValue(f, defaults);
    if (f.kind === 'entry') {
      if (same) delete entries[f.key][f.entry];
      else entries[f.key][f.entry] = Number(v);
    } else if (same) delete out[f.key];
    else out[f.key] = v;
  }
  for (const key of ['excavatorRatesM3PerHour', 'groundRateFactors'] as const) {
    if (Object.keys(entries[key]).length) out[key] = entries[key];
    else delete out[key];
  }
  return out as QuantitySettingsPatch;
}

/** The retaining wall's thickness the form's block size and laying give (it goes into the dig on both sides). */
export function wallThicknessText(values: FormValues): string {
  const laying = values.blockLaying === 'on_edge' ? 'on_edge' : 'flat';
  const mm = wallThicknessFor(laying, {
    blockHeightMm: Number(values.blockHeightMm),
    blockThicknessMm: Number(values.blockThicknessMm),
  });
  return `Walls ${mm} mm thick (blocks laid ${laying === 'flat' ? 'flat' : 'on edge'}), on both sides of the pit.`;
}

/**
 * What stops a patch being saved, by the form path of each setting, each a sentence naming the
 * setting by its label ("Gap at the equipment end (mm) must be at most 2,000"), checked with the
 * API's own schema; empty when it may be sent.
 *
 * @example settingProblems({ perimeterGapMm: 5000 }) // { perimeterGapMm: 'Service gap round the unit (mm each side) must be at most 1,000' }
 */
export function settingProblems(patch: QuantitySettingsPatch): Record<string, string> {
  const checked = QuantitySettingsPatch.safeParse(patch);
  if (checked.success) return {};
  const labels = new Map(SETTING_FIELDS.map((f) => [f.path as string, f.label]));
  return Object.fromEntries(
    checked.error.issues.map((i) => {
      const path = i.path.join('.');
      return [path, fieldSentence(labels.get(path) ?? humanise(path), i.message) as string];
    }),
  );
}
