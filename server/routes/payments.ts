import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Request } from 'express';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import { parse } from '../middleware/validate.ts';
import { IdParams } from '../../shared/schemas/common.ts';
import { RequestPayment, SetPrice } from '../../shared/schemas/payments.ts';
import { PaymentsService, PaymentsUnavailableError } from '../services/payments.ts';
import { findVisible } from '../services/scope.ts';
import { Job } from '../models/index.ts';
import { paymentPage } from '../pages/payments.ts';

export interface PaymentRouteDeps {
  knex: Knex;
  config: Config;
  now?: () => number;
  log?: Logger;
}

/**
 * Deposits and balances. The office's routes check the job is theirs before reading the body, so
 * another firm's job is 404 whatever is sent. The webhook is public and proves itself with the
 * provider's signature (its body arrives raw: app.ts parses it before the JSON parser); the
 * householder's link is public and proves itself with its HMAC.
 */
export function paymentRoutes(
  table: RouteTable,
  { knex, config, now = Date.now, log }: PaymentRouteDeps,
): PaymentsService {
  const payments = new PaymentsService(knex, config, now, log);
  const job = async (req: Request) => {
    const { id } = parse(IdParams, req.params, 'params');
    await findVisible(Job, req.actor!, id, undefined, 'job');
    return id;
  };

  table
    .get('/api/jobs/:id/payments', 'payments:read', async (req, res) => {
      res.json(await payments.summary(req.actor!, await job(req)));
    })
    .put('/api/jobs/:id/price', 'payments:write', async (req, res) => {
      const id = await job(req);
      res.json(await payments.setPrice(req.actor!, id, parse(SetPrice, req.body)));
    })
    .post('/api/jobs/:id/payments/deposit', 'payments:write', async (req, res) => {
      const id = await job(req);
      res.status(201).json(await payments.requestDeposit(req.actor!, id, parse(RequestPayment, req.body).amountPence));
    })
    .post('/api/jobs/:id/payments/balance', 'payments:write', async (req, res) => {
      const id = await job(req);
      res
        .status(201)
        .json(await payments.requestBalanceAsOffice(req.actor!, id, parse(RequestPayment, req.body).amountPence));
    })
    .post('/api/jobs/:id/payments/deposit/cancel', 'payments:write', async (req, res) => {
      res.json(await payments.cancel(req.actor!, await job(req), 'deposit'));
    })
    .post('/api/jobs/:id/payments/balance/cancel', 'payments:write', async (req, res) => {
      res.json(await payments.cancel(req.actor!, await job(req), 'balance'));
    })
    // The provider's signed events (checkout completed or expired).
    .post('/api/payments/webhook', 'public', async (req, res) => {
      const raw = Buffer.isBuffer(req.body) ? req.body : Buffer.alloc(0);
      res.json(await payments.handleWebhook(raw, req.get('stripe-signature')));
    })
    // The householder's link from the e-mail: on to the provider's payment page, or a page saying where it stands.
    .get('/pay/:token', 'public', async (req, res) => {
      res.set('Cache-Control', 'no-store').set('Referrer-Policy', 'no-referrer');
      try {
        const result = await payments.openLink(String(req.params.token ?? ''));
        if ('redirect' in result) {
          res.redirect(303, result.redirect);
          return;
        }
        const shown = paymentPage(result.state, result.payment);
        res.status(shown.status).type('html').send(shown.html);
      } catch (error) {
        if (!(error instanceof PaymentsUnavailableError)) throw error;
        const shown = paymentPage('unavailable');
        res.status(shown.status).type('html').send(shown.html);
      }
    });
  return payments;
}
