import type { Knex } from 'knex';
import type { Response } from 'express';
import type { RouteTable } from './table.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { ReportQuery } from '../../shared/schemas/reports.ts';
import { CreateHirePeriod, UpdateHirePeriod } from '../../shared/schemas/hire.ts';
import { ReportsService, type ReportSpan } from '../services/reports.ts';
import { HirePeriodsService } from '../services/hire-periods.ts';

export interface ReportRouteDeps { knex: Knex; now?: () => number }

const spanOf = (query: unknown): ReportSpan => {
  const { from, to } = parse(ReportQuery, query, 'query');
  return { from: Date.parse(from), to: Date.parse(to) };
};

function sendCsv(res: Response, name: string, span: ReportSpan, body: string): void {
  const day = (t: number) => new Date(t).toISOString().slice(0, 10);
  res.type('text/csv; charset=utf-8')
    .set('Content-Disposition', `attachment; filename="waterline-${name}-${day(span.from)}-to-${day(span.to)}.csv"`)
    .send(body);
}

/** The manager's reports (and their CSV) and the hire periods the manager records and approves. */
export function reportRoutes(table: RouteTable, { knex, now = Date.now }: ReportRouteDeps): void {
  const reports = new ReportsService(knex, now);
  const hires = new HirePeriodsService(knex);

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
    });
}
