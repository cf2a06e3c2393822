import type { Knex } from 'knex';
import { reachOf, type Actor } from '../services/actor.ts';
import { ScopedModel, visibleFirmIds, ownResourceIds, firmResourceIds, visibleJobIds, type AnyQuery } from './base.ts';
import type { StageNotice } from '../../shared/templates/types.ts';

const knexOf = (q: AnyQuery): Knex => q.modelClass().knex();

export class Firm extends ScopedModel {
  static override tableName = 'firms';
  id!: string;
  name!: string;
  kind!: 'installer' | 'groundworks' | 'plant_hire' | 'crane_hire' | 'haulage' | 'electrical';
  timeZone!: string;
  holidayRegion!: string;
  phone!: string | null;
  email!: string | null;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('firms.id', visibleFirmIds(knexOf(q), actor));
  }
}

export class User extends ScopedModel {
  static override tableName = 'users';
  id!: string;
  email!: string;
  name!: string;
  googleSub!: string | null;
  lastSignInAt!: Date | null;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('users.id', knexOf(q).select('user_id').from('memberships').where('firm_id', actor.firmId));
  }
}

export class Membership extends ScopedModel {
  static override tableName = 'memberships';
  id!: string;
  userId!: string;
  firmId!: string;
  role!: 'owner' | 'scheduler' | 'manager' | 'crew' | 'partner' | 'viewer';
  static override scope(q: AnyQuery, actor: Actor) {
    q.where('memberships.firm_id', actor.firmId);
  }
}

export class Partnership extends ScopedModel {
  static override tableName = 'partnerships';
  id!: string;
  installerFirmId!: string;
  partnerFirmId!: string;
  static override scope(q: AnyQuery, actor: Actor) {
    q.where((w) => w.where('installer_firm_id', actor.firmId).orWhere('partner_firm_id', actor.firmId));
  }
}

export class Calendar extends ScopedModel {
  static override tableName = 'calendars';
  id!: string;
  firmId!: string;
  name!: string;
  weeklyHours!: Record<string, [number, number][]>;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('calendars.firm_id', visibleFirmIds(knexOf(q), actor));
  }
}

export class Resource extends ScopedModel {
  static override tableName = 'resources';
  id!: string;
  firmId!: string;
  name!: string;
  category!: 'crew' | 'person' | 'machine';
  kind!: string;
  ownership!: 'owned' | 'hired';
  calendarId!: string | null;
  userId!: string | null;
  phone!: string | null;
  notes!: string | null;
  active!: boolean;
  static override scope(q: AnyQuery, actor: Actor) {
    const knex = knexOf(q);
    switch (reachOf(actor)) {
      case 'installer-office':
        q.whereIn('resources.firm_id', visibleFirmIds(knex, actor));
        break;
      case 'crew':
        q.whereIn('resources.id', ownResourceIds(knex, actor));
        break;
      case 'partner':
        q.where('resources.firm_id', actor.firmId);
        break;
    }
  }
}

export class CalendarException extends ScopedModel {
  static override tableName = 'calendar_exceptions';
  id!: string;
  calendarId!: string | null;
  resourceId!: string | null;
  startsAt!: Date;
  endsAt!: Date;
  reason!: string;
  static override scope(q: AnyQuery, actor: Actor) {
    const knex = knexOf(q);
    q.where((w) =>
      w
        .whereIn(
          'calendar_exceptions.calendar_id',
          knex.select('id').from('calendars').whereIn('firm_id', visibleFirmIds(knex, actor)),
        )
        .orWhereIn(
          'calendar_exceptions.resource_id',
          knex.select('id').from('resources').whereIn('firm_id', visibleFirmIds(knex, actor)),
        ),
    );
  }
}

export class HirePeriod extends ScopedModel {
  static override tableName = 'hire_periods';
  id!: string;
  resourceId!: string;
  hirerFirmId!: string;
  supplierFirmId!: string;
  onHireAt!: Date;
  offHireAt!: Date;
  dayRatePence!: number;
  deliveryPence!: number;
  collectionPence!: number;
  status!: 'requested' | 'approved' | 'ended';
  approvedBy!: string | null;
  static override scope(q: AnyQuery, actor: Actor) {
    q.where((w) =>
      w.where('hire_periods.hirer_firm_id', actor.firmId).orWhere('hire_periods.supplier_firm_id', actor.firmId),
    );
  }
}

export class Unit extends ScopedModel {
  static override tableName = 'units';
  id!: string;
  firmId!: string;
  model!: string;
  maker!: string;
  lengthMm!: number;
  widthMm!: number;
  heightMm!: number;
  dryWeightKg!: number;
  filledWeightKg!: number;
  waterLitres!: number;
  supplies!: { amps: number }[];
  makerLeadDays!: number;
  static override scope(q: AnyQuery, actor: Actor) {
    if (reachOf(actor) === 'installer-office') q.where('units.firm_id', actor.firmId);
    else q.whereRaw('false');
  }
}

