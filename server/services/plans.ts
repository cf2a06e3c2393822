import type { Knex } from 'knex';
import { progressTimes } from './progress-times.ts';
import { jobQuantities } from '../../shared/quantities/job-quantities.ts';
import { planFromTemplate, spoilAwayNote, type Plan } from '../../shared/templates/plan.ts';
import { cautionsFor } from '../../shared/cautions.ts';
import { Booking, Dependency, Job, Stage, Unit } from '../models/index.ts';
import { Survey } from '../models/job-records.ts';
import { ConflictError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { lockJobs } from './booking-writes.ts';
import { notifyJobChange } from './board-stream.ts';
import { latestAnswers } from './answer-views.ts';
import { answerReasonFor } from './read-policy.ts';
import type { TemplatesService } from './templates.ts';
import { plural } from '../../shared/plural.ts';

export interface PlanResult extends Plan {
  crane: { needed: boolean; reason: string };
  template: { name: string; isDefault: boolean; version: number };
}

/** Turns a job into stages and dependencies from the firm's template for its installation type. */
export class PlansService {
  constructor(
    private readonly knex: Knex,
    private readonly templates: TemplatesService,
  ) {}

  /**
   * Creates the job's stages and dependencies (unscheduled), replacing any earlier plan that has no
   * bookings yet. A job with booked stages is refused (409): re-planning would drop its bookings.
   */
  async plan(actor: Actor, jobId: string): Promise<PlanResult> {
    return this.knex.transaction(async (trx) => {
      if (!(await scoped(Job, actor, trx).findById(jobId))) throw new NotFoundError('job');
      // A booking of one of its stages under way holds the job in the write path: wait for it (taking
      // the job's lock first, as the write path does), and count it.
      await lockJobs(trx, [String(jobId)]);
      // The job's row queues its own saves; FOR NO KEY UPDATE lets writes that only point at it go on.
      const job = await scoped(Job, actor, trx).findById(jobId).forNoKeyUpdate();
      if (!job) throw new NotFoundError('job');
      const booked = await scoped(Booking, actor, trx)
        .whereIn('bookings.stage_id', Stage.query(trx).select('id').where('job_id', job.id))
        .resultSize();
      if (booked > 0) {
        throw new ConflictError(
          `This job already has ${plural(booked, 'booking')}; cancel them before planning it again.`,
          { code: 'already-booked', bookings: booked },
        );
      }
      const template = await this.templates.get(actor, job.installationType, trx);
      const unit = job.unitId ? await scoped(Unit, actor, trx).findById(job.unitId) : undefined;
      const survey = await scoped(Survey, actor, trx).findOne({ jobId: job.id });
      const { quantities: settings } = await this.templates.settings(actor, trx);
      const q = unit
        ? jobQuantities({ installationType: job.installationType, unit, survey: survey ?? null, settings })
        : null;
      // Without a unit there is nothing to measure against: plan for a crane until the survey says otherwise.
      const crane =
        q?.crane.result ??
        (survey?.craneRequired === false
          ? { needed: false, reason: 'The surveyor ruled out a crane.' }
          : { needed: true, reason: 'No unit chosen yet: planned with a crane until the access check can be made.' });
      const plan = planFromTemplate(template, {
        craneNeeded: crane.needed,
        excavationMinutes: q?.excavationTime?.result.minutes ?? null,
        makerLeadDays: unit?.makerLeadDays ?? null,
      });

      const old = await Stage.query(trx).where('job_id', job.id);
      if (old.length) await Stage.query(trx).delete().where('job_id', job.id);
      const ids = new Map<string, string>();
      for (const s of plan.stages) {
        // The notice is a rule the engine checks (stages.notice), not words in the notes.
        const notes = [
          s.kind === 'lift' || s.kind === 'placement' ? crane.reason : null,
          s.kind === 'excavation' ? `Duration ${s.durationSource}.` : null,
          // How many skips or grab-lorry loads to book with the haulier, from the dig's quantities.
          s.kind === 'spoil_away' && q?.spoil ? spoilAwayNote(q.spoil) : null,
        ]
          .filter(Boolean)
          .join(' ');
        const row = await Stage.query(trx).insert({
          jobId: job.id,
          kind: s.kind,
          name: s.name,
          sequence: s.sequence,
          durationMinutes: s.durationMinutes,
          requirements: JSON.stringify(s.requirements) as never,
          cure: (s.cure ? JSON.stringify(s.cure) : null) as never,
          mayContinueNextDay: s.mayContinueNextDay,
          justInTime: s.justInTime,
          notice: (s.leadTime ? JSON.stringify(s.leadTime) : null) as never,
          notes: notes || null,
        } as Partial<Stage>);
        ids.set(s.kind, row.id);
      }
      for (const l of plan.links) {
        await Dependency.query(trx).insert({
          fromStageId: ids.get(l.fromKind)!,
          toStageId: ids.get(l.toKind)!,
          type: l.type,
          lagAmount: l.lagAmount,
          lagUnit: l.lagUnit,
          waitsForCure: l.waitsForCure,
        } as Partial<Dependency>);
      }
      const status = job.status === 'enquiry' || job.status === 'surveyed' ? 'planned' : job.status;
      await Job.query(trx)
        .patch({ status, version: job.version + 1 } as Partial<Job>)
        .where('id', job.id);
      await recordChange(
        trx,
        actor,
        'job',
        job.id,
        'update',
        { stages: old.map((s) => s.kind) },
        { stages: plan.stages.map((s) => s.kind), crane },
      );
      // Open boards list the job's new stages waiting to be booked: they reload.
      await notifyJobChange(trx, String(job.id));
      return {
        ...plan,
        crane,
        template: { name: template.name, isDefault: template.isDefault, version: template.version },
      };
    });
  }

  /** The job's stages in order with their dependencies, bookings and cautions, for the job page. */
  async stages(actor: Actor, jobId: string) {
    const job = await findVisible(Job, actor, jobId, undefined, 'job');
    const stages = await scoped(Stage, actor).where('job_id', jobId).orderBy('sequence');
    const ids = stages.map((s) => s.id);
    const deps = await scoped(Dependency, actor).whereIn('to_stage_id', ids);
    const bookings = (await scoped(Booking, actor)
      .whereIn('stage_id', ids)
      .join('resources', 'resources.id', 'bookings.resource_id')
      .select('bookings.*', 'resources.name as resourceName', 'resources.kind as resourceKind')
      .orderBy('bookings.starts_at')) as (Booking & { resourceName: string; resourceKind: string })[];
    // A declined booking says why, in the partner's words, where the read policy lets this reader see it.
    const answers = await latestAnswers(
      this.knex,
      bookings.filter((b) => b.state === 'declined').map((b) => String(b.id)),
    );
    const declineReason = (id: string) => {
      const a = answers.get(String(id));
      return a?.action === 'decline' ? answerReasonFor(actor, String(job.firmId), a.reason) : null;
    };
    // On site since, done at: for the bookings that are there now (a step taken back no longer counts).
    const times = await progressTimes(
      this.knex,
      bookings.filter((b) => b.state === 'on_site' || b.state === 'done').map((b) => String(b.id)),
    );
    const kindOf = new Map(stages.map((s) => [s.id, s.kind]));
    // Predecessors by the name their stage actually has (a kind's words can differ from it).
    const nameOf = new Map(stages.map((s) => [s.id, s.name]));
    return {
      items: stages.map((s) => ({
        id: s.id,
        kind: s.kind,
        name: s.name,
        sequence: s.sequence,
        durationMinutes: s.durationMinutes,
        requirements: s.requirements,
        cure: s.cure,
        notice: s.notice,
        notes: s.notes,
        cautions: cautionsFor(s.kind),
        after: deps
          .filter((d) => d.toStageId === s.id)
          .map((d) => ({
            stageId: d.fromStageId,
            kind: kindOf.get(d.fromStageId) ?? null,
            name: nameOf.get(d.fromStageId) ?? null,
            type: d.type,
            lagAmount: d.lagAmount,
            lagUnit: d.lagUnit,
            waitsForCure: d.waitsForCure,
          })),
        bookings: bookings
          .filter((b) => b.stageId === s.id)
          .map((b) => ({
            id: b.id,
            resourceId: b.resourceId,
            resourceName: b.resourceName,
            resourceKind: b.resourceKind,
            startsAt: b.startsAt.toISOString(),
            endsAt: b.endsAt.toISOString(),
            state: b.state,
            ...(b.state === 'declined' ? { declineReason: declineReason(b.id) } : {}),
            ...(b.state === 'on_site' || b.state === 'done'
              ? {
                  arrivedAt: times.get(String(b.id))?.arrivedAt ?? null,
                  doneAt: b.state === 'done' ? (times.get(String(b.id))?.doneAt ?? null) : null,
                }
              : {}),
          })),
      })),
    };
  }
}
