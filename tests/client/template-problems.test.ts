import { describe, expect, it } from 'vitest';
import { PutTemplate } from '@shared/schemas/templates';
import { IN_GROUND_TEMPLATE } from '@shared/templates';
import { templateProblems } from '@/components/templates/template-problems';

describe("a stage template's problems, in the owner's words", () => {
  it("names the stage or gap and says what is wrong, from the API schema's own messages", () => {
    const draft = structuredClone(IN_GROUND_TEMPLATE);
    const survey = draft.stages[0]!;
    survey.name = '';
    const dig = draft.stages.find((s) => s.duration.kind === 'excavation')!;
    if (dig.duration.kind === 'excavation') dig.duration.fallbackMinutes = 5;
    const withNotice = draft.stages.find((s) => s.leadTime)!;
    withNotice.leadTime!.workingDays = 9999;
    draft.links[0]!.lagAmount = -1;
    const lift = draft.stages.find((s) => s.requirements.some((r) => r.kind === 'crane'))!;
    lift.requirements.find((r) => r.kind === 'crane')!.count = 0;
    const checked = PutTemplate.safeParse({ version: 0, name: draft.name, stages: draft.stages, links: draft.links });
    expect(checked.success).toBe(false);
    const said = templateProblems(
      draft,
      checked.error!.issues.map((i) => ({ field: i.path.join('.'), message: i.message })),
    );
    expect(said).toEqual([
      'Stage 1: the name is required',
      'Excavate pit: the minutes of work must be at least 15 minutes',
      'Spoil away (skips or grab lorry): the notice must be at most 250 working days',
      'Crane lift into pit: the crane count must be at least 1',
      // The first gap is the dig's after the survey, whose name was emptied above.
      'Excavate pit after Stage 1: the gap cannot be negative',
    ]);
    // Nothing of the schema's own path or wording is left for the owner to decode.
    expect(said.join(' ')).not.toMatch(/stages\.|links\.|Too (small|big)|expected/);
  });
});
