import { cautionsFor } from '../cautions.ts';
import { plural } from '../plural.ts';
import type { Spoil, SpoilInputs } from '../quantities/pit.ts';
import type { DependencyType, InstallTemplate, LagUnit, Requirement, StageNotice } from './types.ts';

export interface PlanOptions {
  craneNeeded: boolean;
  /** Excavation minutes worked out from the job's quantities, or null to use the fallback. */
  excavationMinutes: number | null;
  /** The maker's lead time for this unit, in working days, replacing the delivery stage's default. */
  makerLeadDays?: number | null;
}

export interface PlannedStage {
  kind: string;
  name: string;
  sequence: number;
  durationMinutes: number;
  /** How the duration was reached, for the job page. */
  durationSource: string;
  requirements: Requirement[];
  cure: { targetFraction: number } | null;
  /** The notice the job's stage needs (the engine checks it); the maker's lead time on the delivery. */
  leadTime: StageNotice | null;
  /** May a booking of it run over into the next working day (see StageTemplate.mayContinueNextDay). */
  mayContinueNextDay: boolean;
  /** Placed as late as the stages after it allow (see StageTemplate.justInTime). */
  justInTime: boolean;
  cautions: string[];
}

export interface PlannedLink {
  fromKind: string;
  toKind: string;
  type: DependencyType;
  lagAmount: number;
  lagUnit: LagUnit;
  waitsForCure: boolean;
}

export interface Plan {
  stages: PlannedStage[];
  links: PlannedLink[];
}

/**
 * A job's stages and dependencies from a template: a crane lift only when a crane is needed,
 * otherwise the placement stage; links touching a stage left out are left out too. Pure; the
 * template is not changed.
 * @example
 * planFromTemplate(SLAB_TEMPLATE, { craneNeeded: false, excavationMinutes: null }).stages.map((s) => s.kind)
 * // ['survey', 'base_pour', 'electrical_first_fix', 'delivery', 'placement', 'fill', 'electrical_connect', 'commission', 'handover']
 */
export function planFromTemplate(template: InstallTemplate, options: PlanOptions): Plan {
  const wanted = template.stages.filter((s) => {
    const when = s.when ?? 'always';
    return when === 'always' || (when === 'crane') === options.craneNeeded;
  });
  const stages = wanted.map((s, n): PlannedStage => {
    let durationMinutes: number;
    let durationSource: string;
    if (s.duration.kind === 'fixed') {
      durationMinutes = s.duration.minutes;
      durationSource = 'fixed in the template';
    } else if (options.excavationMinutes !== null && options.excavationMinutes > 0) {
      durationMinutes = options.excavationMinutes;
      durationSource = 'from the excavation volume and the excavator’s rate';
    } else {
      durationMinutes = s.duration.fallbackMinutes;
      durationSource = 'template fallback (no quantities yet)';
    }
    const leadTime: StageNotice | null =
      s.kind === 'delivery' && options.makerLeadDays
        ? { workingDays: options.makerLeadDays, countedFrom: 'order', reason: "the maker's lead time" }
        : s.leadTime
          ? { ...s.leadTime }
          : null;
    return {
      kind: s.kind,
      name: s.name,
      sequence: n + 1,
      durationMinutes,
      durationSource,
      requirements: s.requirements.map((r) => ({ ...r })),
      cure: s.cure ? { ...s.cure } : null,
      leadTime,
      mayContinueNextDay: s.mayContinueNextDay === true,
      justInTime: s.justInTime === true,
      cautions: cautionsFor(s.kind),
    };
  });
  const kinds = new Set(stages.map((s) => s.kind));
  const links = template.links
    .filter((l) => kinds.has(l.from) && kinds.has(l.to))
    .map((l): PlannedLink => ({
      fromKind: l.from,
      toKind: l.to,
      type: l.type,
      lagAmount: l.lagAmount,
      lagUnit: l.lagUnit,
      waitsForCure: l.waitsForCure === true,
    }));
  return { stages, links };
}

/**
 * Problems with a template as a firm edited it: repeated kinds, links to unknown stages, a stage
 * linked to itself, a link waiting for the cure of a stage that has none, notice for a kind of
 * resource the stage does not need, or a loop. Empty when it is sound.
 * @example
 * templateProblems({ ...SLAB_TEMPLATE, links: [{ from: 'fill', to: 'fill', type: 'FS', lagAmount: 0, lagUnit: 'working_hours' }] })
 * // ['links[0]: a stage cannot depend on itself']
 */
export function templateProblems(template: InstallTemplate): string[] {
  const problems: string[] = [];
  const kinds = new Set<string>();
  template.stages.forEach((s, n) => {
    if (kinds.has(s.kind)) problems.push(`stages[${n}]: kind ${s.kind} appears twice`);
    kinds.add(s.kind);
  });
  template.stages.forEach((s, n) => {
    const kind = s.leadTime?.resourceKind;
    if (kind && !s.requirements.some((r) => r.kind === kind))
      problems.push(`stages[${n}].leadTime.resourceKind: ${s.name} needs no ${kind.replace(/_/g, ' ')}`);
  });
  template.links.forEach((l, n) => {
    if (!kinds.has(l.from)) problems.push(`links[${n}]: no stage ${l.from}`);
    if (!kinds.has(l.to)) problems.push(`links[${n}]: no stage ${l.to}`);
    if (l.from === l.to) problems.push(`links[${n}]: a stage cannot depend on itself`);
    const from = template.stages.find((s) => s.kind === l.from);
    if (l.waitsForCure === true && from && !from.cure)
      problems.push(`links[${n}].waitsForCure: ${from.name} has no cure to wait for`);
  });
  if (problems.length) return problems;
  // A loop in either planned variant (crane or not) would leave the job unschedulable.
  for (const craneNeeded of [true, false]) {
    const plan = planFromTemplate(template, { craneNeeded, excavationMinutes: null });
    const next = new Map<string, string[]>();
    for (const l of plan.links) next.set(l.fromKind, [...(next.get(l.fromKind) ?? []), l.toKind]);
    const state = new Map<string, 1 | 2>();
    const visit = (k: string): boolean => {
      if (state.get(k) === 2) return false;
      if (state.get(k) === 1) return true;
      state.set(k, 1);
      const loop = (next.get(k) ?? []).some(visit);
      state.set(k, 2);
      return loop;
    };
    if (plan.stages.some((s) => visit(s.kind))) {
      problems.push('links form a loop');
      break;
    }
  }
  return problems;
}

/**
 * The spoil stage's note: how many skips or grab-lorry loads the job's quantities give, and which
 * limit (volume or weight) decides each count, so the office books the haulier for the right number.
 * @example
 * spoilAwayNote({ inputs: { densityTPerM3: 1.8, … }, result: { looseVolumeM3: 8.985, weightT: 16.173, skips: 3, grabLorryLoads: 2, skip: { limit: 'weight', … }, grabLorry: { limit: 'weight', … } } })
 * // '3 skips by weight or 2 grab-lorry loads by weight (8.985 m³ loose, 16.173 t of wet soil at 1.8 t/m³: common practice, no source).'
 */
export function spoilAwayNote(spoil: { inputs: Pick<SpoilInputs, 'densityTPerM3'>; result: Spoil }): string {
  const r = spoil.result;
  return (
    `${plural(r.skips, 'skip')} by ${r.skip.limit} or ${plural(r.grabLorryLoads, 'grab-lorry load')} by ${r.grabLorry.limit}` +
    ` (${r.looseVolumeM3} m³ loose, ${r.weightT} t of wet soil at ${spoil.inputs.densityTPerM3} t/m³: common practice, no source).`
  );
}
