import type { Knex } from 'knex';
import multer from 'multer';
import type { Request, Response } from 'express';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { UpdateJob } from '../../shared/schemas/jobs.ts';
import { PutSurvey } from '../../shared/schemas/surveys.ts';
import { InstallationTypeParams, PutTemplate } from '../../shared/schemas/templates.ts';
import { PutFirmSettings } from '../../shared/schemas/firm-settings.ts';
import { DaySheetQuery } from '../../shared/schemas/day-sheets.ts';
import { MyWorkQuery } from '../../shared/schemas/my-work.ts';
import { NextReferenceQuery } from '../../shared/schemas/jobs.ts';
import { MAX_FILE_BYTES } from '../../shared/schemas/files.ts';
import { BadRequestError, HttpError } from '../errors.ts';
import { TemplatesService } from '../services/templates.ts';
import { SurveysService } from '../services/surveys.ts';
import { PlansService } from '../services/plans.ts';
import { JobEditsService } from '../services/job-edits.ts';
import { FilesService } from '../services/files.ts';
import { DaySheetsService } from '../services/day-sheets.ts';
import { JobsService } from '../services/jobs.ts';
import { S3ObjectStore, type ObjectStore } from '../storage/object-store.ts';

export interface JobWorkDeps {
  knex: Knex;
  config: Config;
  store?: ObjectStore;
  now?: () => number;
}

// One file, in memory (10 MB at most), parsed only after the route's access rule has let the caller in.
const receiveOne = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_FILE_BYTES, files: 1, fields: 5, parts: 6 },
  // Keep the name as sent, so a name with a path in it is refused rather than silently cut.
  preservePath: true,
  defParamCharset: 'utf8',
}).single('file');

/** Receives the one file of a multipart upload (field `file`), after the route's access rule and scope checks. */
export function receiveFile(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) =>
    receiveOne(req, res, (err: unknown) => {
      if (!err) return resolve();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE')
          return reject(
            new HttpError(413, 'file-too-large', 'The file is too large', 'A file may be at most 10 MB.', {
              errors: [{ field: 'file', message: 'is larger than 10 MB' }],
            }),
          );
        return reject(
          new BadRequestError('Send one file, in the field "file".', [
            { field: err.field ?? 'file', message: err.message },
          ]),
        );
      }
      reject(new BadRequestError('The upload could not be read.'));
    }),
  );
}

/**
 * Surveys, quantities, templates, planning, job edits, files and day sheets. Returns a handle that
 * releases the storage client when the app closes.
 */
export function jobWorkRoutes(
  table: RouteTable,
  { knex, config, store: given, now = Date.now }: JobWorkDeps,
): { close(): void; files: FilesService } {
  const store = given ?? new S3ObjectStore(config);
  const templates = new TemplatesService(knex);
  const surveys = new SurveysService(knex, templates);
  const plans = new PlansService(knex, templates);
  const edits = new JobEditsService(knex);
  const files = new FilesService(knex, store);
  const daySheets = new DaySheetsService(knex, now);
  const jobs = new JobsService(knex);
  const id = (req: Request) => parse(IdParams, req.params, 'params').id;

  table
    // The reference a new job would get: the firm's highest of the prefix + 1 (the form still lets it be changed).
    .get('/api/job-references/next', 'jobs:write', async (req, res) => {
      res.json(await jobs.nextReference(req.actor!, parse(NextReferenceQuery, req.query, 'query').prefix));
    })
    .patch('/api/jobs/:id', 'jobs:write', async (req, res) => {
      res.json(await edits.update(req.actor!, id(req), parse(UpdateJob, req.body)));
    })
    .get('/api/jobs/:id/survey', 'surveys:read', async (req, res) => {
      res.json(await surveys.get(req.actor!, id(req)));
    })
    .put('/api/jobs/:id/survey', 'surveys:write', async (req, res) => {
      const jobId = id(req);
      res.json(await surveys.put(req.actor!, jobId, parse(PutSurvey, req.body)));
    })
    .get('/api/jobs/:id/quantities', 'surveys:read', async (req, res) => {
      res.json(await surveys.quantities(req.actor!, id(req)));
    })
    .get('/api/jobs/:id/stages', 'jobs:read', async (req, res) => {
      res.json(await plans.stages(req.actor!, id(req)));
    })
    .post('/api/jobs/:id/plan', 'jobs:write', async (req, res) => {
      res.status(201).json(await plans.plan(req.actor!, id(req)));
    })
    .get('/api/jobs/:id/files', 'surveys:read', async (req, res) => {
      res.json({ items: await files.list(req.actor!, id(req)) });
    })
    .post('/api/jobs/:id/files', 'surveys:write', async (req, res) => {
      const jobId = id(req);
      await receiveFile(req, res);
      if (!req.file) throw new BadRequestError('Choose a file to upload.', [{ field: 'file', message: 'is required' }]);
      res
        .status(201)
        .json(await files.upload(req.actor!, jobId, { buffer: req.file.buffer, originalName: req.file.originalname }));
    })
    .delete('/api/files/:id', 'jobs:write', async (req, res) => {
      await files.remove(req.actor!, id(req));
      res.status(204).end();
    })
    .get('/api/templates', 'jobs:read', async (req, res) => {
      res.json({ items: await templates.list(req.actor!) });
    })
    .put('/api/templates/:installationType', 'jobs:write', async (req, res) => {
      const { installationType } = parse(InstallationTypeParams, req.params, 'params');
      res.json(await templates.put(req.actor!, installationType, parse(PutTemplate, req.body)));
    })
    .get('/api/firm/settings', 'jobs:read', async (req, res) => {
      res.json(await templates.settings(req.actor!));
    })
    .put('/api/firm/settings', 'firm:manage', async (req, res) => {
      res.json(await templates.putSettings(req.actor!, parse(PutFirmSettings, req.body)));
    })
    .get('/api/day-sheets', 'day-sheets:read', async (req, res) => {
      const { date } = parse(DaySheetQuery, req.query, 'query');
      res.json(await daySheets.forDate(req.actor!, date));
    })
    // A partner firm's own day sheet, built from its slots (read-policy.ts decides what it shows).
    .get('/api/partner/day-sheets', 'slots:read', async (req, res) => {
      const { date } = parse(DaySheetQuery, req.query, 'query');
      res.json(await daySheets.forDate(req.actor!, date));
    })
    .get('/api/my-work', 'my-work:read', async (req, res) => {
      res.json(await daySheets.myWork(req.actor!, parse(MyWorkQuery, req.query, 'query')));
    });

  return { close: () => store.close(), files };
}
