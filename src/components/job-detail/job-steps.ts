/**
 * The job page's pure parts: where the install stands, from what is actually recorded (a job is
 * "surveyed" only with a saved survey, however far its status has moved), and the stages a stage
 * waits for, by the names they have on this job.
 */
import type { JobDetail, JobStage } from '@/api/job-work';
import { humanise } from '@/utils/labels';

export type StepKey = 'enquiry' | 'surveyed' | 'planned' | 'in_progress' | 'handed_over';
export interface JobStep {
  key: StepKey;
  label: string;
  done: boolean;
  current: boolean;
  detail: string;
}

const LABELS: Record<StepKey, string> = {
  enquiry: 'Enquiry',
  surveyed: 'Surveyed',
  planned: 'Planned',
  in_progress: 'In progress',
  handed_over: 'Handed over',
};

/**
 * Each step done or not from the job's own records: the enquiry (the job exists), a saved survey,
 * planned stages, work marked on site or done, and the handover done (or the job handed over).
 * The current step is the first one not done.
 *
 * @example
 * jobSteps({ status: 'planned', surveyedAt: null }, [plannedStage]).find((s) => s.key === 'surveyed')!.done // false
 */
export function jobSteps(
  job: Pick<JobDetail, 'status' | 'surveyedAt'>,
  stages: readonly Pick<JobStage, 'kind' | 'bookings'>[],
): JobStep[] {
  const bookings = stages.flatMap((s) => s.bookings);
  const handedOver =
    job.status === 'handed_over' ||
    stages.some((s) => s.kind === 'handover' && s.bookings.some((b) => b.state === 'done'));
  const started = bookings.some((b) => b.state === 'on_site' || b.state === 'done');
  const done: Record<StepKey, [boolean, string]> = {
    enquiry: [true, 'Recorded'],
    surveyed: [job.surveyedAt !== null, job.surveyedAt ? 'Survey saved' : 'No survey saved yet'],
    planned: [
      stages.length > 0,
      stages.length ? `${stages.length} stage${stages.length === 1 ? '' : 's'}` : 'No stages yet',
    ],
    in_progress: [started || handedOver, started ? 'Work marked on site' : 'No work started'],
    handed_over: [handedOver, handedOver ? 'Handed over' : 'Not yet'],
  };
  const keys = Object.keys(LABELS) as StepKey[];
  const current = keys.find((k) => !done[k][0]) ?? null;
  return keys.map((key) => ({
    key,
    label: LABELS[key],
    done: done[key][0],
    current: key === current,
    detail: done[key][1],
  }));
}

/**
 * What a stage waits for, in words: each predecessor by its stage's own name on this job, with its lag.
 *
 * @example
 * predecessorText(lift.after, stages) // 'Supply cable first fix, Block retaining walls + 1 elapsed days'
 */
export function predecessorText(after: JobStage['after'], stages: readonly Pick<JobStage, 'id' | 'name'>[]): string {
  return after
    .map((a) => {
      const name = stages.find((s) => s.id === a.stageId)?.name ?? a.name ?? humanise(a.kind ?? 'another stage');
      return name + (a.lagAmount ? ` + ${a.lagAmount} ${humanise(a.lagUnit).toLowerCase()}` : '');
    })
    .join(', ');
}
