/**
 * Typed calls for a job's survey, quantities, stages, files and the day sheets, over the app's one
 * client. Uploads go through XMLHttpRequest because fetch cannot report upload progress.
 */
import { api, ApiError, problemToError } from '@/api/client';
import type { JobQuantities } from '@shared/quantities/job-quantities';
import type { FileView } from '@shared/schemas/files';
import type { SurveyFields, SurveyView } from '@shared/schemas/surveys';
import type { DaySheetList } from '@shared/schemas/day-sheets';
import type { CreateJob, NextReference, UpdateJob } from '@shared/schemas/jobs';
import type { InstallationType, JobStatus } from '@/api/types';

export interface JobDetail {
  id: string;
  reference: string;
  customerName: string;
  customerPhone: string | null;
  customerEmail: string | null;
  siteAddress: string;
  siteTown: string;
  sitePostcode: string;
  accessNotes: string | null;
  unitId: string | null;
  installationType: InstallationType;
  status: JobStatus;
  promisedFrom: string | null;
  promisedTo: string | null;
  orderedOn: string | null;
  version: number;
  /** The unit's model and maker (read through the job, so crew see it too). */
  unitName: string | null;
  unitMaker: string | null;
  /** When the survey was saved; null when there is none yet. */
  surveyedAt: string | null;
}

export interface StageBooking {
  id: string;
  resourceId: string;
  resourceName: string;
  resourceKind: string;
  startsAt: string;
  endsAt: string;
  state: string;
  /** A declined booking: why, in the partner's own words (null when they gave none). */
  declineReason?: string | null;
  /**
   * On site or done: when the crew were marked on site, and done (a step kept on a phone without
   * a signal by when it was marked there); null when not known (marked before times were kept).
   */
  arrivedAt?: string | null;
  doneAt?: string | null;
}
export interface JobStage {
  id: string;
  kind: string;
  name: string;
  sequence: number;
  durationMinutes: number;
  requirements: { kind: string; count: number }[];
  cure: { targetFraction: number } | null;
  /** Notice the engine checks before the stage (or one party's booking of it) may start. */
  notice?: {
    workingDays: number;
    countedFrom: 'now' | 'order';
    resourceKind?: string | null;
    reason?: string | null;
  } | null;
  notes: string | null;
  cautions: string[];
  /** The stages this one waits for, by the names they have on this job. */
  after: {
    stageId: string;
    kind: string | null;
    name: string | null;
    type: string;
    lagAmount: number;
    lagUnit: string;
  }[];
  bookings: StageBooking[];
}

export interface QuantitiesBody {
  unit: {
    id: string;
    model: string;
    lengthMm: number;
    widthMm: number;
    heightMm: number;
    dryWeightKg: number;
    filledWeightKg: number;
  };
  surveyed: boolean;
  quantities: JobQuantities;
}

export interface UnitOption {
  id: string;
  model: string;
  maker: string;
}

export const jobWork = {
  job: (id: string) => api.get<JobDetail>(`/api/jobs/${id}`),
  createJob: (body: CreateJob) => api.post<JobDetail>('/api/jobs', body),
  updateJob: (id: string, body: UpdateJob) => api.patch<JobDetail>(`/api/jobs/${id}`, body),
  units: () => api.get<{ items: UnitOption[] }>('/api/units'),
  nextReference: () => api.get<NextReference>('/api/job-references/next'),
  stages: (id: string) => api.get<{ items: JobStage[] }>(`/api/jobs/${id}/stages`),
  plan: (id: string) => api.post<{ crane: { needed: boolean; reason: string } }>(`/api/jobs/${id}/plan`),
  quantities: (id: string) => api.get<QuantitiesBody>(`/api/jobs/${id}/quantities`),
  survey: (id: string) => api.get<SurveyView>(`/api/jobs/${id}/survey`),
  saveSurvey: (id: string, version: number, survey: SurveyFields) =>
    api.put<SurveyView>(`/api/jobs/${id}/survey`, { version, survey }),
  files: (id: string) => api.get<{ items: FileView[] }>(`/api/jobs/${id}/files`),
  deleteFile: (fileId: string) => api.delete<void>(`/api/files/${fileId}`),
  daySheets: (date: string) => api.get<DaySheetList>('/api/day-sheets', { query: { date } }),
};

/**
 * Sends one file to a job, reporting progress from 0 to 1.
 * @example await uploadJobFile('12', file, csrfToken, (p) => (progress.value = p))
 */
export function uploadJobFile(
  jobId: string,
  file: File,
  csrfToken: string | null,
  onProgress: (fraction: number) => void,
): Promise<FileView> {
  return uploadTo<FileView>(`/api/jobs/${jobId}/files`, file, csrfToken, onProgress);
}

/**
 * Sends one file (field `file`) to an upload route, reporting progress from 0 to 1.
 * @example await uploadTo('/api/partner/slots/7/certificate', file, csrfToken, (p) => (progress.value = p))
 */
export function uploadTo<T>(
  url: string,
  file: File,
  csrfToken: string | null,
  onProgress: (fraction: number) => void,
): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', url);
    xhr.setRequestHeader('Accept', 'application/json, application/problem+json');
    if (csrfToken) xhr.setRequestHeader('X-CSRF-Token', csrfToken);
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onerror = () =>
      reject(
        new ApiError({
          status: 0,
          title: 'Waterline could not reach the server',
          detail: 'Check your connection and try again.',
        }),
      );
    xhr.onload = () => {
      let body: unknown;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as T);
      else reject(problemToError(xhr.status, body));
    };
    const form = new FormData();
    form.append('file', file, file.name);
    xhr.send(form);
  });
}
