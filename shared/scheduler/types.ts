/** Epoch milliseconds (UTC). Every instant in the engine is one of these. */
export type Instant = number;

/** A half-open span of time [start, end) in epoch milliseconds. */
export interface Interval {
  start: Instant;
  end: Instant;
}

/** Local minutes of the day, [startMinute, endMinute), 0..1440. */
export type MinuteRange = readonly [number, number];

/** Working hours per weekday, index 0 = Sunday .. 6 = Saturday. */
export type WeeklyHours = readonly (readonly MinuteRange[])[];

/** Public-holiday region in date-holidays codes, e.g. `{ country: 'GB', state: 'ENG' }`. */
export interface HolidayRegion {
  country: string;
  state?: string;
}

/** A public holiday a calendar keeps free: its local date (YYYY-MM-DD) and name. */
export interface PublicHoliday {
  date: string;
  name: string;
}

/** A firm's (or a resource's) working time: weekly hours, public holidays and closures. */
export interface WorkingCalendar {
  id: string;
  /** The week's name as its firm calls it ("Standard week"), for messages; absent where the reader may not see it. */
  name?: string;
  /** IANA time zone, e.g. Europe/London. */
  timeZone: string;
  weekly: WeeklyHours;
  /** Where the holidays come from (the server fills `holidays` from it); the engine never reads it. */
  holidayRegion?: HolidayRegion | null;
  /**
   * The public holidays (observed days) the engine keeps free, for the span the data covers: the
   * server lists the region's days for the loaded range and a margin (server/services/holiday-days.ts).
   * The engine holds no holiday tables of its own; a day not listed is an ordinary day.
   */
  holidays?: readonly PublicHoliday[];
  /** Spans with no work (firm closures, a resource's absences). */
  closures?: Interval[];
}

export type ResourceCategory = 'crew' | 'person' | 'machine';

export interface Resource {
  id: string;
  firmId: string;
  category: ResourceCategory;
  /** Matchable kind: 'install_crew', 'groundworks_crew', 'electrician', 'crane', 'excavator', … */
  kind: string;
  calendarId: string;
  /** What people call it ("Crew Heron", "60 t mobile crane"); messages use it when given. */
  name?: string;
  hired?: boolean;
  /** People in a crew, to catch one person booked in two places. */
  personIds?: string[];
  /**
   * Taken off its firm's books: on the board only for the bookings it had, never offered for new
   * work (no slot, auto-place or plan picks it).
   */
  retired?: boolean;
}

/** Concrete cure rule on a base stage (see cure.ts). */
export interface CureRule {
  /** Fraction of 28-day strength needed before successors may start, e.g. 0.7. */
  targetFraction: number;
  /**
   * Daily mean air temperatures in °C for day 0 (the day the pour ends, site time), 1, …; the last
   * one repeats. Without them the cure is the ACI 209 age at the reference temperature.
   */
  dailyMeanTempsC?: number[];
  /** Nurse–Saul datum temperature, °C: the mix's own, else the firm's; default 0 °C (ASTM C1074). */
  datumC?: number;
  /** Temperature the strength curve holds at, °C; default 23 °C (ACI 209R-92 standard moist curing). */
  referenceC?: number;
  /**
   * Where the temperatures come from: `forecast` — the site's weather forecast for the days marked
   * in `fromForecast` (days gone by: as last forecast), the seasonal assumption for the rest;
   * `seasonal` — all of them are the seasonal assumption (no forecast on file).
   */
  temperatureSource?: 'forecast' | 'seasonal';
  /** Per day of `dailyMeanTempsC`: true when it is the forecast, false when the seasonal assumption. */
  fromForecast?: boolean[];
  /** The place the temperatures are for, in words (the site's town). */
  temperaturePlace?: string;
  /** The seasonal assumption in words, e.g. "UK monthly mean air temperature". */
  seasonalBasis?: string;
  /** Day 0 of `dailyMeanTempsC` as an ISO date (site time). */
  temperaturesFrom?: string;
}

export interface StageRequirement {
  kind: string;
  count: number;
}

