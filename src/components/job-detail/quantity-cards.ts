/**
 * The job page's quantity cards: each figure a groundworker orders or plans from, with the inputs it used
 * (named, with their units), the formula with the values put in, and where its figures come from.
 * Pure: the page only lays these out.
 */
import type { Computation } from '@shared/quantities/types';
import type { JobQuantities } from '@shared/quantities/job-quantities';
import { plural } from '@shared/plural';

export interface CardInput {
  label: string;
  value: string;
}
export interface QuantityCardView {
  key: keyof Omit<JobQuantities, 'installationType' | 'depthBelowGroundMm'>;
  name: string;
  headline: string;
  inputs: CardInput[];
  formula: string;
  /** The basis of the figure in one line: physics, a standard, or "common practice, no source". */
  source: string;
  /** The computation's own notes: each default's origin, cautions, what is left out. */
  notes: string[];
}
export interface QuantityGroup {
  key: string;
  title: string;
  cards: QuantityCardView[];
}

/** Each input's words and unit ('' for a count or a choice). A key missing here shows as its own name. */
export const INPUT_LABELS: Record<string, [label: string, unit: string]> = {
  unitLengthMm: ['Unit length', 'mm'],
  unitWidthMm: ['Unit width', 'mm'],
  unitHeightMm: ['Unit height', 'mm'],
  serviceGapMm: ['Service gap each side', 'mm'],
  serviceSideGapMm: ['Gap at the equipment end', 'mm'],
  wallThicknessMm: ['Wall thickness each side', 'mm'],
  workingRoomMm: ['Working room each side', 'mm'],
  digAreaM2: ['Dig area', 'm²'],
  unitDepthBelowGroundMm: ['Unit below ground', 'mm'],
  baseThicknessMm: ['Base thickness', 'mm'],
  subBaseMm: ['Sub-base', 'mm'],
  bankVolumeM3: ['Dug volume (in the ground)', 'm³'],
  bulkingFactor: ['Bulking factor', '×'],
  densityTPerM3: ['Density', 't/m³'],
  skipVolumeM3: ['Skip volume', 'm³'],
  skipPayloadT: ['Skip weight limit', 't'],
  grabLorryVolumeM3: ['Grab-lorry load', 'm³'],
  grabLorryPayloadT: ['Grab-lorry payload', 't'],
  volumeM3: ['Volume to dig', 'm³'],
  excavator: ['Excavator', ''],
  rateM3PerHour: ['Digging rate', 'm³/h'],
  groundType: ['Ground (from the survey)', ''],
  groundRateFactor: ['Ground factor', '×'],
  areaM2: ['Base area', 'm²'],
  thicknessMm: ['Thickness', 'mm'],
  orderStepT: ['Order step', 't'],
  wasteFraction: ['Waste allowance', ''],
  orderStepM3: ['Order step', 'm³'],
  insideLengthMm: ['Pit length inside the walls', 'mm'],
  insideWidthMm: ['Pit width inside the walls', 'mm'],
  wallHeightMm: ['Wall height', 'mm'],
  blockLengthMm: ['Block length', 'mm'],
  blockHeightMm: ['Block height', 'mm'],
  blockThicknessMm: ['Block thickness', 'mm'],
  jointMm: ['Mortar joint', 'mm'],
  laying: ['Laid', ''],
  unitDryWeightKg: ['Unit dry weight', 'kg'],
  routeWidthMm: ['Route width (survey)', 'mm'],
  routeHeightMm: ['Route height (survey)', 'mm'],
  widthAllowanceMm: ['Width allowance', 'mm'],
  dollyHeightMm: ['Dolly height', 'mm'],
  uprightRaiseMm: ['Upright raise', 'mm'],
  maxDollyDryWeightKg: ['Dolly weight limit', 'kg'],
  byCrane: ['Lifted by crane', ''],
  steps: ['Steps (from the survey)', ''],
  crew: ['People on a level route', ''],
  extraCrewOnSteps: ['Extra people on steps', ''],
  minutes: ['Time on a level route', 'min'],
  minutesPerStep: ['Time a step adds', 'min'],
  accessWay: ['Access check', ''],
  surveyorSaysCrane: ["Surveyor's call", ''],
  overheadObstructions: ['Overhead obstructions', ''],
  filledWeightKg: ['Filled weight', 'kg'],
  litres: ['Water held', 'L'],
  flowLitresPerMinute: ['Hose flow', 'L/min'],
  flowFrom: ['Flow from', ''],
  startTempC: ['Fill water', '°C'],
  targetTempC: ['Target', '°C'],
  heaterKw: ['Heater power', 'kW'],
  heaterFrom: ['Heater power from', ''],
  circuitAmps: ['New circuits', 'A'],
  existingLoads: ['Large loads already in the house', ''],
  mainFuseAmps: ['Main fuse (survey)', 'A'],
  checkFraction: ['Check above', ''],
  earthing: ['Earthing (survey)', ''],
};