export class Job extends ScopedModel {
  static override tableName = 'jobs';
  id!: string;
  firmId!: string;
  reference!: string;
  customerName!: string;
  customerPhone!: string | null;
  customerEmail!: string | null;
  siteAddress!: string;
  siteTown!: string;
  sitePostcode!: string;
  accessNotes!: string | null;
  unitId!: string | null;
  installationType!: 'in_ground' | 'semi_recessed' | 'slab' | 'deck';
  status!: 'enquiry' | 'surveyed' | 'planned' | 'in_progress' | 'handed_over' | 'cancelled';
  promisedFrom!: string | null;
  promisedTo!: string | null;
  orderedOn!: string | null;
  /** An install, or a service visit set up at an install's handover (parentJobId, due on serviceDueOn). */
  kind!: 'install' | 'service';
  parentJobId!: string | null;
  serviceDueOn!: string | null;
  version!: number;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('jobs.id', visibleJobIds(knexOf(q), actor));
  }
}

export class Stage extends ScopedModel {
  static override tableName = 'stages';
  id!: string;
  jobId!: string;
  kind!: string;
  name!: string;
  sequence!: number;
  durationMinutes!: number;
  requirements!: { kind: string; count: number }[];
  cure!: { targetFraction: number; dailyMeanTempsC?: number[] } | null;
  mayContinueNextDay!: boolean;
  /** Placed as late as the stages after it allow (the delivery, on the lift day). */
  justInTime!: boolean;
  /** The notice the stage needs (from its template: a partner's notice, the maker's lead time); checked by the engine. */
  notice!: StageNotice | null;
  notes!: string | null;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('stages.job_id', visibleJobIds(knexOf(q), actor));
  }
}

export class Dependency extends ScopedModel {
  static override tableName = 'dependencies';
  id!: string;
  fromStageId!: string;
  toStageId!: string;
  type!: 'FS' | 'SS' | 'FF' | 'SF';
  lagAmount!: number;
  lagUnit!: 'working_hours' | 'working_days' | 'elapsed_hours' | 'elapsed_days';
  /** The successor waits for the predecessor's cure, not only the lag. */
  waitsForCure!: boolean;
  static override scope(q: AnyQuery, actor: Actor) {
    const knex = knexOf(q);
    q.whereIn(
      'dependencies.from_stage_id',
      knex.select('id').from('stages').whereIn('job_id', visibleJobIds(knex, actor)),
    );
  }
}

export class Booking extends ScopedModel {
  static override tableName = 'bookings';
  id!: string;
  stageId!: string;
  resourceId!: string;
  startsAt!: Date;
  endsAt!: Date;
  state!: 'pencilled' | 'sent' | 'confirmed' | 'declined' | 'on_site' | 'done';
  version!: number;
  createdBy!: string | null;
  createdAt!: Date;
  updatedAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    const knex = knexOf(q);
    switch (reachOf(actor)) {
      case 'installer-office':
        q.whereIn(
          'bookings.stage_id',
          knex
            .select('s.id')
            .from('stages as s')
            .join('jobs as j', 'j.id', 's.job_id')
            .where('j.firm_id', actor.firmId),
        );
        break;
      case 'crew':
        q.whereIn('bookings.resource_id', ownResourceIds(knex, actor)).whereIn(
          'bookings.stage_id',
          knex
            .select('s.id')
            .from('stages as s')
            .join('jobs as j', 'j.id', 's.job_id')
            .where('j.firm_id', actor.firmId),
        );
        break;
      case 'partner':
        q.whereIn('bookings.resource_id', firmResourceIds(knex, actor.firmId));
        break;
    }
  }
}

export class LeadTimeRule extends ScopedModel {
  static override tableName = 'lead_time_rules';
  id!: string;
  firmId!: string;
  resourceKind!: string | null;
  stageKind!: string | null;
  workingDays!: number;
  countedFrom!: 'now' | 'order';
  static override scope(q: AnyQuery, actor: Actor) {
    q.where('lead_time_rules.firm_id', actor.firmId);
  }
}

export class AuditEntry extends ScopedModel {
  static override tableName = 'audit_log';
  id!: string;
  firmId!: string | null;
  actorUserId!: string | null;
  entity!: string;
  entityId!: string;
  action!: 'create' | 'update' | 'delete';
  before!: unknown;
  after!: unknown;
  at!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    q.where('audit_log.firm_id', actor.firmId);
  }
}

/** Every scoped model, so a test can check each one declares its scope. */
export const SCOPED_MODELS = [
  Firm,
  User,
  Membership,
  Partnership,
  Calendar,
  Resource,
  CalendarException,
  HirePeriod,
  Unit,
  Job,
  Stage,
  Dependency,
  Booking,
  LeadTimeRule,
  AuditEntry,
] as const;
