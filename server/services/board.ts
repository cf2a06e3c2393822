import type { Knex } from 'knex';
import type {
  BoardBooking,
  BoardCalendar,
  BoardClosure,
  BoardData,
  BoardJob,
  BoardResource,
  BoardStage,
} from '../../shared/board-data.ts';
import { ELSEWHERE_JOB_ID, elsewhereBookingId, elsewhereStageId } from '../../shared/board-data.ts';
import type { Dependency, HirePeriod, LeadTimeRule, WorkingCalendar } from '../../shared/scheduler/index.ts';
import {
  Booking,
  Calendar,
  CalendarException,
  Dependency as DependencyModel,
  HirePeriod as HireModel,
  Job,
  LeadTimeRule as LeadModel,
  Resource,
  Stage,
} from '../models/index.ts';
import { reachOf, type Actor } from './actor.ts';
import { scoped } from './scope.ts';
import { bookingDuring } from './ranges.ts';
import { withAnswers } from './answer-views.ts';
import {
  answerReasonFor,
  boardCustomerName,
  busyElsewhere,
  ELSEWHERE_BLOCKING_STATES,
  ELSEWHERE_STATE,
  calendarNameFor,
  closureReasonFor,
} from './read-policy.ts';
import { cureRulesFromWeather } from './cure-temperatures.ts';
import { holidaysFor } from './holiday-days.ts';
import { orderedFrom, promisedDeadline } from '../../shared/local-dates.ts';
import { SERVICE_TRAY_LEAD_DAYS } from '../../shared/service-plan.ts';
import { engineWeekly } from '../../shared/working-week.ts';

const OPEN_JOB_STATUSES = ['enquiry', 'surveyed', 'planned', 'in_progress'];

export interface BoardQuery {
  from: number;
  to: number;
  /** Jobs to include whatever the range (the job being written, its dependents). */
  jobIds?: string[];
  now: number;
}

/** date-holidays region from the stored form, e.g. GB-ENG → { country: 'GB', state: 'ENG' }. */
export function holidayRegionOf(code: string | null | undefined): WorkingCalendar['holidayRegion'] {
  if (!code) return null;
  const [country, state] = code.split('-');
  return country ? { country, ...(state ? { state } : {}) } : null;
}

type ResourceRow = Resource & { firmName: string; firmKind: string; timeZone: string; holidayRegion: string };

/**
 * Loads what the board and the write checks need from the database, scoped to the actor: the
 * resources they may see, the bookings in the range, the jobs, stages and dependencies behind them,
 * calendars with closures and absences, hire periods and lead-time rules. Another installer's
 * booking of a shared partner resource comes only as an anonymous "busy elsewhere" block, and only
 * once it was sent (read-policy.ts decides which states block and what the block tells).
 */
/**
 * Runs the loader's queries: together on the pool, one after another inside a transaction (its one
 * connection would otherwise get overlapping queries, which pg refuses from version 9 and warns
 * about now).
 */
async function runQueries<T extends readonly (() => PromiseLike<unknown>)[]>(
  inOrder: boolean,
  tasks: T,
): Promise<{ -readonly [K in keyof T]: Awaited<ReturnType<T[K]>> }> {
  if (!inOrder) return Promise.all(tasks.map((task) => task())) as never;
  const results: unknown[] = [];
  for (const task of tasks) results.push(await task());
  return results as never;
}

