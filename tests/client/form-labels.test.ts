import { describe, expect, it, vi } from 'vitest';
import { reactive, ref, type Component } from 'vue';
import SurveyView from '@/views/SurveyView.vue';
import JobFormView from '@/views/JobFormView.vue';
import CrewDaySheet from '@/components/day-sheet/CrewDaySheet.vue';
import { INSTALLATION_TYPE_LABELS as PAGE_LABELS } from '@/utils/labels';
import { INSTALLATION_TYPE_LABELS } from '@shared/installation-types';
import { controlsOf, renderHtml, unlabelled } from './render';
import * as surveyForm from '@/composables/useSurveyForm';
import * as jobForm from '@/composables/useJobForm';
import type { FieldErrors } from '@/composables/useFieldErrors';
import { SurveyFields } from '@shared/schemas/surveys';
import { CreateJob } from '@shared/schemas/jobs';

// The forms' data without the network: what each form shows once loaded.
vi.mock('@/composables/useSurveyForm', async () => {
  const { useFieldErrors } = await import('@/composables/useFieldErrors');
  // One set of field problems for the module, so a test can give the form some (see below).
  const fields = useFieldErrors();
  return {
    surveyFields: fields,
    useSurveyForm: () => ({
      fields,
      draft: reactive({
        accessWidthMm: 900,
        accessHeightMm: null,
        steps: 1,
        gates: 1,
        overheadObstructions: true,
        overheadNotes: 'Phone line at 5 m',
        groundType: 'clay',
        buriedServicesNotes: null,
        craneStandingPosition: null,
        craneDistanceToSetDownM: 8,
        consumerUnitDistanceM: 12,
        consumerUnitLocation: 'Garage, left of the door',
        mainFuseAmps: 80,
        drainage: null,
        craneRequired: null,
        excavatorSize: null,
        evChargerAmps: 32,
        electricShowerAmps: null,
        heatPumpAmps: null,
        otherLargeLoadAmps: 16,
        otherLargeLoadNotes: 'Sauna',
        earthingArrangement: null,
        hoseFlowLitresPerMinute: null,
        notes: null,
      }),
      version: ref(1),
      errors: ref({}),
      loading: ref(false),
      saving: ref(false),
      loadError: ref(null),
      load: vi.fn(),
      check: vi.fn(),
      save: vi.fn(),
    }),
  };
});
vi.mock('@/composables/useJobForm', async () => {
  const { useFieldErrors } = await import('@/composables/useFieldErrors');
  const fields = useFieldErrors();
  return {
    jobFields: fields,
    useJobForm: () => ({
      fields,
      draft: reactive({
        reference: 'TW-2425',
        customerName: '',
        customerPhone: '',
        customerEmail: '',
        siteAddress: '',
        siteTown: '',
        sitePostcode: '',
        accessNotes: '',
        unitId: '',
        installationType: null,
        promisedFrom: '',
        promisedTo: '',
        orderedOn: '',
      }),
      errors: ref({}),
      units: ref([{ id: '3', model: 'Brook 4', maker: 'Harbourline Works' }]),
      loaded: ref(null),
      saving: ref(false),
      suggestedReference: ref('TW-2425'),
      load: vi.fn(),
      save: vi.fn(),
    }),
  };
});

describe('the site survey on a phone', () => {
  it('gives every control a label a screen reader finds', async () => {
    const html = await renderHtml(SurveyView, {}, { path: '/jobs/12/survey' });
    expect(controlsOf(html).length).toBeGreaterThanOrEqual(22);
    expect(unlabelled(html)).toEqual([]);
    expect(controlsOf(html).find((c) => c.attrs.id === 'survey-consumerUnitLocation')!.attrs.value).toBe(
      'Garage, left of the door',
    );
    expect(html).toContain('Where the consumer unit is');
  });

  it('brings up the number pad for numbers: whole numbers numeric, metres decimal', async () => {
    const html = await renderHtml(SurveyView, {}, { path: '/jobs/12/survey' });
    const modes = Object.fromEntries(
      controlsOf(html)
        .filter((c) => c.attrs.inputmode)
        .map((c) => [c.attrs.id, c.attrs.inputmode]),
    );
    expect(modes).toEqual({
      'survey-accessWidthMm': 'numeric',
      'survey-accessHeightMm': 'numeric',
      'survey-steps': 'numeric',
      'survey-gates': 'numeric',
      'survey-craneDistanceToSetDownM': 'decimal',
      'survey-mainFuseAmps': 'numeric',
      'survey-consumerUnitDistanceM': 'decimal',
      'survey-evChargerAmps': 'numeric',
      'survey-electricShowerAmps': 'numeric',
      'survey-heatPumpAmps': 'numeric',
      'survey-otherLargeLoadAmps': 'numeric',
      'survey-hoseFlowLitresPerMinute': 'decimal',
    });
  });

  it('shows no stock "Please Input" placeholder', async () => {
    const html = await renderHtml(SurveyView, {}, { path: '/jobs/12/survey' });
    expect(html).not.toMatch(/Please (Input|Select)/);
  });
});

