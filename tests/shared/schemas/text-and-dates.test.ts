import { describe, expect, it } from 'vitest';
import type { z } from 'zod';
import {
  EmailAddress,
  IsoDate,
  IsoInstant,
  WorkDate,
  WorkInstant,
  multiLineText,
  oneLineText,
  textProblem,
} from '../../../shared/schemas/common.ts';
import { CreateJob, JobQuery } from '../../../shared/schemas/jobs.ts';
import { SurveyFields } from '../../../shared/schemas/surveys.ts';
import { PutTemplate } from '../../../shared/schemas/templates.ts';
import { CreateInvitation } from '../../../shared/schemas/answers.ts';
import { DaySheetQuery } from '../../../shared/schemas/day-sheets.ts';
import { PutFirmSettings } from '../../../shared/schemas/firm-settings.ts';

/** The messages a schema gives for a value, as a form would show them. */
function messages(schema: z.ZodType, value: unknown): string[] {
  const result = schema.safeParse(value);
  return result.success ? [] : result.error.issues.map((i) => i.message);
}
/** Field path → message, as the server's problem+json lists them. */
function fieldErrors(schema: z.ZodType, value: unknown): Record<string, string> {
  const result = schema.safeParse(value);
  return result.success ? {} : Object.fromEntries(result.error.issues.map((i) => [i.path.join('.'), i.message]));
}

const LINE = 'must be a single line (no line breaks)';
const HIDDEN = 'must not contain tabs or hidden control characters';
const BROKEN = 'contains a broken character; type it again';

describe('one-line text', () => {
  const town = oneLineText(20).min(1, 'is required');

  it('takes ordinary names, accents, right-to-left scripts and emoji, trimmed', () => {
    expect(town.parse('  Bramhope ')).toBe('Bramhope');
    expect(town.parse('Sainte-Anne-des-Plaines'.slice(0, 20))).toBe('Sainte-Anne-des-Plai');
    expect(town.parse('Zoë Ó Briain')).toBe('Zoë Ó Briain');
    expect(town.parse('דניאל')).toBe('דניאל'); // Hebrew letters: direction comes from the letters, no override needed
    expect(town.parse('Hot tub 🛁')).toBe('Hot tub 🛁'); // a surrogate pair, not a lone surrogate
  });

  it('refuses line breaks (CR, LF, CRLF, U+2028) inside the text', () => {
    for (const v of ['Otley\nRoad', 'Otley\rRoad', 'Otley\r\nRoad', 'Otley\u2028Road'])
      expect(messages(town, v)).toEqual([LINE]);
  });

  it('refuses NUL, TAB, DEL, C1 controls and the bidi overrides and isolates', () => {
    for (const v of ['Leeds\u0000', 'Lee\tds', 'Leeds\u007f', 'Leeds\u0085', 'Leeds\u009b'])
      expect(messages(town, v)).toEqual([HIDDEN]);
    for (const cp of [0x202a, 0x202b, 0x202c, 0x202d, 0x202e, 0x2066, 0x2067, 0x2068, 0x2069]) {
      expect(messages(town, `pit${String.fromCharCode(cp)}gpj.exe`), cp.toString(16)).toEqual([HIDDEN]);
    }
  });

  it('refuses lone surrogates, high or low', () => {
    expect(messages(town, 'Leeds\uD800')).toEqual([BROKEN]);
    expect(messages(town, '\uDC00Leeds')).toEqual([BROKEN]);
  });

  it('gives one message a field, the character problem before the length', () => {
    expect(messages(town, `${'x'.repeat(30)}\u0000`)).toEqual([HIDDEN]);
    expect(messages(town, 'x'.repeat(21))).toEqual(['must be at most 20 characters']);
    expect(messages(town, '   ')).toEqual(['is required']);
  });
});

describe('multi-line text (notes)', () => {
  const notes = multiLineText(50);

  it('keeps LF and turns CRLF into LF', () => {
    expect(notes.parse('Gate is narrow.\nPark on the lane.')).toBe('Gate is narrow.\nPark on the lane.');
    expect(notes.parse('Gate is narrow.\r\nPark on the lane.')).toBe('Gate is narrow.\nPark on the lane.');
  });

  it('refuses a bare CR, NUL, TAB, bidi overrides and lone surrogates', () => {
    expect(messages(notes, 'Gate\rlane')).toEqual([HIDDEN]);
    expect(messages(notes, 'Gate\u0000lane')).toEqual([HIDDEN]);
    expect(messages(notes, 'Gate\tlane')).toEqual([HIDDEN]);
    expect(messages(notes, 'Gate\u202Elane')).toEqual([HIDDEN]);
    expect(messages(notes, 'Gate\uDBFF')).toEqual([BROKEN]);
  });

  it('is the same rule as textProblem, which file names use', () => {
    expect(textProblem('a\nb', 'multi-line')).toBeNull();
    expect(textProblem('a\nb', 'one-line')).toBe(LINE);
    expect(textProblem('a\u2069b', 'one-line')).toBe(HIDDEN);
  });
});

describe('e-mail addresses', () => {
  it('refuse a second line (a header smuggled into the address)', () => {
    expect(messages(EmailAddress, 'office@tideway.test\r\nBcc: all@elsewhere.test')).toEqual([LINE]);
    expect(EmailAddress.parse(' office@tideway.test ')).toBe('office@tideway.test');
    expect(messages(EmailAddress, 'not an address')).toEqual(['must be an e-mail address']);
  });
});

