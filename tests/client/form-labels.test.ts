import { describe, expect, it, vi } from 'vitest';
import { reactive, ref } from 'vue';
import SurveyView from '@/views/SurveyView.vue';
import JobFormView from '@/views/JobFormView.vue';
import CrewDaySheet from '@/components/day-sheet/CrewDaySheet.vue';
import { INSTALLATION_TYPE_LABELS as PAGE_LABELS } from '@/utils/labels';
import { INSTALLATION_TYPE_LABELS } from '@shared/installation-types';
import { controlsOf, renderHtml, unlabelled } from './render';

// The forms' data without the network: what each form shows once loaded.
vi.mock('@/composables/useSurveyForm', () => ({
  useSurveyForm: () => ({
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
}));
vi.mock('@/composables/useJobForm', () => ({
  useJobForm: () => ({
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
}));

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