export async function loadBoard(knex: Knex | Knex.Transaction, actor: Actor, query: BoardQuery): Promise<BoardData> {
  const trx = knex.isTransaction ? (knex as Knex.Transaction) : undefined;
  const from = new Date(query.from);
  const to = new Date(query.to);
  const reach = reachOf(actor);

  // Every query is scoped, and they run together: the sets they depend on (the visible
  // resources, the jobs in play) are subqueries, not round trips. Rows come back plain (no model
  // instances): the board reads thousands of them.
  // A knex builder runs again on every await: take its result once, as a plain promise.
  const rows = <T>(q: { toKnexQuery(): Knex.QueryBuilder }): Promise<T[]> =>
    q.toKnexQuery().then((r: unknown) => r as T[]);
  const visibleResourceIds = scoped(Resource, actor, trx)
    .where('resources.active', true)
    .select('resources.id')
    .toKnexQuery();
  const windowStageIds = scoped(Booking, actor, trx)
    .where(bookingDuring(knex, 'bookings', from, to))
    .select('bookings.stage_id')
    .toKnexQuery();
  const jobIdQuery = scoped(Job, actor, trx).where((w) => {
    w.whereIn('jobs.id', knex('stages').select('job_id').whereIn('id', windowStageIds) as never);
    if (query.jobIds?.length) w.orWhereIn('jobs.id', query.jobIds);
    // The office also sees every open job that still has stages waiting in the tray; a service
    // visit only once its promised window opens within SERVICE_TRAY_LEAD_DAYS of the board's range.
    if (reach === 'installer-office') {
      const serviceFrom = new Date(query.to + SERVICE_TRAY_LEAD_DAYS * 86_400_000).toISOString().slice(0, 10);
      w.orWhereRaw(
        `jobs.status = ANY(?) AND EXISTS (SELECT 1 FROM stages s WHERE s.job_id = jobs.id
        AND NOT EXISTS (SELECT 1 FROM bookings b WHERE b.stage_id = s.id AND b.state <> 'declined'))
        AND (jobs.kind <> 'service' OR jobs.promised_from IS NULL OR jobs.promised_from <= ?::date)`,
        [OPEN_JOB_STATUSES, serviceFrom],
      );
    }
  });
  // The jobs in play are found once; the rest is fetched by those ids as one array parameter.
  // Promised and order dates are days on the job's own firm's clock (shared/local-dates.ts).
  let jobsOnce: Promise<(Job & { timeZone: string })[]> | undefined;
  const jobsList = () =>
    (jobsOnce ??= rows<Job & { timeZone: string }>(
      jobIdQuery.select(
        'jobs.id',
        'jobs.firm_id',
        'jobs.reference',
        'jobs.customer_name',
        'jobs.site_town',
        'jobs.site_postcode',
        'jobs.status',
        'jobs.installation_type',
        'jobs.promised_to',
        'jobs.ordered_on',
        knex.raw('(SELECT f.time_zone FROM firms f WHERE f.id = jobs.firm_id) AS time_zone'),
      ),
    ));
  const byJobs = async <T>(build: (jobIds: string[]) => { toKnexQuery(): Knex.QueryBuilder }) =>
    rows<T>(build((await jobsList()).map((j) => j.id)));
  const stagesOf = (jobIds: string[]) => knex.raw('SELECT id FROM stages WHERE job_id = ANY(?::bigint[])', [jobIds]);
  /** The visible resources `which` picks, with their firm's name, kind, zone and holiday region. */
  const resourceRows = (which: (q: ReturnType<typeof scoped<typeof Resource>>) => unknown) => {
    const q = scoped(Resource, actor, trx);
    which(q);
    return rows<ResourceRow>(
      q
        .join('firms', 'firms.id', 'resources.firm_id')
        .select(
          'resources.*',
          'firms.name as firmName',
          'firms.kind as firmKind',
          'firms.time_zone as timeZone',
          'firms.holiday_region as holidayRegion',
        )
        .orderBy('resources.id'),
    );
  };

  const [resources, members, calendarRows, exceptions, jobs, stages, deps, bookingRows, hires, rules, elsewhere] =
    await runQueries(trx !== undefined, [
      () => resourceRows((q) => q.where('resources.active', true)),
      () =>
        knex('crew_members').whereIn('crew_id', visibleResourceIds).select('crew_id', 'person_id') as Promise<
          { crewId: string; personId: string }[]
        >,
      () =>
        rows<Calendar>(
          Calendar.query(trx)
            .whereIn('firm_id', knex('resources').select('firm_id').whereIn('id', visibleResourceIds) as never)
            .orderBy('id'),
        ),
      () =>
        rows<CalendarException>(
          scoped(CalendarException, actor, trx)
            .where('ends_at', '>', new Date(query.from - 30 * 86_400_000))
            .where('starts_at', '<', new Date(query.to + 60 * 86_400_000)),
        ),
      jobsList,
      () =>
        byJobs<Stage>((ids) =>
          scoped(Stage, actor, trx)
            .whereRaw('stages.job_id = ANY(?::bigint[])', [ids])
            .select(
              'stages.id',
              'stages.job_id',
              'stages.kind',
              'stages.name',
              'stages.sequence',
              'stages.duration_minutes',
              'stages.requirements',
              'stages.cure',
              'stages.may_continue_next_day',
              'stages.just_in_time',
              'stages.notice',
            )
            .orderBy(['stages.job_id', 'stages.sequence']),
        ),
      () =>
        byJobs<DependencyModel>((ids) =>
          scoped(DependencyModel, actor, trx)
            .whereIn('dependencies.to_stage_id', stagesOf(ids) as never)
            .select(
              'dependencies.id',
              'dependencies.from_stage_id',
              'dependencies.to_stage_id',
              'dependencies.type',
              'dependencies.lag_amount',
              'dependencies.lag_unit',
              'dependencies.waits_for_cure',
            ),
        ),
      () =>
        byJobs<Booking & { startMs: number; endMs: number }>((ids) =>
          scoped(Booking, actor, trx)
            .where((w) =>
              w.whereIn('bookings.stage_id', stagesOf(ids) as never).orWhere(bookingDuring(knex, 'bookings', from, to)),
            )
            .select(
              'bookings.id',
              'bookings.stage_id',
              'bookings.resource_id',
              'bookings.state',
              'bookings.version',
              // Instants as epoch milliseconds straight from PostgreSQL: no Date per row.
              knex.raw('(extract(epoch from bookings.starts_at) * 1000)::float8 AS start_ms'),
              knex.raw('(extract(epoch from bookings.ends_at) * 1000)::float8 AS end_ms'),
            ),
        ),
      () =>
        rows<HireModel>(scoped(HireModel, actor, trx).whereIn('hire_periods.resource_id', visibleResourceIds as never)),
      () =>
        reach === 'installer-office'
          ? rows<LeadModel>(scoped(LeadModel, actor, trx))
          : Promise.resolve([] as LeadModel[]),
      // Bookings on visible partner resources by stages we may not see (another installer's on a
      // shared partner), once sent: they block the slot, nothing more is told (not even their ids).
      () =>
        reach === 'installer-office'
          ? (knex('bookings as b')
              .join('stages as s', 's.id', 'b.stage_id')
              .join('jobs as j', 'j.id', 's.job_id')
              .whereIn(
                'b.resource_id',
                knex('resources').select('id').whereIn('id', visibleResourceIds).whereNot('firm_id', actor.firmId),
              )
              .whereNot('j.firm_id', actor.firmId)
              .whereIn('b.state', ELSEWHERE_BLOCKING_STATES)
              .where(bookingDuring(knex, 'b', from, to))
              .select('b.resource_id as resourceId', 'b.starts_at as startsAt', 'b.ends_at as endsAt') as Promise<
              { resourceId: string; startsAt: Date; endsAt: Date }[]
            >)
          : Promise.resolve([]),
    ] as const);

  // A resource taken off the books stays on the board for the bookings it had that the board loads
  // (in the window, or on a job in play): without it those bookings would point at nothing.
  const listed = new Set(resources.map((r) => r.id));
  const gone = [...new Set(bookingRows.map((b) => b.resourceId))].filter((id) => !listed.has(id));
  if (gone.length) {
    const retired = await resourceRows((q) => q.where('resources.active', false).whereIn('resources.id', gone));
    resources.push(...retired);
    // The working calendars of a firm whose every other resource is off the books too.
    const haveCalendars = new Set(calendarRows.map((c) => c.firmId));
    const firmsWithout = [...new Set(retired.map((r) => r.firmId))].filter((f) => !haveCalendars.has(f));
    if (firmsWithout.length)
      calendarRows.push(...(await rows<Calendar>(Calendar.query(trx).whereIn('firm_id', firmsWithout).orderBy('id'))));
  }
  const visibleBookings = new Map(bookingRows.map((b) => [b.id, b]));
  const jobById = new Map(jobs.map((j) => [j.id, j]));
  const stageById = new Map(stages.map((s) => [s.id, s]));

  // Calendars: the firm's calendar as stored, plus one per resource with absences.
  const firmOf = new Map(resources.map((r) => [r.firmId, r]));
  const calendars: BoardCalendar[] = [];
  /** A closure or absence as the board draws it, with why only where the read policy tells it. */
  const closureOf = (e: CalendarException, ownerFirmId: string): BoardClosure => {
    const reason = closureReasonFor(actor, ownerFirmId, e.reason);
    return { start: e.startsAt.getTime(), end: e.endsAt.getTime(), ...(reason === undefined ? {} : { reason }) };
  };
  const closuresOf = (calendarId: string, ownerFirmId: string) =>
    exceptions.filter((e) => e.calendarId === calendarId).map((e) => closureOf(e, ownerFirmId));
  const defaultCalendarOfFirm = new Map<string, string>();
  for (const c of calendarRows) {
    const firm = firmOf.get(c.firmId);
    if (!firm) continue;
    if (!defaultCalendarOfFirm.has(c.firmId)) defaultCalendarOfFirm.set(c.firmId, c.id);
    const name = calendarNameFor(actor, c.firmId, c.name);
    calendars.push({
      id: c.id,
      ...(name === undefined ? {} : { name }),
      timeZone: firm.timeZone,
      weekly: engineWeekly(c.weeklyHours),
      holidayRegion: holidayRegionOf(firm.holidayRegion),
      holidays: holidaysFor(holidayRegionOf(firm.holidayRegion), query),
      closures: closuresOf(c.id, c.firmId),
    });
  }
  const calendarById = new Map(calendars.map((c) => [c.id, c]));
  const personIdsOf = new Map<string, string[]>();
  for (const m of members)
    personIdsOf.set(String(m.crewId), [...(personIdsOf.get(String(m.crewId)) ?? []), String(m.personId)]);

  const boardResources: BoardResource[] = resources.map((r) => {
    let calendarId = r.calendarId ?? defaultCalendarOfFirm.get(r.firmId) ?? '';
    const absences = exceptions.filter((e) => e.resourceId === r.id);
    const base = calendarById.get(calendarId);
    if (base && absences.length) {
      const own = {
        ...base,
        id: `${calendarId}+r${r.id}`,
        closures: [...(base.closures ?? []), ...absences.map((e) => closureOf(e, r.firmId))],
      };
      calendars.push(own);
      calendarId = own.id;
    }
    return {
      id: r.id,
      firmId: r.firmId,
      category: r.category,
      kind: r.kind,
      calendarId,
      hired: r.ownership === 'hired',
      personIds: personIdsOf.get(r.id) ?? [],
      name: r.name,
      firmName: r.firmName,
      firmKind: r.firmKind,
      ownership: r.firmId === actor.firmId ? r.ownership : 'partner',
      ...(r.active ? {} : { retired: true }),
    };
  });

  const bookings: BoardBooking[] = [...visibleBookings.values()]
    .filter((b) => stageById.has(b.stageId))
    .map((b) => ({
      id: b.id,
      stageId: b.stageId,
      resourceId: b.resourceId,
      start: b.startMs,
      end: b.endMs,
      state: b.state,
      version: b.version,
      installerFirmId: jobById.get(stageById.get(b.stageId)!.jobId)!.firmId,
    }));
  // Partners' answers: requests gone unanswered too long, times they proposed instead, and declines.
  const asked = bookings.filter((b) => b.state === 'sent' || b.state === 'declined');
  if (asked.length) {
    const answered = await withAnswers(
      knex,
      asked.map((b) => ({ id: b.id, version: b.version ?? 1, state: b.state })),
    );
    const byId = new Map(answered.map((a) => [a.id, a]));
    for (const b of asked) {
      const a = byId.get(b.id);
      b.overdue = a?.overdue ?? false;
      b.proposal =
        a?.answer?.action === 'propose' &&
        a.answer.proposalStatus === 'open' &&
        a.answer.proposedStart &&
        a.answer.proposedEnd
          ? { start: Date.parse(a.answer.proposedStart), end: Date.parse(a.answer.proposedEnd) }
          : null;
      if (b.state === 'declined') {
        b.declined =
          a?.answer?.action === 'decline'
            ? {
                at: Date.parse(a.answer.at),
                via: a.answer.via,
                reason: answerReasonFor(actor, b.installerFirmId, a.answer.reason),
              }
            : null;
      }
    }
  }
  // A cure counts from the site's weather: its forecast, else the seasonal assumption (cure-temperatures.ts).
  const cureOf = await cureRulesFromWeather(knex, {
    stages,
    jobs,
    bookings: [...visibleBookings.values()],
    now: query.now,
  });
  const boardStages: BoardStage[] = stages.map((s) => ({
    id: s.id,
    jobId: s.jobId,
    kind: s.kind,
    name: s.name,
    durationMinutes: s.durationMinutes,
    requirements: s.requirements,
    cure: cureOf.get(s.id) ?? s.cure,
    sequence: s.sequence,
    mayContinueNextDay: s.mayContinueNextDay,
    justInTime: s.justInTime,
  }));
  const boardJobs: BoardJob[] = jobs.map((j) => ({
    id: j.id,
    firmId: j.firmId,
    reference: j.reference,
    customerName: boardCustomerName(actor, j.customerName),
    siteTown: j.siteTown,
    sitePostcode: j.sitePostcode,
    status: j.status,
    installationType: j.installationType,
    promisedBy: j.promisedTo ? promisedDeadline(j.promisedTo, j.timeZone) : null,
    orderedAt: j.orderedOn ? orderedFrom(j.orderedOn, j.timeZone) : null,
  }));
  if (elsewhere.length) {
    boardJobs.push({
      id: ELSEWHERE_JOB_ID,
      firmId: ELSEWHERE_JOB_ID,
      reference: '',
      customerName: '',
      siteTown: '',
      status: 'planned',
      installationType: 'slab',
      promisedBy: null,
      orderedAt: null,
    });
    const blocks = busyElsewhere(
      elsewhere.map((e) => ({
        resourceId: String(e.resourceId),
        start: e.startsAt.getTime(),
        end: e.endsAt.getTime(),
      })),
    );
    blocks.forEach((e, n) => {
      const stageId = elsewhereStageId(n + 1);
      boardStages.push({
        id: stageId,
        jobId: ELSEWHERE_JOB_ID,
        kind: 'elsewhere',
        name: 'Busy elsewhere',
        durationMinutes: Math.max(1, Math.round((e.end - e.start) / 60_000)),
        requirements: [],
        cure: null,
        sequence: 0,
      });
      bookings.push({
        id: elsewhereBookingId(n + 1),
        stageId,
        resourceId: e.resourceId,
        start: e.start,
        end: e.end,
        state: ELSEWHERE_STATE,
        installerFirmId: ELSEWHERE_JOB_ID,
        elsewhere: true,
      });
    });
  }
  const dependencies: Dependency[] = deps
    .filter((d) => stageById.has(d.toStageId))
    .map((d) => ({
      id: d.id,
      fromStageId: d.fromStageId,
      toStageId: d.toStageId,
      type: d.type,
      lag: { amount: Number(d.lagAmount), unit: d.lagUnit },
      ...(d.waitsForCure ? { waitsForCure: true } : {}),
    }));
  const hirePeriods: HirePeriod[] = hires.map((h) => ({
    id: h.id,
    resourceId: h.resourceId,
    onHire: h.onHireAt.getTime(),
    offHire: h.offHireAt.getTime(),
    dayRatePence: h.dayRatePence,
  }));
  const leadTimeRules: LeadTimeRule[] = rules.map((r) => ({
    appliesTo: {
      ...(r.resourceKind ? { resourceKind: r.resourceKind } : {}),
      ...(r.stageKind ? { stageKind: r.stageKind } : {}),
    },
    workingDays: r.workingDays,
    from: r.countedFrom,
  }));
  // Each stage's own notice from its template (the crane firm's, the maker's lead time), checked the same way.
  if (reach === 'installer-office') {
    for (const s of stages) {
      if (!s.notice) continue;
      leadTimeRules.push({
        appliesTo: { stageId: s.id, ...(s.notice.resourceKind ? { resourceKind: s.notice.resourceKind } : {}) },
        workingDays: s.notice.workingDays,
        from: s.notice.countedFrom,
        ...(s.notice.reason ? { reason: s.notice.reason } : {}),
      });
    }
  }

  return {
    from: query.from,
    to: query.to,
    now: query.now,
    firmId: actor.firmId,
    resources: boardResources,
    calendars,
    jobs: boardJobs,
    stages: boardStages,
    dependencies,
    bookings,
    hirePeriods,
    leadTimeRules,
  };
}
