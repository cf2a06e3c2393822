import type { Knex } from 'knex';
import type { Request } from 'express';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import type { BookingLimits } from '../services/booking-writes.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { PutServicePlan, SignHandover } from '../../shared/schemas/handover.ts';
import { HandoverService } from '../services/handover.ts';
import { S3ObjectStore, type ObjectStore } from '../storage/object-store.ts';

export interface HandoverDeps {
  knex: Knex;
  config: Config;
  store?: ObjectStore;
  now?: () => number;
  limits?: BookingLimits;
}

/**
 * The handover with the householder and the firm's service plan. Signing marks the handover stage
 * done, so it takes the progress permission (crew on the job, owner, scheduler); the plan is the owner's.
 */
export function handoverRoutes(
  table: RouteTable,
  { knex, config, store: given, now = Date.now, limits }: HandoverDeps,
): { close(): void } {
  const store = given ?? new S3ObjectStore(config);
  const handovers = new HandoverService(knex, store, now, limits);
  const id = (req: Request) => parse(IdParams, req.params, 'params').id;

  table
    .get('/api/jobs/:id/handover', 'jobs:read', async (req, res) => {
      res.json(await handovers.get(req.actor!, id(req)));
    })
    .post('/api/jobs/:id/handover', 'bookings:progress', async (req, res) => {
      const jobId = id(req);
      // Another firm's job is not there (404) whatever the body holds.
      await handovers.visible(req.actor!, jobId);
      res.status(201).json(await handovers.sign(req.actor!, jobId, parse(SignHandover, req.body)));
    })
    .get('/api/firm/service-plan', 'jobs:read', async (req, res) => {
      res.json(await handovers.servicePlan(req.actor!));
    })
    .put('/api/firm/service-plan', 'firm:manage', async (req, res) => {
      res.json(await handovers.putServicePlan(req.actor!, parse(PutServicePlan, req.body)));
    });

  return { close: () => store.close() };
}