describe('the job form', () => {
  it('gives every control a label a screen reader finds, and offers the next reference', async () => {
    const html = await renderHtml(JobFormView, {}, { path: '/jobs/new' });
    expect(controlsOf(html).length).toBeGreaterThanOrEqual(12);
    expect(unlabelled(html)).toEqual([]);
    expect(html).not.toMatch(/Please (Input|Select)/);
    expect(controlsOf(html).find((c) => c.attrs.id === 'job-reference')!.attrs.value).toBe('TW-2425');
    expect(html).toContain('The next free reference is TW-2425');
  });
});

describe('installation types', () => {
  it('read the same on every page: one shared map', async () => {
    expect(PAGE_LABELS).toBe(INSTALLATION_TYPE_LABELS);
    const form = await renderHtml(JobFormView, {}, { path: '/jobs/new' });
    expect(form).toContain('>In-ground</option>');
    const sheet = await renderHtml(CrewDaySheet, {
      timeZone: 'Europe/London',
      dateLabel: 'Monday 1 June',
      sheet: {
        date: '2026-06-01',
        resource: { id: '7', name: 'Crew Heron', kind: 'install_crew', category: 'crew', firmName: 'Tideway Hot Tubs' },
        visits: [
          {
            bookingId: '1',
            startsAt: '2026-06-01T07:00:00Z',
            endsAt: '2026-06-01T09:00:00Z',
            state: 'confirmed',
            stage: { id: '2', kind: 'survey', name: 'Site survey' },
            job: { id: '3', reference: 'TW-2407', unitName: 'Solway 7', installationType: 'in_ground' },
            site: { address: 'The Old Barn', town: 'Bramhope', postcode: 'LS16 9AS', accessNotes: null },
            contacts: [],
            alongside: [],
            cautions: [],
          },
        ],
      },
    });
    expect(sheet).toContain('Unit: Solway 7 (In-ground)');
  });
});

/**
 * Every field the shared schema can refuse, each with a problem: its box must be marked invalid and
 * point at a sentence that says it (the way a screen reader finds it), whichever field it is.
 */
async function problemsOf(component: Component, path: string, fields: FieldErrors, keys: string[], prefix: string) {
  fields.errors.value = Object.fromEntries(keys.map((k) => [k, 'must be looked at again']));
  const html = await renderHtml(component, {}, { path });
  fields.clear();
  const controls = controlsOf(html);
  return keys.filter((k) => {
    const box = controls.find((c) => c.attrs.id === `${prefix}${k}`);
    const said = new RegExp(`id="${prefix}${k}-problem"[^>]*>[^<]*must be looked at again<`);
    return !(
      box &&
      box.attrs['aria-invalid'] === 'true' &&
      box.attrs['aria-describedby'] === `${prefix}${k}-problem` &&
      said.test(html)
    );
  });
}

describe('a problem under its box', () => {
  it('the survey: every field of the schema has a box that points at its problem', async () => {
    const { surveyFields } = surveyForm as unknown as { surveyFields: FieldErrors };
    // The checkbox is true or false: nothing the schema could refuse. When it was surveyed is the server's.
    const keys = Object.keys(SurveyFields.shape).filter((k) => k !== 'overheadObstructions' && k !== 'surveyedAt');
    expect(keys.length).toBeGreaterThanOrEqual(25);
    expect(await problemsOf(SurveyView, '/jobs/12/survey', surveyFields, keys, 'survey-')).toEqual([]);
  });

  it('the job form: every field of the schema has a box that points at its problem', async () => {
    const { jobFields } = jobForm as unknown as { jobFields: FieldErrors };
    const keys = Object.keys(CreateJob.shape);
    expect(keys).toContain('promisedTo');
    expect(await problemsOf(JobFormView, '/jobs/new', jobFields, keys, 'job-')).toEqual([]);
  });
});
