/** What the job panel lists: the job's stages in order with dates, float and the critical path. */
import type { BoardData, BoardStage } from '@shared/board-data';
import { describeLag, type JobCriticalPath, type Violation } from '@shared/scheduler/index';

export interface StageLine {
  stage: BoardStage;
  booked: boolean;
  start: number | null;
  end: number | null;
  /** Earliest start the network allows (for unbooked stages). */
  earliestStart: number | null;
  floatMinutes: number | null;
  critical: boolean;
  after: string[];
  problems: Violation[];
}

export function stageLines(data: BoardData, jobId: string, path: JobCriticalPath | undefined, violations: readonly Violation[]): StageLine[] {
  const stages = data.stages.filter((s) => s.jobId === jobId);
  const names = new Map(data.stages.map((s) => [s.id, s.name]));
  const timing = new Map((path?.stages ?? []).map((t) => [t.stageId, t]));
  return stages
    .map((stage) => {
      const own = data.bookings.filter((b) => b.stageId === stage.id && b.state !== 'declined');
      const t = timing.get(stage.id);
      const cure = data.dependencies.some((d) => d.toStageId === stage.id && data.stages.find((s) => s.id === d.fromStageId)?.cure);
      return {
        stage,
        booked: own.length > 0,
        start: own.length ? Math.min(...own.map((b) => b.start)) : null,
        end: own.length ? Math.max(...own.map((b) => b.end)) : null,
        earliestStart: t?.es ?? null,
        floatMinutes: t?.totalFloatMinutes ?? null,
        critical: path?.criticalStageIds.includes(stage.id) ?? false,
        after: data.dependencies.filter((d) => d.toStageId === stage.id).map((d) => {
          const lag = d.lag.amount ? ` + ${describeLag(d.lag)}` : '';
          return `${d.type === 'FS' ? 'after' : d.type} ${names.get(d.fromStageId) ?? 'another stage'}${lag}`;
        }).concat(cure ? ['once the base has cured'] : []),
        problems: violations.filter((v) => v.stageIds.includes(stage.id)),
      };
    })
    .sort((a, b) => (a.start ?? a.earliestStart ?? Infinity) - (b.start ?? b.earliestStart ?? Infinity) || a.stage.sequence - b.stage.sequence);
}

/** Float in words a scheduler reads: "2.5 days spare", "none spare", "1 day late". */
export function floatText(minutes: number | null): string {
  if (minutes === null) return '';
  const days = Math.round((Math.abs(minutes) / 540) * 10) / 10;
  if (minutes === 0) return 'no slack';
  return minutes > 0 ? `${days} working days spare` : `${days} working days late`;
}