/** Values that are codes, in words. */
const WORDS: Record<string, Record<string, string>> = {
  flowFrom: { survey: 'measured at the survey', default: "the firm's default" },
  heaterFrom: { unit: "the unit's figure", default: "the firm's default" },
  laying: { flat: 'flat', on_edge: 'on edge' },
  accessWay: { upright: 'upright', on_side: 'on its side', crane: 'needs a crane' },
};
const NULL_WORDS: Record<string, string> = {
  routeHeightMm: 'open above',
  mainFuseAmps: 'not recorded',
  earthing: 'not recorded',
  surveyorSaysCrane: 'left to the access check',
  accessWay: 'not measured',
};
const FRACTIONS = new Set(['wasteFraction', 'checkFraction']);

function valueText(key: string, value: unknown, unit: string): string {
  if (value === null || value === undefined) return NULL_WORDS[key] ?? '—';
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (key === 'existingLoads') {
    const loads = value as { name: string; amps: number }[];
    return loads.length ? loads.map((l) => `${l.name} ${l.amps} A`).join(', ') : 'none recorded';
  }
  if (Array.isArray(value)) return value.length ? value.map((v) => `${String(v)} ${unit}`).join(' + ') : 'none';
  if (typeof value === 'number' && FRACTIONS.has(key)) return `${Math.round(value * 1000) / 10} %`;
  if (typeof value === 'string') return WORDS[key]?.[value] ?? value.replace(/_/g, ' ');
  return unit ? `${String(value)} ${unit}` : String(value);
}

/** A computation's inputs as labelled values with their units. */
export function cardInputs(inputs: object): CardInput[] {
  return Object.entries(inputs).map(([key, value]) => {
    const [label, unit] = INPUT_LABELS[key] ?? [key, ''];
    return { label, value: valueText(key, value, unit) };
  });
}

/** Minutes as "1 h 45 min", "16 h 30 min", "45 min". */
export function duration(minutes: number): string {
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes - h * 60);
  return h === 0 ? `${m} min` : m === 0 ? `${h} h` : `${h} h ${m} min`;
}

const WAY = { upright: 'Goes in upright', on_side: 'Goes in on its side on a dolly', crane: 'Needs a crane' } as const;
const SUPPLY = {
  ok: 'supply looks adequate',
  check: 'electrician to check the supply',
  exceeds: 'over the main fuse: electrician and network operator to check',
  unknown: 'main fuse not recorded',
} as const;
const COMMON = 'common practice, no source';

