import type { Knex } from 'knex';
import type { RouteTable } from './table.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { CreateJob, JobQuery } from '../../shared/schemas/jobs.ts';
import {
  BookingRange,
  CompletionQuery,
  CreateBooking,
  CreateBookings,
  MarkProgress,
  MoveStage,
  RemoveBooking,
  UpdateBooking,
} from '../../shared/schemas/bookings.ts';
import { ChangeMemberRole, RemoveMember, SwitchFirm } from '../../shared/schemas/session.ts';
import { JobsService } from '../services/jobs.ts';
import { DirectoryService } from '../services/directory.ts';
import { AbsencesService } from '../services/absences.ts';
import { ResourceBooksService } from '../services/resource-books.ts';
import { CreateResource, RenameResource, SetCrewMembers } from '../../shared/schemas/resources.ts';
import { CreateAbsence, CreateClosure } from '../../shared/schemas/absences.ts';
import {
  CreateCalendar,
  PutCalendarHours,
  PutHolidayRegion,
  PutResourceCalendar,
  RenameCalendar,
} from '../../shared/schemas/working-week.ts';
import { WorkingWeekService } from '../services/working-week.ts';
import { BookingsService } from '../services/bookings.ts';
import { DEFAULT_BOOKING_LIMITS, type BookingLimits } from '../services/booking-writes.ts';
import { CompletionService } from '../services/completion.ts';
import { PlacementService } from '../services/placement.ts';
import { AutoPlaceRequest, SlotSearch, type PlanProgress } from '../../shared/schemas/placement.ts';
import { UndoService, type UndoContext, type UndoVerb } from '../services/undo.ts';
import { actorFor, sessionInfo } from '../services/session.ts';
import { MembersService } from '../services/members.ts';
import { loadBoard } from '../services/board.ts';
import { boardEtag, etagMatches } from '../services/board-version.ts';
import type { BoardStream } from '../services/board-stream.ts';
import { NotFoundError } from '../errors.ts';
import type { Health } from '../health.ts';

export interface ApiDeps {
  knex: Knex;
  health: Health;
  stream: BoardStream;
  fullcalendarLicenseKey: string;
  now?: () => number;
  limits?: BookingLimits;
  /** RELEASE_ID: one release's processes give the same board ETags. */
  release?: string;
}

