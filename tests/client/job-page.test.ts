import { afterEach, describe, expect, it, vi } from 'vitest';
import { effectScope, ref } from 'vue';
import { jobSteps, predecessorText } from '@/components/job-detail/job-steps';
import { useJobDetail } from '@/composables/useJobDetail';
import JobProgress from '@/components/job-detail/JobProgress.vue';
import type { JobStage, StageBooking } from '@/api/job-work';
import { may } from '@shared/permissions';
import { stubFetch } from './fake-fetch';
import { renderHtml } from './render';

afterEach(() => {
  vi.unstubAllGlobals();
});
const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

const booking = (state: string): StageBooking => ({
  id: '1',
  resourceId: '7',
  resourceName: 'Crew Heron',
  resourceKind: 'install_crew',
  startsAt: '2026-06-01T07:00:00Z',
  endsAt: '2026-06-01T09:00:00Z',
  state,
});
const stage = (
  id: string,
  name: string,
  kind: string,
  bookings: StageBooking[] = [],
  after: JobStage['after'] = [],
): JobStage => ({
  id,
  name,
  kind,
  sequence: Number(id),
  durationMinutes: 120,
  requirements: [],
  cure: null,
  notes: null,
  cautions: [],
  after,
  bookings,
});

describe('the step bar', () => {
  it('does not tick "Surveyed" for a planned job with no saved survey', () => {
    const steps = jobSteps({ status: 'planned', surveyedAt: null }, [
      stage('1', 'Site survey', 'survey', [booking('confirmed')]),
    ]);
    expect(steps.map((s) => [s.key, s.done, s.current])).toEqual([
      ['enquiry', true, false],
      ['surveyed', false, true],
      ['planned', true, false],
      ['in_progress', false, false],
      ['handed_over', false, false],
    ]);
  });

  it('ticks each step from what is recorded: a saved survey, stages, work on site, the handover done', () => {
    const stages = [
      stage('1', 'Excavate pit', 'excavation', [booking('done')]),
      stage('2', 'Handover', 'handover', [booking('done')]),
    ];
    expect(jobSteps({ status: 'in_progress', surveyedAt: '2026-05-20T09:00:00Z' }, stages).every((s) => s.done)).toBe(
      true,
    );
  });

  it('shows a tick only on the steps done', async () => {
    const html = await renderHtml(JobProgress, {
      status: 'planned',
      steps: jobSteps({ status: 'planned', surveyedAt: null }, [stage('1', 'Site survey', 'survey')]),
    });
    expect(html).toContain(
      '<li class="step--current step" aria-current="step"><span class="step__mark" aria-hidden="true">●</span><span class="step__label">Surveyed</span><span class="step__detail">No survey saved yet</span></li>',
    );
    expect(html).toContain(
      '<li class="step--done step"><span class="step__mark" aria-hidden="true">✓</span><span class="step__label">Planned</span><span class="step__detail">1 stage</span></li>',
    );
  });
});

describe('the stage list', () => {
  it('names what a stage waits for as those stages are named on the job', () => {
    const stages = [
      stage('4', 'Supply cable first fix', 'electrical_first_fix'),
      stage('6', 'Block retaining walls', 'walls'),
    ];
    const after: JobStage['after'] = [
      {
        stageId: '4',
        kind: 'electrical_first_fix',
        name: 'Supply cable first fix',
        type: 'FS',
        lagAmount: 0,
        lagUnit: 'working_hours',
      },
      { stageId: '6', kind: 'walls', name: 'Block retaining walls', type: 'FS', lagAmount: 1, lagUnit: 'elapsed_days' },
    ];
    expect(predecessorText(after, stages)).toBe('Supply cable first fix, Block retaining walls + 1 elapsed days');
  });
});

describe("the job page's reads", () => {
  const paths = async (can: (p: Parameters<typeof may>[1]) => boolean) => {
    const sent = stubFetch(() => ({ status: 200, body: { items: [] } }));
    const scope = effectScope();
    const detail = scope.run(() => useJobDetail(ref('12'), can))!;
    await flush();
    scope.stop();
    return {
      urls: sent.map((r) => r.url.split('?')[0]),
      shows: (['stages', 'quantities', 'files'] as const).filter((s) => detail.shows(s)),
    };
  };

  it('asks a crew member only for what the permission table lets crew read', async () => {
    const crew = await paths((p) => may('crew', p));
    expect(crew.urls.sort()).toEqual([
      '/api/jobs/12',
      '/api/jobs/12/files',
      '/api/jobs/12/quantities',
      '/api/jobs/12/stages',
    ]);
  });

  it('never asks for a part the role may not read, and hides it', async () => {
    const noSurveys = await paths((p) => p !== 'surveys:read' && may('viewer', p));
    expect(noSurveys.urls.sort()).toEqual(['/api/jobs/12', '/api/jobs/12/stages']);
    expect(noSurveys.shows).toEqual(['stages']);
  });
});
