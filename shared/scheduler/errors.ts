/** Stable codes for every way the engine refuses input. */
export type SchedulerErrorCode =
  | 'invalid_time_zone'
  | 'invalid_calendar'
  | 'invalid_interval'
  | 'invalid_duration'
  | 'unknown_stage'
  | 'unknown_resource'
  | 'unknown_calendar'
  | 'unknown_booking'
  | 'cycle'
  | 'no_working_time'
  | 'out_of_range';

/**
 * The error the engine throws for input it cannot work with. `code` is stable; `message` is
 * plain words; `details` carries ids (for example the stages in a cycle).
 *
 * @example
 * try { topologicalOrder(stages, deps) } catch (e) {
 *   if (e instanceof SchedulerError && e.code === 'cycle') console.log(e.details?.stageIds)
 * }
 */
export class SchedulerError extends Error {
  readonly code: SchedulerErrorCode;
  readonly details: Record<string, unknown> | undefined;
  constructor(code: SchedulerErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = 'SchedulerError';
    this.code = code;
    this.details = details;
  }
}