export interface Stage {
  id: string;
  jobId: string;
  kind: string;
  name: string;
  /** Working minutes on the booked resource's calendar. */
  durationMinutes: number;
  requirements: StageRequirement[];
  cure?: CureRule | null;
  /**
   * A stage no longer than a working day must be done within one working day (a pour, a lift, an
   * electrician's visit) unless this is true (digging or block laying may stop overnight). Stages
   * longer than a working day are split over days either way. Default false.
   */
  mayContinueNextDay?: boolean;
  /**
   * Wanted as late as the stages after it allow, not as early as possible: the unit's delivery
   * comes on the day of the lift (lorry, crane and crew on site together), not weeks before it,
   * left standing on the drive. The planner places it last-minute; the checks are the same.
   * Default false.
   */
  justInTime?: boolean;
}

export type DependencyType = 'FS' | 'SS' | 'FF' | 'SF';
export type LagUnit = 'working_hours' | 'working_days' | 'elapsed_hours' | 'elapsed_days';

export interface Lag {
  /** May be negative (a lead). */
  amount: number;
  unit: LagUnit;
}

export interface Dependency {
  id: string;
  fromStageId: string;
  toStageId: string;
  type: DependencyType;
  lag: Lag;
  /**
   * True when the successor loads the predecessor's base and so waits for its cure (the
   * predecessor's CureRule) as well as the lag: a lift onto a slab. False or absent: only the lag
   * counts (block walls go up on a base that has set overnight). Default false.
   */
  waitsForCure?: boolean;
}

export type BookingState = 'pencilled' | 'sent' | 'confirmed' | 'declined' | 'on_site' | 'done';

export interface Booking {
  id: string;
  stageId: string;
  resourceId: string;
  start: Instant;
  end: Instant;
  state: BookingState;
  /** The installer firm that made the booking (owner of the job). */
  installerFirmId: string;
  version?: number;
}

export interface Job {
  id: string;
  firmId: string;
  promisedBy?: Instant | null;
  orderedAt?: Instant | null;
}

export interface HirePeriod {
  id: string;
  resourceId: string;
  onHire: Instant;
  offHire: Instant;
  dayRatePence: number;
}

/**
 * Notice a booking needs. Each of `appliesTo`'s fields, when given, must match: the firm's rules
 * name a resource kind or a stage kind; a job's own stage rules (from its template: the crane
 * firm's notice, the maker's lead time) name the stage by id, and may narrow it to a resource kind.
 */
export interface LeadTimeRule {
  appliesTo: { resourceKind?: string; stageKind?: string; stageId?: string };
  workingDays: number;
  from: 'now' | 'order';
  /** Whose notice it is, in words for messages, e.g. "the maker's lead time". */
  reason?: string;
}

/** Everything the engine looks at. Arrays are never mutated. */
export interface Board {
  stages: Stage[];
  dependencies: Dependency[];
  bookings: Booking[];
  resources: Resource[];
  calendars: WorkingCalendar[];
  hirePeriods: HirePeriod[];
  jobs: Job[];
  leadTimeRules: LeadTimeRule[];
}

export type ViolationKind =
  | 'order'
  | 'lag'
  | 'cure'
  | 'lead_time'
  | 'clash'
  | 'availability'
  | 'hire'
  | 'idle_hire'
  | 'capacity'
  | 'person_double'
  | 'cross_firm'
  | 'cycle'
  | 'unbooked_predecessor'
  | 'split'
  | 'just_in_time';

export type Severity = 'error' | 'warning';

export interface Violation {
  kind: ViolationKind;
  severity: Severity;
  stageIds: string[];
  resourceIds: string[];
  bookingIds: string[];
  /** Plain words a scheduler understands. */
  message: string;
  details?: Record<string, unknown>;
}

/** Options every board-level function takes. */
export interface BoardOptions {
  /** The current instant; the engine never reads a clock. */
  now: Instant;
  /**
   * The firm's booking step in minutes (default 15): times the engine works out for people (slot
   * starts, auto-placed starts, shifted dependents, earliest starts in messages) are rounded up to
   * it, aligned in the calendar's local time. A whole number from 1 to 1440.
   */
  bookingStepMinutes?: number;
}
