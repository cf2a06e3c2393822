import type { Knex } from 'knex';
import { jobQuantities, type JobQuantities } from '../../shared/quantities/job-quantities.ts';
import type { PutSurvey, SurveyView } from '../../shared/schemas/surveys.ts';
import { Job, Unit, User } from '../models/index.ts';
import { Survey } from '../models/job-records.ts';
import { ConflictError, HttpError, NotFoundError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { findVisible, scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import type { TemplatesService } from './templates.ts';

function toView(s: Survey, surveyor: User | undefined): SurveyView {
  return {
    jobId: s.jobId,
    accessWidthMm: s.accessWidthMm,
    accessHeightMm: s.accessHeightMm,
    steps: s.steps,
    gates: s.gates,
    overheadObstructions: s.overheadObstructions,
    overheadNotes: s.overheadNotes,
    groundType: s.groundType as SurveyView['groundType'],
    buriedServicesNotes: s.buriedServicesNotes,
    craneStandingPosition: s.craneStandingPosition,
    unitFacing: s.unitFacing ?? null,
    craneDistanceToSetDownM: s.craneDistanceToSetDownM,
    consumerUnitDistanceM: s.consumerUnitDistanceM,
    consumerUnitLocation: s.consumerUnitLocation ?? null,
    mainFuseAmps: s.mainFuseAmps,
    drainage: s.drainage,
    craneRequired: s.craneRequired,
    excavatorSize: s.excavatorSize,
    evChargerAmps: s.evChargerAmps,
    electricShowerAmps: s.electricShowerAmps,
    heatPumpAmps: s.heatPumpAmps,
    otherLargeLoadAmps: s.otherLargeLoadAmps,
    otherLargeLoadNotes: s.otherLargeLoadNotes,
    earthingArrangement: s.earthingArrangement,
    hoseFlowLitresPerMinute: s.hoseFlowLitresPerMinute,
    siteLatitude: s.siteLatitude ?? null,
    siteLongitude: s.siteLongitude ?? null,
    notes: s.notes,
    surveyedAt: s.surveyedAt.toISOString(),
    surveyedBy: surveyor ? { id: surveyor.id, name: surveyor.name } : null,
    version: s.version,
  };
}

export interface QuantitiesView {
  unit: {
    id: string;
    model: string;
    lengthMm: number;
    widthMm: number;
    heightMm: number;
    dryWeightKg: number;
    filledWeightKg: number;
    waterLitres: number;
    supplies: { amps: number }[];
  };
  surveyed: boolean;
  quantities: JobQuantities;
}

/** Site surveys and the quantities worked out from them. */
export class SurveysService {
  constructor(
    private readonly knex: Knex,
    private readonly templates: TemplatesService,
  ) {}

  async find(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<Survey | undefined> {
    await findVisible(Job, actor, jobId, trx, 'job');
    return scoped(Survey, actor, trx).findOne({ jobId });
  }

  async get(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<SurveyView> {
    const survey = await this.find(actor, jobId, trx);
    if (!survey) throw new NotFoundError('survey for this job yet');
    const surveyor = survey.surveyedBy ? await User.query(trx ?? this.knex).findById(survey.surveyedBy) : undefined;
    return toView(survey, surveyor);
  }

  /** Records the survey; the first save moves an enquiry to "surveyed". Stale versions get 409. */
  async put(actor: Actor, jobId: string, input: PutSurvey): Promise<SurveyView> {
    return this.knex.transaction(async (trx) => {
      // The job's row queues its own saves; FOR NO KEY UPDATE lets writes that only point at it go on.
      const job = await scoped(Job, actor, trx).findById(jobId).forNoKeyUpdate();
      if (!job) throw new NotFoundError('job');
      const before = await scoped(Survey, actor, trx).findOne({ jobId }).forUpdate();
      if ((before?.version ?? 0) !== input.version) {
        throw new ConflictError('Someone else saved this survey since you loaded it.', {
          code: 'stale-version',
          current: before ? await this.get(actor, jobId, trx) : null,
        });
      }
      const { surveyedAt, ...fields } = input.survey;
      const values = {
        ...fields,
        surveyedBy: actor.userId,
        surveyedAt: surveyedAt ? new Date(surveyedAt) : new Date(),
        updatedAt: new Date(),
      };
      const after = before
        ? await Survey.query(trx).patchAndFetchById(before.id, {
            ...values,
            version: before.version + 1,
          } as Partial<Survey>)
        : await Survey.query(trx).insertAndFetch({ ...values, jobId, version: 1 } as Partial<Survey>);
      if (job.status === 'enquiry') {
        await Job.query(trx)
          .patch({ status: 'surveyed', version: job.version + 1 } as Partial<Job>)
          .where('id', job.id);
      }
      await recordChange(trx, actor, 'survey', after.id, before ? 'update' : 'create', before ?? null, after);
      return this.get(actor, jobId, trx);
    });
  }

  /** The job's quantities from its unit, its survey (if any) and the firm's settings. */
  async quantities(actor: Actor, jobId: string, trx?: Knex.Transaction): Promise<QuantitiesView> {
    const job = await findVisible(Job, actor, jobId, trx, 'job');
    // The job's own unit, read through the job: crew booked on it see it (not the firm's catalogue).
    const unit = job.unitId
      ? ((await scoped(Job, actor, trx)
          .where('jobs.id', jobId)
          .join('units', 'units.id', 'jobs.unit_id')
          .select('units.*')
          .first()) as unknown as Unit | undefined)
      : undefined;
    if (!unit)
      throw new HttpError(
        422,
        'no-unit',
        'The job has no unit yet',
        'Choose the unit on the job before working out quantities.',
      );
    const survey = await scoped(Survey, actor, trx).findOne({ jobId });
    const { quantities: settings } = await this.templates.settings(actor, trx);
    return {
      unit: {
        id: unit.id,
        model: unit.model,
        lengthMm: unit.lengthMm,
        widthMm: unit.widthMm,
        heightMm: unit.heightMm,
        dryWeightKg: unit.dryWeightKg,
        filledWeightKg: unit.filledWeightKg,
        waterLitres: unit.waterLitres,
        supplies: unit.supplies,
      },
      surveyed: Boolean(survey),
      quantities: jobQuantities({ installationType: job.installationType, unit, survey: survey ?? null, settings }),
    };
  }
}
