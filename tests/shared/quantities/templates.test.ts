import { describe, expect, it } from 'vitest';
import {
  DECK_TEMPLATE,
  DEFAULT_TEMPLATES,
  IN_GROUND_TEMPLATE,
  SEMI_RECESSED_TEMPLATE,
  SLAB_TEMPLATE,
  planFromTemplate,
  spoilAwayNote,
  templateProblems,
} from '../../../shared/templates/index.ts';
import { spoil } from '../../../shared/quantities/pit.ts';
import { CAUTION_NOTE, cautionsFor } from '../../../shared/cautions.ts';
import { StageTemplateSchema } from '../../../shared/schemas/templates.ts';

describe('planning an in-ground job from its template', () => {
  const withCrane = planFromTemplate(IN_GROUND_TEMPLATE, {
    craneNeeded: true,
    excavationMinutes: 300,
    makerLeadDays: 20,
  });

  it('has the stages in order, with a crane lift and no placement', () => {
    expect(withCrane.stages.map((s) => s.kind)).toEqual([
      'survey',
      'excavation',
      'spoil_away',
      'base_pour',
      'walls',
      'electrical_first_fix',
      'delivery',
      'lift_plan',
      'lift',
      'fill',
      'electrical_connect',
      'commission',
      'handover',
    ]);
    expect(withCrane.stages.map((s) => s.sequence)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13]);
  });

  it('takes the excavation time from the quantities and the delivery notice from the maker', () => {
    const dig = withCrane.stages.find((s) => s.kind === 'excavation')!;
    expect(dig.durationMinutes).toBe(300);
    expect(withCrane.stages.find((s) => s.kind === 'delivery')!.leadTime).toEqual({
      workingDays: 20,
      countedFrom: 'order',
      reason: "the maker's lead time",
    });
    // The crane firm's notice leaves room for its site visit and lift plan, and holds the crane's booking only.
    expect(withCrane.stages.find((s) => s.kind === 'lift')!.leadTime).toEqual({
      workingDays: 10,
      countedFrom: 'now',
      resourceKind: 'crane',
    });
  });

  it('falls back to the template time without quantities', () => {
    const plan = planFromTemplate(IN_GROUND_TEMPLATE, { craneNeeded: true, excavationMinutes: null });
    expect(plan.stages.find((s) => s.kind === 'excavation')!.durationMinutes).toBe(720);
  });

  it('puts the cure rule on the base, the lift after the cure and the walls after an overnight set', () => {
    expect(withCrane.stages.find((s) => s.kind === 'base_pour')!.cure).toEqual({ targetFraction: 0.7 });
    expect(withCrane.links).toContainEqual({
      fromKind: 'base_pour',
      toKind: 'lift',
      type: 'FS',
      lagAmount: 0,
      lagUnit: 'working_hours',
      waitsForCure: true,
    });
    expect(withCrane.links).toContainEqual({
      fromKind: 'base_pour',
      toKind: 'walls',
      type: 'FS',
      lagAmount: 16,
      lagUnit: 'elapsed_hours',
      waitsForCure: false,
    });
    // The crane firm's lift plan is in hand a working day before the lift.
    expect(withCrane.links).toContainEqual({
      fromKind: 'lift_plan',
      toKind: 'lift',
      type: 'FS',
      lagAmount: 1,
      lagUnit: 'working_days',
      waitsForCure: false,
    });
    expect(withCrane.links.some((l) => l.fromKind === 'placement' || l.toKind === 'placement')).toBe(false);
  });

  it("books the haulier's skips or grab lorry once the dig is done, with the haulier's notice and the spoil cautions", () => {
    const away = withCrane.stages.find((s) => s.kind === 'spoil_away')!;
    expect(away.name).toBe('Spoil away (skips or grab lorry)');
    expect(away.requirements).toEqual([{ kind: 'spoil_removal', count: 1 }]);
    // Only the haulier's booking waits for its notice.
    expect(away.leadTime).toEqual({ workingDays: 2, countedFrom: 'now', resourceKind: 'spoil_removal' });
    expect(away.mayContinueNextDay).toBe(false);
    // After the dig, the same working day allowed; nothing else waits for it.
    expect(withCrane.links.filter((l) => l.fromKind === 'spoil_away' || l.toKind === 'spoil_away')).toEqual([
      {
        fromKind: 'excavation',
        toKind: 'spoil_away',
        type: 'FS',
        lagAmount: 0,
        lagUnit: 'working_hours',
        waitsForCure: false,
      },
    ]);
    const cautions = away.cautions.join(' ');
    expect(cautions).toMatch(/overload a skip/);
    expect(cautions).toMatch(/highway authority's permit/);
    expect(cautions).toMatch(/Loading a lorry/);
    expect(away.cautions.at(-1)).toBe(CAUTION_NOTE);
    // A semi-recessed pit is dug too; a slab or a deck has no spoil stage.
    expect(
      planFromTemplate(SEMI_RECESSED_TEMPLATE, { craneNeeded: false, excavationMinutes: null }).stages.map(
        (s) => s.kind,
      ),
    ).toContain('spoil_away');
    expect(
      planFromTemplate(SLAB_TEMPLATE, { craneNeeded: true, excavationMinutes: null }).stages.some(
        (s) => s.kind === 'spoil_away',
      ),
    ).toBe(false);
    expect(
      planFromTemplate(DECK_TEMPLATE, { craneNeeded: true, excavationMinutes: null }).stages.some(
        (s) => s.kind === 'spoil_away',
      ),
    ).toBe(false);
  });

  it("counts the skips or grab-lorry loads in the spoil stage's note, saying which limit decides", () => {
    // 7.188 m³ dug × 1.25 = 8.985 m³ loose × 1.8 t/m³ = 16.173 t: skips ⌈8.985 ÷ 4.587⌉ = 2 by volume but ⌈16.173 ÷ 6⌉ = 3 by weight;
    // grab lorry ⌈8.985 ÷ 10⌉ = 1 by volume but ⌈16.173 ÷ 16⌉ = 2 by weight.
    const dug = spoil({
      bankVolumeM3: 7.188,
      bulkingFactor: 1.25,
      densityTPerM3: 1.8,
      skipVolumeM3: 4.587,
      skipPayloadT: 6,
      grabLorryVolumeM3: 10,
      grabLorryPayloadT: 16,
    });
    expect(spoilAwayNote(dug)).toBe(
      '3 skips by weight or 2 grab-lorry loads by weight (8.985 m³ loose, 16.173 t of wet soil at 1.8 t/m³: common practice, no source).',
    );
    // Light dry sand (1.2 t/m³): 2.5 m³ loose, 3 t; a skip is full by volume first, and one skip is one skip.
    const sand = spoil({
      bankVolumeM3: 2,
      bulkingFactor: 1.25,
      densityTPerM3: 1.2,
      skipVolumeM3: 4.587,
      skipPayloadT: 6,
      grabLorryVolumeM3: 10,
      grabLorryPayloadT: 16,
    });
    expect(spoilAwayNote(sand)).toBe(
      '1 skip by volume or 1 grab-lorry load by volume (2.5 m³ loose, 3 t of wet soil at 1.2 t/m³: common practice, no source).',
    );
  });

  it('asks for the crane and the lifting cautions on the lift', () => {
    const lift = withCrane.stages.find((s) => s.kind === 'lift')!;
    expect(lift.requirements).toContainEqual({ kind: 'crane', count: 1 });
    expect(lift.cautions).toContain('Nobody stands or walks under a suspended load.');
    expect(lift.cautions.at(-1)).toBe(CAUTION_NOTE);
  });
});

