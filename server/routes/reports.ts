import type { Knex } from 'knex';
import type { Response } from 'express';
import type { RouteTable } from './table.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { ReportQuery } from '../../shared/schemas/reports.ts';
import { CancelHirePeriod, CreateHirePeriod, UpdateHirePeriod } from '../../shared/schemas/hire.ts';
import { ReportsService, type ReportSpan } from '../services/reports.ts';
import { HirePeriodsService } from '../services/hire-periods.ts';
import { UTF8_BOM } from '../../shared/reports/csv.ts';

export interface ReportRouteDeps {
  knex: Knex;
  now?: () => number;
  publicUrl?: string;
  extraWorkingMinutes?: number;
}

const spanOf = (query: unknown): ReportSpan => {
  const { from, to } = parse(ReportQuery, query, 'query');
  return { from: Date.parse(from), to: Date.parse(to) };
};

/** A CSV download: UTF-8 with its byte order mark, so spreadsheets read "£" and names right. */
function sendCsv(res: Response, name: string, span: ReportSpan, body: string): void {
  const day = (t: number) => new Date(t).toISOString().slice(0, 10);
  res
    .type('text/csv; charset=utf-8')
    .set('Content-Disposition', `attachment; filename="waterline-${name}-${day(span.from)}-to-${day(span.to)}.csv"`)
    .send(Buffer.from(UTF8_BOM + body, 'utf8'));
}

/** The manager's reports (and their CSV) and the hire periods the manager records and approves. */
export function reportRoutes(
  table: RouteTable,
  { knex, now = Date.now, publicUrl, extraWorkingMinutes }: ReportRouteDeps,
): void {
  const reports = new ReportsService(knex, now, publicUrl, extraWorkingMinutes);
  const hires = new HirePeriodsService(knex, now);

  table
    .get('/api/reports/clashes', 'reports:read', async (req, res) => {
      res.json(await reports.clashes(req.actor!, spanOf(req.query)));
    })
    .get('/api/reports/clashes.csv', 'reports:read', async (req, res) => {
      const span = spanOf(req.query);
      sendCsv(res, 'clashes', span, await reports.clashesCsv(req.actor!, span));
    })
    .get('/api/reports/hire', 'reports:read', async (req, res) => {
      res.json(await reports.hire(req.actor!, spanOf(req.query)));
    })
    .get('/api/reports/hire.csv', 'reports:read', async (req, res) => {
      const span = spanOf(req.query);
      sendCsv(res, 'hire', span, await reports.hireCsv(req.actor!, span));
    })
    .get('/api/reports/utilisation', 'reports:read', async (req, res) => {
      res.json(await reports.utilisation(req.actor!, spanOf(req.query)));
    })
    .get('/api/reports/utilisation.csv', 'reports:read', async (req, res) => {
      const span = spanOf(req.query);
      sendCsv(res, 'utilisation', span, await reports.utilisationCsv(req.actor!, span));
    })
    .get('/api/reports/utilisation-summary.csv', 'reports:read', async (req, res) => {
      const span = spanOf(req.query);
      sendCsv(res, 'utilisation-summary', span, await reports.utilisationSummaryCsv(req.actor!, span));
    })
    .get('/api/reports/risks.csv', 'reports:read', async (req, res) => {
      const span = spanOf(req.query);
      sendCsv(res, 'jobs-at-risk', span, await reports.risksCsv(req.actor!, span));
    })
    .post('/api/hire-periods', 'hire:approve', async (req, res) => {
      res.status(201).json(await hires.create(req.actor!, parse(CreateHirePeriod, req.body)));
    })
    .patch('/api/hire-periods/:id', 'hire:approve', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await hires.update(req.actor!, id, parse(UpdateHirePeriod, req.body)));
    })
    .delete('/api/hire-periods/:id', 'hire:approve', async (req, res) => {
      const { id } = parse(IdParams, req.params, 'params');
      res.json(await hires.cancel(req.actor!, id, parse(CancelHirePeriod, req.query, 'query').version));
    });
}
