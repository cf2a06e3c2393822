/**
 * What the manager's reports return. Instants are epoch milliseconds, money is pence, working
 * time is minutes; `date` fields are local dates (YYYY-MM-DD) in the firm's time zone.
 * Every job, stage and booking named here is the reader's own firm's: another installer's work on
 * a shared partner resource shows only as "busy elsewhere", with no id, reference, customer or site.
 */

/** The span a report covers and the clock it is read against. */
export interface ReportRange {
  from: number;
  to: number;
  now: number;
  /** The reader's firm's IANA time zone (week starts and local dates). */
  timeZone: string;
}

/** One booking a fix changes: where it is now and where the move puts it. */
export interface FixMove {
  bookingId: string;
  fromResourceId: string;
  fromResourceName: string;
  fromStart: number;
  fromEnd: number;
  resourceId: string;
  resourceName: string;
  start: number;
  end: number;
  /** A partner firm's sent or confirmed booking moves: the partner is asked again. */
  asksPartnerAgain: boolean;
}

/**
 * A place the slot finder would put the offending stage instead, with what it costs. Only fixes
 * the guarded write path would accept are listed: the engine's blocking checks pass on the moved
 * bookings, every moved booking keeps its notice period, none is under way or done.
 */
export interface SuggestedFix {
  /** The stage that moves (all its bookings move together, as on the board). */
  stageId: string;
  /** The booking that changes resource (or only time). */
  bookingId: string;
  /** The version of each of the stage's bookings the fix was worked out from: a newer one refuses it (409). */
  versions: Record<string, number>;
  /** Every booking of the stage, before and after: the preview. */
  moves: FixMove[];
  resourceId: string;
  resourceName: string;
  start: number;
  end: number;
  date: string;
  extraHireDays: number;
  extraHirePence: number;
  floatUsedMinutes: number;
  delaysJob: boolean;
  /** Plain words, e.g. "Move to 25 t city crane on Tue 9 Jun 08:00 — no extra cost". */
  label: string;
  link: string;
}

export type ClashKind = 'clash' | 'hire' | 'person_double' | 'cross_firm';

export interface ClashRow {
  /** Stable key of the engine's violation. */
  id: string;
  kind: ClashKind;
  /** The reader's own bookings on either side of the problem (the board outlines them). */
  bookingIds: string[];
  kindLabel: string;
  date: string;
  from: number;
  to: number;
  message: string;
  jobIds: string[];
  jobReferences: string[];
  /** The stage the fixes are for (the later-booked one of a pair), or null. */
  stageId: string | null;
  stageName: string;
  resourceNames: string[];
  /** Money the clash costs as booked: extra hire days outside the hire period × the day rate. */
  costPence: number;
  link: string;
  fixes: SuggestedFix[];
  /**
   * A machine outside its hire: the nearest hire of it, and the first or last day (YYYY-MM-DD, the
   * firm's calendar) that would take the booking in, for the form that changes a hire's dates.
   */
  cover?: { hireId: string; onHireDate?: string; offHireDate?: string };
}

export interface ClashReport {
  range: ReportRange;
  rows: ClashRow[];
  /** Clashes per week (week starting Monday), for the chart. */
  perWeek: { week: string; count: number }[];
}

export interface HireSuggestion {
  kind: 'end' | 'shorten_start' | 'shorten_end' | 'split' | 'merge';
  /** e.g. "Off-hire 2 days earlier (last paid day Wed 17 Jun): saves £290.00". */
  label: string;
  savesPence: number;
  /**
   * The hire's new first or last day (YYYY-MM-DD, the firm's calendar) the suggestion comes to,
   * for the form that changes the hire's dates; none where the change is not one of dates.
   */
  change?: { onHireDate?: string; offHireDate?: string };
  /** The hire has not started and nothing is booked on it: cancelling it is the suggestion. */
  cancel?: true;
}

export interface HirePeriodRow {
  id: string;
  resourceId: string;
  resourceName: string;
  supplierFirmId: string;
  supplierName: string;
  status: 'requested' | 'approved' | 'ended';
  version: number;
  onHire: number;
  offHire: number;
  onHireDate: string;
  offHireDate: string;
  dayRatePence: number;
  deliveryPence: number;
  collectionPence: number;
  /** Working days of the machine's calendar inside the hire: the days paid. */
  paidDays: number;
  bookedDays: number;
  idleDays: string[];
  idleCostPence: number;
  /** Paid days × day rate + delivery + collection. */
  totalCostPence: number;
  bookingsOutsideHire: number;
  suggestions: HireSuggestion[];
  link: string;
}

export interface HireReport {
  range: ReportRange;
  periods: HirePeriodRow[];
  totals: { paidDays: number; idleDays: number; idleCostPence: number; totalCostPence: number };
  /** Idle paid cost per week inside the range, for the chart. */
  idlePerWeek: { week: string; idleDays: number; costPence: number }[];
}

export type UtilisationGroup = 'crew' | 'machine' | 'partner';

export interface UtilisationWeek {
  week: string;
  availableMinutes: number;
  bookedMinutes: number;
  /** Booked ÷ available, 0..1 (booked time is counted in working minutes, so it never exceeds available). */
  ratio: number;
}

export interface UtilisationRow {
  resourceId: string;
  resourceName: string;
  firmName: string;
  group: UtilisationGroup;
  kind: string;
  availableMinutes: number;
  bookedMinutes: number;
  /** A partner resource's working minutes taken by other installers ("busy elsewhere"). */
  elsewhereMinutes: number;
  ratio: number;
  weeks: UtilisationWeek[];
  link: string;
}

/**
 * Why a job is at risk: late on its critical path, waiting for (or overdue) a partner's answer,
 * booked inside a notice period, a booked stage short of resources, or stages booked out of order
 * (a dependency, its lag or a cure broken).
 */
export type RiskReason = 'late' | 'waiting' | 'overdue' | 'lead_time' | 'short_resourced' | 'order';

/** A job at risk in one word: late, can't go ahead as booked, or waiting on a partner. Never "on time". */
export type RiskStatus = 'late' | 'blocked' | 'waiting';

export interface RiskItem {
  reason: RiskReason;
  label: string;
}

export interface RiskRow {
  jobId: string;
  reference: string;
  customerName: string;
  siteTown: string;
  promisedBy: number | null;
  /** The promised date itself (YYYY-MM-DD, the firm's day): `promisedBy` is the instant that day ends. */
  promisedDate: string | null;
  /** Elapsed ms past the promised date by the critical path (0 = on time). */
  lateByMs: number;
  /** Least total float, working minutes (negative = that much work too late). */
  floatMinutes: number;
  reasons: RiskItem[];
  status: RiskStatus;
  /** e.g. "3 d late", "Can't go ahead as booked", "Waiting for an answer". */
  statusLabel: string;
  link: string;
}

export interface UtilisationReport {
  range: ReportRange;
  weeks: string[];
  resources: UtilisationRow[];
  risks: RiskRow[];
}

/** One of "the three worst problems first". */
export interface WorstProblem {
  source: 'clash' | 'idle_hire' | 'late_job' | 'blocked_job';
  title: string;
  detail: string;
  costPence: number;
  date: string;
  link: string;
  fixes: string[];
}
