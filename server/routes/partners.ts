import type { Knex } from 'knex';
import type { RouteTable } from './table.ts';
import { bookingLimitsOf, type Config } from '../config.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { AssignPerson, CreateInvitation, PartnerAnswer, SlotQuery, VersionBody } from '../../shared/schemas/answers.ts';
import { ConfirmationsService } from '../services/confirmations.ts';
import { PartnerSlotsService } from '../services/partner-slots.ts';
import { FeedsService } from '../services/feeds.ts';
import { InvitationsService } from '../services/invitations.ts';
import { ConflictError } from '../errors.ts';

export interface PartnerRouteDeps {
  knex: Knex;
  config: Config;
  now?: () => number;
}

/**
 * Requests to partner firms and their answers (the scheduler's side and the partner's own pages),
 * per-person calendar feeds and invitations: one line a route, each naming who may call it.
 */
export function partnerRoutes(table: RouteTable, { knex, config, now = Date.now }: PartnerRouteDeps): void {
  const confirmations = new ConfirmationsService(knex, now, bookingLimitsOf(config));
  const slots = new PartnerSlotsService(knex, now, bookingLimitsOf(config));
  const feeds = new FeedsService(knex, config.PUBLIC_URL);
  const invitations = new InvitationsService(knex, now);
  const id = (params: unknown) => parse(IdParams, params, 'params').id;

  table
    .post('/api/bookings/:id/publish', 'bookings:write', async (req, res) => {
      res.json(await confirmations.publish(req.actor!, id(req.params), parse(VersionBody, req.body).version));
    })
    .post('/api/bookings/:id/cancel', 'bookings:write', async (req, res) => {
      res.json(await confirmations.cancel(req.actor!, id(req.params), parse(VersionBody, req.body).version));
    })
    .post('/api/bookings/:id/proposal/accept', 'bookings:write', async (req, res) => {
      res.json(await confirmations.acceptProposal(req.actor!, id(req.params), parse(VersionBody, req.body).version));
    })
    .post('/api/bookings/:id/proposal/refuse', 'bookings:write', async (req, res) => {
      res.json(await confirmations.refuseProposal(req.actor!, id(req.params), parse(VersionBody, req.body).version));
    })
    .get('/api/partner/slots', 'slots:read', async (req, res) => {
      const { from } = parse(SlotQuery, req.query, 'query');
      res.json({ items: await slots.list(req.actor!, new Date(from ?? now())) });
    })
    .post('/api/partner/slots/:id/answer', 'bookings:answer', async (req, res) => {
      const slotId = id(req.params);
      const outcome = await confirmations.answerAsPartner(req.actor!, slotId, parse(PartnerAnswer, req.body));
      if (outcome.result === 'closed')
        throw new ConflictError(`This slot is ${outcome.booking.state}; there is nothing to answer.`, {
          code: 'not-awaiting-answer',
        });
      if (outcome.result === 'taken')
        throw new ConflictError('That time was taken meanwhile: the resource is confirmed elsewhere then.', {
          code: 'double-booked',
        });
      const slot = (await slots.list(req.actor!, new Date(0))).find((s) => s.id === slotId);
      res.json({ result: outcome.result, slot: slot ?? null });
    })
    .put('/api/partner/slots/:id/person', 'bookings:answer', async (req, res) => {
      const { resourceId, version } = parse(AssignPerson, req.body);
      res.json(await slots.assignPerson(req.actor!, id(req.params), resourceId, version));
    })
    .post('/api/partner/people/:id/feed', 'bookings:answer', async (req, res) => {
      res.status(201).json(await feeds.rotate(req.actor!, id(req.params)));
    })
    .delete('/api/partner/people/:id/feed', 'bookings:answer', async (req, res) => {
      await feeds.revoke(req.actor!, id(req.params));
      res.status(204).end();
    })
    .get('/api/firm/invitations', 'firm:manage', async (req, res) => {
      res.json({ items: await invitations.list(req.actor!) });
    })
    .post('/api/firm/invitations', 'firm:manage', async (req, res) => {
      res.status(201).json(await invitations.create(req.actor!, parse(CreateInvitation, req.body)));
    })
    .delete('/api/firm/invitations/:id', 'firm:manage', async (req, res) => {
      res.json(await invitations.withdraw(req.actor!, id(req.params)));
    });
}
