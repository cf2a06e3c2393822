import { describe, expect, it } from 'vitest';
import { useFieldErrors } from '@/composables/useFieldErrors';
import { ApiError } from '@/api/client';
import { PutServicePlan } from '@shared/schemas/handover';
import { PutFirmSettings } from '@shared/schemas/firm-settings';

describe("a form's problems by field", () => {
  it("keeps the schema's first problem of each field by its dotted path, and gives the data back when valid", () => {
    const fields = useFieldErrors();
    const body = { waterTargets: { ph: { min: 8.2, max: 7, source: '' } }, waterTargetsWas: {} };
    expect(fields.check(PutFirmSettings.safeParse(body))).toBeNull();
    expect(fields.errors.value).toEqual({
      'waterTargets.ph.source': 'must say where the figures come from, e.g. the unit maker’s manual',
      'waterTargets.ph.max': 'must not be below the lowest value',
    });
    expect(fields.sentence('waterTargets.ph.max', 'The highest pH')).toBe(
      'The highest pH must not be below the lowest value',
    );
    expect(fields.describe('waterTargets.ph.max', 'water-ph-max')).toEqual({
      'aria-invalid': 'true',
      'aria-describedby': 'water-ph-max-problem',
    });
    expect(fields.describe('waterTargets.ph.min', 'water-ph-min')).toEqual({});

    const plan = { version: 0, firstAfterMonths: 3, everyMonths: 12, visitsAhead: 2 };
    expect(fields.check(PutServicePlan.safeParse(plan))).toEqual(plan);
    expect(fields.errors.value).toEqual({});
  });

  it("keeps the server's field problems, without the member the form's fields sit in, and nothing for other failures", () => {
    const fields = useFieldErrors();
    const refused = new ApiError({
      status: 400,
      title: 'Some of the survey is not right',
      errors: [
        { field: 'survey.steps', message: 'must be a whole number' },
        { field: 'version', message: 'is required' },
      ],
    });
    fields.take(refused, 'survey');
    expect(fields.errors.value).toEqual({ steps: 'must be a whole number', version: 'is required' });
    expect(fields.status('steps')).toBe('error');
    fields.take(new Error('offline'));
    expect(fields.errors.value).toEqual({});
    expect(fields.status('steps')).toBeUndefined();
  });
});