describe('planning without a crane', () => {
  it('places the unit with pallet trucks instead', () => {
    const plan = planFromTemplate(SLAB_TEMPLATE, { craneNeeded: false, excavationMinutes: null });
    expect(plan.stages.map((s) => s.kind)).toEqual([
      'survey',
      'base_pour',
      'electrical_first_fix',
      'delivery',
      'placement',
      'fill',
      'electrical_connect',
      'commission',
      'handover',
    ]);
    const placement = plan.stages.find((s) => s.kind === 'placement')!;
    expect(placement.requirements).toEqual([
      { kind: 'install_crew', count: 1 },
      { kind: 'pallet_truck', count: 2 },
    ]);
    expect(plan.stages.some((s) => s.requirements.some((r) => r.kind === 'crane'))).toBe(false);
  });
});

describe('the default templates', () => {
  it('all hold together', () => {
    for (const t of Object.values(DEFAULT_TEMPLATES)) expect(templateProblems(t), t.installationType).toEqual([]);
  });

  it('are not changed by planning', () => {
    const before = structuredClone(IN_GROUND_TEMPLATE);
    const plan = planFromTemplate(IN_GROUND_TEMPLATE, { craneNeeded: true, excavationMinutes: 60 });
    plan.stages[0]!.requirements.push({ kind: 'lorry', count: 9 });
    expect(IN_GROUND_TEMPLATE).toEqual(before);
  });

  it('refuse a loop, a stage linked to itself and a link to nowhere', () => {
    const fs = { type: 'FS' as const, lagAmount: 0, lagUnit: 'working_hours' as const };
    expect(
      templateProblems({
        ...SLAB_TEMPLATE,
        links: [...SLAB_TEMPLATE.links, { from: 'handover', to: 'survey', ...fs }],
      }),
    ).toEqual(['links form a loop']);
    expect(templateProblems({ ...SLAB_TEMPLATE, links: [{ from: 'fill', to: 'fill', ...fs }] })).toEqual([
      'links[0]: a stage cannot depend on itself',
    ]);
    expect(templateProblems({ ...SLAB_TEMPLATE, links: [{ from: 'fill', to: 'sauna', ...fs }] })).toEqual([
      'links[0]: no stage sauna',
    ]);
  });

  it('refuse a link waiting for the cure of a stage with none, and notice for someone the stage does not need', () => {
    const fs = { type: 'FS' as const, lagAmount: 0, lagUnit: 'working_hours' as const };
    expect(
      templateProblems({ ...SLAB_TEMPLATE, links: [{ from: 'fill', to: 'commission', ...fs, waitsForCure: true }] }),
    ).toEqual(['links[0].waitsForCure: Fill has no cure to wait for']);
    const stages = SLAB_TEMPLATE.stages.map((s) =>
      s.kind === 'fill'
        ? { ...s, leadTime: { workingDays: 2, countedFrom: 'now' as const, resourceKind: 'crane' } }
        : s,
    );
    expect(templateProblems({ ...SLAB_TEMPLATE, stages })).toEqual([
      `stages[${stages.findIndex((s) => s.kind === 'fill')}].leadTime.resourceKind: Fill needs no crane`,
    ]);
  });
});