/** The JSON API: one line a route, each naming who may call it. */
export function apiRoutes(
  table: RouteTable,
  { knex, health, stream, fullcalendarLicenseKey, now = Date.now, limits, release }: ApiDeps,
): void {
  const jobs = new JobsService(knex);
  const directory = new DirectoryService();
  const members = new MembersService(knex);
  const absences = new AbsencesService(knex);
  const workingWeek = new WorkingWeekService(knex, now);
  const books = new ResourceBooksService(knex, now);
  const bookings = new BookingsService(knex, now, limits);
  const completion = new CompletionService(knex, now);
  const placement = new PlacementService(knex, now, limits);
  const undo = new UndoService(knex, now, limits);
  // A board change goes on the undo stack of the session it was made in.
  const undoable = (req: { sessionID: string }, verb: UndoVerb): UndoContext => ({ sessionId: req.sessionID, verb });

  table
    // Liveness: the process answers. Restart it only when this fails.
    .get('/api/health/live', 'public', (_req, res) => {
      res.json({ status: 'ok' });
    })
    // Readiness: send traffic here unless the database is away (Redis down only degrades).
    .get('/api/health/ready', 'public', async (_req, res) => {
      const report = await health.check();
      res.status(report.ready ? 200 : 503).json(report);
    })
    .get('/api/health', 'public', async (_req, res) => {
      const report = await health.check();
      res.status(report.ready ? 200 : 503).json(report);
    })
    .get('/api/client-config', 'public', (_req, res) => {
      res.json({ fullcalendarLicenseKey });
    })
    .get('/api/board', 'board:read', async (req, res) => {
      const { from, to } = parse(BookingRange, req.query, 'query');
      const window = { from: Date.parse(from), to: Date.parse(to), now: now() };
      // Unchanged since the reader's copy → 304 without loading (the browser revalidates by itself).
      const etag = await boardEtag(knex, req.actor!, window, release);
      res.set({ ETag: etag, 'Cache-Control': 'private, no-cache' });
      if (etagMatches(req.get('If-None-Match'), etag)) {
        res.status(304).end();
        return;
      }
      // One connection, one snapshot: the loader's queries run one after another in a read-only
      // transaction, so a busy server serves boards in turn instead of interleaving them all.
      const board = await knex.transaction((trx) => loadBoard(trx, req.actor!, window), {
        readOnly: true,
        isolationLevel: 'repeatable read',
      });
      const { pastDays, futureDays } = limits ?? DEFAULT_BOOKING_LIMITS;
      res.json({ ...board, bookingWindow: { pastDays, futureDays } });
    })
    .get('/api/board/stream', 'board:read', async (req, res) => {
      await stream.open(req, res, req.actor!);
    })
    .get('/api/session', 'signed-in', async (req, res) => {
      res.json(await sessionInfo(knex, req.actor!, req.session.csrfToken ?? ''));
    })
    .put('/api/session/firm', 'signed-in', async (req, res) => {
      const { firmId } = parse(SwitchFirm, req.body);
      const actor = await actorFor(knex, req.actor!.userId, firmId);
      if (!actor || actor.firmId !== firmId) throw new NotFoundError('firm');
      req.session.firmId = firmId;
      res.json(await sessionInfo(knex, actor, req.session.csrfToken ?? ''));
    })
    .get('/api/firms', 'firms:read', async (req, res) => {
      res.json({ items: await directory.firms(req.actor!) });
    })
    .get('/api/firm/members', 'firm:manage', async (req, res) => {
      res.json({ items: await directory.members(req.actor!) });
    })
    .put('/api/firm/members/:id', 'firm:manage', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      const changed = await members.changeRole(req.actor!, id, parse(ChangeMemberRole, req.body));
      // Their open boards reconnect in the new role.
      stream.endMember(id, req.actor!.firmId);
      res.json(changed);
    })
    .delete('/api/firm/members/:id', 'firm:manage', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      await members.remove(req.actor!, id, parse(RemoveMember, req.query, 'query').role);
      stream.endMember(id, req.actor!.firmId);
      res.status(204).end();
    })
    .get('/api/resources', 'resources:read', async (req, res) => {
      res.json({ items: await directory.resources(req.actor!) });
    })
    .post('/api/resources', 'resources:write', async (req, res) => {
      res.status(201).json(await books.add(req.actor!, parse(CreateResource, req.body)));
    })
    .patch('/api/resources/:id', 'resources:write', async (req, res) => {
      res.json(
        await books.rename(req.actor!, parse(IdParams, req.params, 'params').id, parse(RenameResource, req.body)),
      );
    })
    .get('/api/resources/:id/members', 'resources:write', async (req, res) => {
      res.json(await books.members(req.actor!, parse(IdParams, req.params, 'params').id));
    })
    .put('/api/resources/:id/members', 'resources:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await books.setMembers(req.actor!, id, parse(SetCrewMembers, req.body)));
    })
    .get('/api/resources/retired', 'resources:write', async (req, res) => {
      res.json({ items: await books.retired(req.actor!) });
    })
    .post('/api/resources/:id/restore', 'resources:write', async (req, res) => {
      res.json(await books.restore(req.actor!, parse(IdParams, req.params, 'params').id));
    })
    .delete('/api/resources/:id', 'resources:write', async (req, res) => {
      await books.retire(req.actor!, parse(IdParams, req.params, 'params').id);
      res.status(204).end();
    })
    .get('/api/resources/:id/absences', 'resources:write', async (req, res) => {
      res.json({ items: await absences.list(req.actor!, parse(IdParams, req.params, 'params').id, now()) });
    })
    .post('/api/resources/:id/absences', 'resources:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.status(201).json(await absences.create(req.actor!, id, parse(CreateAbsence, req.body)));
    })
    .get('/api/firm/closures', 'resources:write', async (req, res) => {
      res.json({ items: await absences.listClosures(req.actor!, now()) });
    })
    .post('/api/firm/closures', 'resources:write', async (req, res) => {
      res.status(201).json(await absences.createClosure(req.actor!, parse(CreateClosure, req.body)));
    })
    .delete('/api/firm/closures/:id', 'resources:write', async (req, res) => {
      await absences.removeClosure(req.actor!, parse(IdParams, req.params, 'params').id);
      res.status(204).end();
    })
    .get('/api/firm/working-week', 'firm:manage', async (req, res) => {
      res.json(await workingWeek.get(req.actor!));
    })
    .put('/api/firm/calendars/:id', 'firm:manage', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await workingWeek.putHours(req.actor!, id, parse(PutCalendarHours, req.body)));
    })
    .post('/api/firm/calendars', 'firm:manage', async (req, res) => {
      res.status(201).json(await workingWeek.createCalendar(req.actor!, parse(CreateCalendar, req.body)));
    })
    .patch('/api/firm/calendars/:id', 'firm:manage', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await workingWeek.renameCalendar(req.actor!, id, parse(RenameCalendar, req.body)));
    })
    .delete('/api/firm/calendars/:id', 'firm:manage', async (req, res) => {
      await workingWeek.removeCalendar(req.actor!, parse(IdParams, req.params, 'params').id);
      res.status(204).end();
    })
    .put('/api/resources/:id/calendar', 'firm:manage', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await workingWeek.putResourceCalendar(req.actor!, id, parse(PutResourceCalendar, req.body)));
    })
    .put('/api/firm/holiday-region', 'firm:manage', async (req, res) => {
      res.json(await workingWeek.putHolidayRegion(req.actor!, parse(PutHolidayRegion, req.body)));
    })
    .delete('/api/absences/:id', 'resources:write', async (req, res) => {
      await absences.remove(req.actor!, parse(IdParams, req.params, 'params').id);
      res.status(204).end();
    })
    .get('/api/units', 'units:read', async (req, res) => {
      res.json({ items: await directory.units(req.actor!) });
    })
    .get('/api/jobs', 'jobs:read', async (req, res) => {
      res.json(await jobs.list(req.actor!, parse(JobQuery, req.query, 'query')));
    })
    .post('/api/jobs', 'jobs:write', async (req, res) => {
      res.status(201).json(await jobs.create(req.actor!, parse(CreateJob, req.body)));
    })
    .get('/api/jobs/:id', 'jobs:read', async (req, res) => {
      res.json(await jobs.get(req.actor!, parse(IdParams, req.params, 'params').id));
    })
    .get('/api/bookings', 'bookings:read', async (req, res) => {
      const { from, to } = parse(BookingRange, req.query, 'query');
      res.json({ items: await bookings.list(req.actor!, from, to) });
    })
    .post('/api/bookings', 'bookings:write', async (req, res) => {
      res.status(201).json(await bookings.create(req.actor!, parse(CreateBooking, req.body), undoable(req, 'book')));
    })
    .get('/api/bookings/:id', 'bookings:read', async (req, res) => {
      res.json(await bookings.get(req.actor!, parse(IdParams, req.params, 'params').id));
    })
    .post('/api/bookings/batch', 'bookings:write', async (req, res) => {
      res
        .status(201)
        .json(await bookings.createMany(req.actor!, parse(CreateBookings, req.body).bookings, undoable(req, 'book')));
    })
    .patch('/api/bookings/:id', 'bookings:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await bookings.update(req.actor!, id, parse(UpdateBooking, req.body), undoable(req, 'change')));
    })
    .delete('/api/bookings/:id', 'bookings:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      await bookings.remove(
        req.actor!,
        id,
        parse(RemoveBooking, req.query, 'query').version,
        undoable(req, 'take off'),
      );
      res.status(204).end();
    })
    .post('/api/bookings/:id/progress', 'bookings:progress', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await bookings.markProgress(req.actor!, id, parse(MarkProgress, req.body)));
    })
    .post('/api/stages/:id/move', 'bookings:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await bookings.moveStage(req.actor!, id, parse(MoveStage, req.body), undoable(req, 'move')));
    })
    .get('/api/stages/:id/completion', 'bookings:write', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await completion.complete(req.actor!, id, parse(CompletionQuery, req.query, 'query')));
    })
    // Slots and auto-place on complete data (every booking the search can reach), proposed only:
    // the board books what is chosen through the batch route. The board's own write permission.
    .post('/api/plan/slots', 'bookings:write', async (req, res) => {
      res.json(await placement.slots(req.actor!, parse(SlotSearch, req.body)));
    })
    .post('/api/plan/auto-place', 'bookings:write', async (req, res) => {
      const input = parse(AutoPlaceRequest, req.body);
      // Progress goes to the caller's own board stream (the streams of this session), named by planId.
      const progress = input.planId
        ? (p: Omit<PlanProgress, 'planId'>) =>
            stream.tellSession(req.sessionID, 'plan-progress', { planId: input.planId, ...p })
        : undefined;
      res.json(await placement.autoPlace(req.actor!, input, progress));
    })
    .get('/api/undo', 'bookings:write', async (req, res) => {
      res.json({ items: await undo.list(req.actor!, req.sessionID) });
    })
    .post('/api/undo', 'bookings:write', async (req, res) => {
      const { undone, outcome } = await undo.undo(req.actor!, req.sessionID);
      res.json({
        undone,
        ...(await bookings.saved(req.actor!, outcome)),
        remaining: await undo.list(req.actor!, req.sessionID),
      });
    });
}
