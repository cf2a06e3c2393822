import { describe, expect, it } from 'vitest';
import { ApiError } from '@/api/client';
import { fieldProblemText, problemSummary } from '@/utils/problem';
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
    expect(fieldProblemText({ field: 'siteTown', message: 'Required' })).toBe('siteTown: Required');
    expect(fieldProblemText({ field: '', message: 'Nothing to save' })).toBe('Nothing to save');
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