describe('cautions', () => {
  it('name the dangers of each kind of work and always end with the note', () => {
    expect(cautionsFor('excavation').join(' ')).toMatch(/collapse/);
    expect(cautionsFor('excavation').join(' ')).toMatch(/buried services/);
    expect(cautionsFor('electrical_connect').join(' ')).toMatch(/RCD/);
    expect(cautionsFor('handover').join(' ')).toMatch(/[Ss]anitiser/);
    expect(cautionsFor('placement').join(' ')).toMatch(/[Ff]ingers/);
    expect(cautionsFor('something_new')).toEqual([CAUTION_NOTE]);
    expect(CAUTION_NOTE).toBe('Follow local codes and licensed practice.');
  });
});

describe('whether a stage may run over into the next working day', () => {
  it('is carried from the template to the plan: digging and block laying may, a pour, a lift or a visit may not', () => {
    const plan = planFromTemplate(IN_GROUND_TEMPLATE, { craneNeeded: true, excavationMinutes: 300 });
    const may = Object.fromEntries(plan.stages.map((s) => [s.kind, s.mayContinueNextDay]));
    expect(may).toEqual({
      survey: false,
      excavation: true,
      spoil_away: false,
      base_pour: false,
      walls: true,
      electrical_first_fix: false,
      delivery: false,
      lift_plan: false,
      lift: false,
      fill: false,
      electrical_connect: false,
      commission: false,
      handover: false,
    });
  });

  it("is a yes or no in a firm's edited template, and may be left out (no)", () => {
    const stage = { kind: 'fill', name: 'Fill', duration: { kind: 'fixed', minutes: 180 }, requirements: [] };
    expect(StageTemplateSchema.parse({ ...stage, mayContinueNextDay: true }).mayContinueNextDay).toBe(true);
    expect(StageTemplateSchema.safeParse({ ...stage, mayContinueNextDay: 'yes' }).success).toBe(false);
    const planned = planFromTemplate(
      { ...SLAB_TEMPLATE, stages: [StageTemplateSchema.parse(stage)], links: [] },
      { craneNeeded: false, excavationMinutes: null },
    );
    expect(planned.stages[0]?.mayContinueNextDay).toBe(false);
  });
});
