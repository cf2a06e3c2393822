import { describe, expect, it } from 'vitest';
import { QuantitySettingsPatch } from '../../../shared/schemas/firm-settings.ts';
import { PutTemplate } from '../../../shared/schemas/templates.ts';
import { CreateJob } from '../../../shared/schemas/jobs.ts';

/** Each field's message, by its path, from one parse. */
function said(result: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) {
  return Object.fromEntries((result.error?.issues ?? []).map((i) => [i.path.join('.'), i.message]));
}

describe("the API's field messages where a schema gives none of its own", () => {
  it('say what is wrong in words that follow the field\'s name, not zod\'s "Too big: expected number to be <=1000"', () => {
    expect(
      said(QuantitySettingsPatch.safeParse({ perimeterGapMm: 5000, baseThicknessMm: 20, subBaseMm: 'deep' })),
    ).toEqual({
      perimeterGapMm: 'must be at most 1,000',
      baseThicknessMm: 'must be at least 50',
      subBaseMm: 'must be a number',
    });
    expect(said(QuantitySettingsPatch.safeParse({ subBaseDensityTPerM3: 0 }))).toEqual({
      subBaseDensityTPerM3: 'must be more than 0',
    });
  });

  it('call a missing field required, and a fraction where a whole number is wanted what it is', () => {
    expect(said(PutTemplate.safeParse({ name: 'In-ground', stages: [], links: [] }))).toEqual({
      version: 'is required',
      stages: 'needs at least one stage',
    });
    expect(said(PutTemplate.safeParse({ version: 1.5, name: 'In-ground', stages: [], links: [] })).version).toBe(
      'must be a whole number',
    );
  });

  it("leave a schema's own words alone", () => {
    expect(said(CreateJob.safeParse({ reference: 'TW-1', customerName: '' })).customerName).toBe('is required');
    expect(said(CreateJob.safeParse({ reference: 'TW-1', sitePostcode: 'nowhere' })).sitePostcode).toBe(
      'must be a UK postcode such as LS6 2AB',
    );
  });
});