describe('dates and instants', () => {
  it('refuse year 0000 and impossible days, naming the rule', () => {
    expect(messages(IsoDate, '0000-01-01')).toEqual(['must be a date between 1900 and 2200']);
    expect(messages(IsoDate, '2026-02-29')).toEqual(['must be a date like 2026-05-12']); // 2026 is not a leap year
    expect(messages(IsoDate, '2026-04-31')).toEqual(['must be a date like 2026-05-12']);
    expect(IsoDate.parse('2028-02-29')).toBe('2028-02-29');
    expect(messages(IsoInstant, '0000-01-01T00:00:00Z')).toEqual(['must be a time between 1900 and 2200']);
    expect(messages(IsoInstant, '2026-02-30T08:00:00Z')).toEqual([
      'must be an ISO 8601 date-time with an offset, e.g. 2026-05-12T08:00:00Z',
    ]);
  });

  it('hold instants to 1900–2200 by the instant itself, offset applied', () => {
    expect(IsoInstant.parse('1900-01-01T00:00:00Z')).toBe('1900-01-01T00:00:00Z');
    expect(messages(IsoInstant, '1900-01-01T00:30:00+01:00')).toEqual(['must be a time between 1900 and 2200']); // 1899-12-31T23:30Z
    expect(IsoInstant.parse('2200-12-31T23:59:59Z')).toBe('2200-12-31T23:59:59Z');
    expect(messages(IsoInstant, '2201-01-01T00:00:00Z')).toEqual(['must be a time between 1900 and 2200']);
  });

  it('hold working dates to 2000–2100', () => {
    expect(messages(WorkDate, '9999-12-31')).toEqual(['must be a date between 2000 and 2100']);
    expect(messages(WorkDate, '1999-12-31')).toEqual(['must be a date between 2000 and 2100']);
    expect(WorkDate.parse('2100-12-31')).toBe('2100-12-31');
    expect(messages(WorkInstant, '2101-01-01T00:00:00Z')).toEqual(['must be a time between 2000 and 2100']);
  });
});

describe('the schemas people fill in', () => {
  const job = {
    reference: 'TW-3001',
    customerName: 'Ines Calloway',
    siteAddress: '4 Heron Row',
    siteTown: 'Otley',
    sitePostcode: 'LS21 3AB',
    installationType: 'slab',
  };

  it('jobs: one-line fields, notes, the search box and the promised dates', () => {
    expect(
      fieldErrors(CreateJob, {
        ...job,
        reference: 'TW-3001\r\n',
        customerName: 'Ines\u202ECalloway',
        siteTown: 'Ot\nley',
        customerPhone: '0113\t496',
        sitePostcode: 'LS21\u00003AB',
      }),
    ).toEqual({ customerName: HIDDEN, siteTown: LINE, customerPhone: HIDDEN, sitePostcode: HIDDEN });
    // A trailing line break is trimmed off, like a trailing space: nothing of it is kept.
    expect(CreateJob.parse({ ...job, reference: 'TW-3001\r\n' }).reference).toBe('TW-3001');
    expect(CreateJob.parse({ ...job, accessNotes: 'Side gate.\r\nDog in garden.' }).accessNotes).toBe(
      'Side gate.\nDog in garden.',
    );
    expect(fieldErrors(CreateJob, { ...job, accessNotes: 'Side gate\u0000' })).toEqual({ accessNotes: HIDDEN });
    expect(fieldErrors(CreateJob, { ...job, promisedFrom: '0000-01-01' })).toEqual({
      promisedFrom: 'must be a date between 2000 and 2100',
    });
    expect(fieldErrors(JobQuery, { search: '\u0000' })).toEqual({ search: HIDDEN });
    expect(fieldErrors(JobQuery, { search: 'Otley\uD800' })).toEqual({ search: BROKEN });
  });

  it('surveys: one-line places, multi-line notes', () => {
    const survey = { accessWidthMm: 900, groundType: 'clay' };
    expect(SurveyFields.parse({ ...survey, notes: 'Level lawn.\nSoft ground by the shed.' }).notes).toBe(
      'Level lawn.\nSoft ground by the shed.',
    );
    expect(
      fieldErrors(SurveyFields, {
        ...survey,
        craneStandingPosition: 'Lay-by\nopposite',
        drainage: 'Soakaway\u202E',
        buriedServicesNotes: 'Gas\u0000',
      }),
    ).toEqual({ craneStandingPosition: LINE, drainage: HIDDEN, buriedServicesNotes: HIDDEN });
  });

  it('templates, invitations, day sheets and firm settings', () => {
    const stage = { kind: 'dig', name: 'Dig\nthe pit', duration: { kind: 'fixed', minutes: 60 }, requirements: [] };
    expect(fieldErrors(PutTemplate, { version: 0, name: 'Slab\u2066', stages: [stage], links: [] })).toEqual({
      name: HIDDEN,
      'stages.0.name': LINE,
    });
    expect(fieldErrors(CreateInvitation, { email: 'crew@tideway.test\nBcc: x@y.test', role: 'crew' })).toEqual({
      email: LINE,
    });
    expect(fieldErrors(DaySheetQuery, { date: '9999-12-31' })).toEqual({
      date: 'must be a date between 2000 and 2100',
    });
    expect(PutFirmSettings.parse({ keepPhotoLocation: true })).toEqual({ keepPhotoLocation: true });
    expect(fieldErrors(PutFirmSettings, { quantities: {} })).toEqual({
      version: 'is required when changing the quantities',
    });
    expect(fieldErrors(PutFirmSettings, { keepPhotoLocation: 'yes' })).toEqual({
      keepPhotoLocation: 'must be true or false',
    });
  });
});
