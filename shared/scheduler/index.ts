/**
 * Waterline scheduling engine: pure functions over plain data, no I/O, no clock reads.
 * Instants are epoch milliseconds; durations are working minutes unless a name says otherwise.
 */
export type * from './types.js';
export { SchedulerError, type SchedulerErrorCode } from './errors.js';
export {
  timeZoneOffset,
  localDayOf,
  localToInstant,
  dayNumber,
  isoDateOfDay,
  weekdayOfDay,
  DAY_MS,
  HOUR_MS,
  MINUTE_MS,
} from './time-zone.js';
export { holidayDaysOf } from './holidays.js';
export {
  compileCalendar,
  addWorkingMinutes,
  addWorkingDays,
  nextWorkingInstant,
  isWorkingInstant,
  isWorkingEnd,
  workingMinutesBetween,
  workingIntervals,
  countWorkingDays,
  type CompiledCalendar,
} from './calendar.js';
export { resourceCalendar, weeklyHours, type ResourceCalendarOptions } from './resource-calendar.js';
export {
  DEFAULT_BOOKING_STEP_MINUTES,
  assertBookingStep,
  roundUpToStep,
  roundDownToStep,
  bookableStart,
  longestWorkingDayMinutes,
  mustFitInOneDay,
  workingDaysWithin,
  type BookableStartOptions,
} from './booking-step.js';
export { applyLag, reverseLag, describeLag } from './lag.js';
export { findCycles, topologicalOrder } from './graph.js';
export {
  strengthRatioAtAge,
  ageForStrengthRatio,
  equivalentAge,
  elapsedDaysForEquivalentAge,
  cureRelease,
  cureElapsedDays,
  ACI_A_DAYS,
  ACI_B,
  DATUM_C,
  REFERENCE_C,
  type CureExplanation,
  type MaturityOptions,
} from './cure.js';
export {
  computeCriticalPath,
  type NetworkActivity,
  type NetworkLink,
  type ActivityTimes,
  type CriticalPathOptions,
  type CriticalPathResult,
} from './critical-path.js';
export {
  jobCriticalPath,
  boardCriticalPath,
  type StageTiming,
  type JobCriticalPath,
  type JobCriticalPathOptions,
} from './board-critical-path.js';
export {
  createBoardIndex,
  resourceCalendarOf,
  stageCalendarOf,
  kindCalendarOf,
  spanOf,
  compareBookings,
  type BoardIndex,
  type BoardIndexOptions,
  type ResourceBookings,
  type DepLink,
  type StageInfo,
} from './board-index.js';
export { movedBookings, applyMove, newBookingId, type StageMove } from './move.js';
export { checkMove, checkStageBookings, type CheckMoveOptions } from './check-move.js';
export { analyseBoard, boardViolations, type BoardAnalysis, type AnalyseBoardOptions } from './analyse-board.js';
export {
  unbookedStageTimes,
  unbookedPlan,
  unbookedTimesOf,
  checkUnbookedLink,
  unbookedViolationsOf,
  type UnbookedTimes,
  type UnbookedPlan,
  type HeldBy,
} from './unbooked.js';
export { earliestStartFromPredecessors } from './checks/order.js';
export { checkSplit } from './checks/split.js';
export {
  findSlots,
  nextCandidate,
  laterCannotHelp,
  type SlotRequest,
  type FindSlotsOptions,
  type Slot,
  type SlotCost,
} from './slot-finder.js';
export {
  autoPlace,
  type AutoPlaceOptions,
  type AutoPlaceResult,
  type PlacedStage,
  type UnplacedStage,
} from './auto-place.js';
export { idleHireDays, type IdleHire } from './checks/hire.js';
export { overlappingPairs } from './checks/clash.js';
export { compareViolations, normaliseViolations, violationKey } from './checks/violation.js';
export { formatInstant, formatPence } from './format.js';