/** The job's figures as cards, grouped as a groundworker and a crew would read them; figures that do not apply are left out. */
export function quantityGroups(q: JobQuantities): QuantityGroup[] {
  const card = <I extends object, R>(
    key: QuantityCardView['key'],
    c: Computation<I, R> | null,
    headline: (r: R) => string,
    source: (c: Computation<I, R>) => string,
  ): QuantityCardView[] =>
    c
      ? [
          {
            key,
            name: c.name,
            headline: headline(c.result),
            inputs: cardInputs(c.inputs),
            formula: c.formula,
            source: source(c),
            notes: c.notes,
          },
        ]
      : [];
  const groups: QuantityGroup[] = [
    {
      key: 'dig',
      title: 'The dig',
      cards: [
        ...card(
          'pit',
          q.pit,
          (r) => `Dig ${r.lengthMm} × ${r.widthMm} mm (${r.areaM2} m²)`,
          (c) =>
            `Gaps and working room: ${COMMON}${c.inputs.wallThicknessMm > 0 ? '; walls: the block as the firm lays it' : ''}`,
        ),
        ...card(
          'excavation',
          q.excavation,
          (r) => `${r.volumeM3} m³ dug, ${r.depthMm} mm deep`,
          () => 'Geometry: area × depth',
        ),
        ...card(
          'excavationTime',
          q.excavationTime,
          (r) => `About ${Math.round(r.hours * 10) / 10} h of digging (${duration(r.minutes)} planned)`,
          (c) =>
            `Rates and ground factors: ${COMMON}; ground from the ${c.inputs.groundType === 'unknown' ? 'survey (not recorded)' : 'survey'}`,
        ),
        ...card(
          'spoil',
          q.spoil,
          (r) =>
            `${r.looseVolumeM3} m³ loose, ${r.weightT} t: ${plural(r.skips, 'skip')} (${r.skip.limit} decides) or ${plural(r.grabLorryLoads, 'grab-lorry load')}`,
          () => `Bulking and wet soil 1.6–1.8 t/m³: ${COMMON}; 6 yd³ skip = 4.587 m³ (international yard)`,
        ),
      ],
    },
    {
      key: 'order',
      title: 'To order',
      cards: [
        ...card(
          'subBase',
          q.subBase,
          (r) => `Order ${r.orderTonnes} t of sub-base (${r.tonnes} t needed)`,
          () => `Compacted density: from memory, suppliers quote 2.0–2.2 t/m³; ${COMMON}`,
        ),
        ...card(
          'concrete',
          q.concrete,
          (r) => `Order ${r.orderVolumeM3} m³ of concrete (${r.withWasteM3} m³ with waste)`,
          (c) => `Thickness and waste: ${COMMON}; order step ${c.inputs.orderStepM3} m³: the firm's`,
        ),
        ...card(
          'blocks',
          q.blocks,
          (r) =>
            `${r.blocks} blocks laid ${r.laying === 'flat' ? 'flat' : 'on edge'} (${r.laying === 'flat' ? `on edge: ${r.onEdge.blocks}` : `flat: ${r.flat.blocks}`})`,
          () => `Block size, joints and laying: ${COMMON}`,
        ),
      ],
    },
    {
      key: 'in',
      title: 'Getting the unit in',
      cards: [
        ...card(
          'access',
          q.access,
          (r) => WAY[r.way],
          () => `Allowances and the dolly limit: ${COMMON}; route from the survey`,
        ),
        ...card(
          'move',
          q.move,
          (r) =>
            `${plural(r.people, 'person', 'people')}, ${duration(r.minutes)}${r.boards ? ', boards over the steps' : ''}`,
          () => `People and minutes: ${COMMON}; steps from the survey`,
        ),
        ...card(
          'crane',
          q.crane,
          (r) => (r.needed ? 'Crane lift' : 'No crane'),
          () => "The surveyor's call, else the access check",
        ),
        ...card(
          'loading',
          q.loading,
          (r) => `${r.pressureKNPerM2} kN/m² on the base`,
          () => 'Physics: standard gravity 9.80665 m/s² (CGPM 1901)',
        ),
      ],
    },
    {
      key: 'water',
      title: 'Filling and heating',
      cards: [
        ...card(
          'fill',
          q.fill,
          (r) => `${duration(r.minutes)} to fill`,
          (c) =>
            c.inputs.flowFrom === 'survey'
              ? 'Hose flow measured at the survey'
              : "Hose flow: the firm's default (from memory: a garden tap gives about 10–20 L/min)",
        ),
        ...card(
          'heatUp',
          q.heatUp,
          (r) => `At least ${r.hours} h to heat (${r.energyKWh} kWh)`,
          () => 'Physics: specific heat of water 4.186 kJ/(kg·K), 1 kg a litre; heat losses left out',
        ),
      ],
    },
    {
      key: 'supply',
      title: 'Electrics',
      cards: card(
        'supply',
        q.supply,
        (r) =>
          `${r.totalAmps} A${r.shareOfFuse === null ? '' : ` (${Math.round(r.shareOfFuse * 100)} % of the main fuse)`}: ${SUPPLY[r.verdict]}` +
          (r.verdict === 'ok' && r.electricianToLook ? '; the electrician to look at the earthing' : ''),
        (c) => `Threshold ${Math.round(c.inputs.checkFraction * 100)} %: ${COMMON}; not an electrical design`,
      ),
    },
  ];
  return groups.filter((g) => g.cards.length > 0);
}
