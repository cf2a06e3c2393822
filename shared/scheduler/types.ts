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

/** A firm's (or a resource's) working time: weekly hours, public holidays and closures. */
export interface WorkingCalendar {
  id: string;
  /** IANA time zone, e.g. Europe/London. */
  timeZone: string;
  weekly: WeeklyHours;
  holidayRegion?: HolidayRegion | null;
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
}

/** Concrete cure rule on a base stage (see cure.ts). */
export interface CureRule {
  /** Fraction of 28-day strength needed before successors may start, e.g. 0.7. */
  targetFraction: number;
  /** Daily mean air temperatures in °C for day 0, 1, …; the last one repeats. */
  dailyMeanTempsC?: number[];
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

export interface LeadTimeRule {
  appliesTo: { resourceKind?: string; stageKind?: string };
  workingDays: number;
  from: 'now' | 'order';
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
  | 'split';

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
