import { describe, expect, it } from 'vitest';
import { ApiError } from '@/api/client';
import { fieldProblemText, fieldSentence, problemSummary } from '@/utils/problem';
import { CreateJob } from '@shared/schemas/jobs';
import { signInErrorText } from '@/utils/sign-in';
import { humanise } from '@/utils/labels';

describe('problemSummary', () => {
  it('uses what the server said', () => {
    const error = new ApiError({
      status: 422,
      title: 'Some details need correcting',
      errors: [{ field: 'siteTown', message: 'Required' }],
    });
    expect(problemSummary(error)).toEqual({
      title: 'Some details need correcting',
      detail: undefined,
      fields: [{ field: 'siteTown', message: 'Required' }],
    });
  });
  it('says something useful about an unexpected failure', () => {
    expect(problemSummary(new Error('boom')).title).toBe('Something went wrong');
  });
  it('writes a field problem as one line', () => {
    expect(fieldProblemText({ field: 'siteTown', message: 'is required' })).toBe('Site town is required');
    expect(fieldProblemText({ field: 'quantities.perimeterGapMm', message: 'must be at most 1,000' })).toBe(
      'Perimeter gap (mm) must be at most 1,000',
    );
    // A unit at the end of a field's code is said as a form says it, in brackets.
    expect(fieldProblemText({ field: 'dayRatePence', message: 'must be a whole number' })).toBe(
      'Day rate (pence) must be a whole number',
    );
    expect(fieldProblemText({ field: 'quantities.subBaseDensityTPerM3', message: 'must be at most 3' })).toBe(
      'Sub base density (t/m³) must be at most 3',
    );
    expect(fieldProblemText({ field: 'cureDatumC', message: 'must be between −15 and 15 °C' })).toBe(
      'Cure datum (°C) must be between −15 and 15 °C',
    );
    expect(fieldProblemText({ field: 'craneDistanceToSetDownM', message: 'must be at most 60' })).toBe(
      'Crane distance to set down (m) must be at most 60',
    );
    expect(fieldProblemText({ field: 'moveMinutes', message: 'must be at least 0' })).toBe(
      'Move (minutes) must be at least 0',
    );
    // Words that merely end in a capital are left alone, as is a code that is all unit.
    expect(fieldProblemText({ field: 'horizonDays', message: 'must be at most 365' })).toBe(
      'Horizon (days) must be at most 365',
    );
    expect(fieldProblemText({ field: 'stageId', message: 'is required' })).toBe('Stage id is required');
    expect(fieldProblemText({ field: 'Mm', message: 'is required' })).toBe('Mm is required');
    expect(fieldProblemText({ field: 'stages.0', message: 'pick a stage' })).toBe('Pick a stage');
    expect(fieldProblemText({ field: '', message: 'Nothing to save' })).toBe('Nothing to save');
    expect(fieldProblemText({ field: '(body)', message: 'names nothing to change: send at least one field' })).toBe(
      'Names nothing to change: send at least one field',
    );
  });
});

describe('signInErrorText', () => {
  it('explains an account with no access in the agreed words', () => {
    expect(signInErrorText('unknown_account')?.detail).toBe(
      'This Google account has no access to Waterline yet. Ask an owner of your firm to invite you.',
    );
  });
  it('still explains a code it has never seen', () => {
    expect(signInErrorText('access_denied')?.title).toBe('Signing in did not work');
  });
  it('shows nothing without an error', () => {
    expect(signInErrorText(undefined)).toBeNull();
    expect(signInErrorText('')).toBeNull();
  });
});

describe('humanise', () => {
  it('turns codes into words', () => {
    expect(humanise('plant_hire')).toBe('Plant hire');
    expect(humanise('crane')).toBe('Crane');
  });
});

describe('fieldSentence', () => {
  it("reads the job schema's own messages for an empty new job as sentences under their boxes", () => {
    const result = CreateJob.safeParse({
      reference: 'TW-2425',
      customerName: '',
      siteAddress: '',
      siteTown: '',
      sitePostcode: '',
      installationType: '',
    });
    expect(result.success).toBe(false);
    const said = Object.fromEntries(result.error!.issues.map((i) => [i.path.join('.'), i.message]));
    expect(fieldSentence('Customer', said.customerName)).toBe('Customer is required');
    expect(fieldSentence('Postcode', said.sitePostcode)).toBe('Postcode must be a UK postcode such as LS6 2AB');
    expect(fieldSentence('The installation', said.installationType)).toBe('Pick an installation type');
    expect(fieldSentence('Customer', undefined)).toBeUndefined();
    // The API's plain words for a list too long (shared/schemas/messages.ts) follow the name too.
    expect(fieldSentence('Requirements', 'can have at most 10')).toBe('Requirements can have at most 10');
  });
});
