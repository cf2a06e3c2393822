import type { Knex } from 'knex';
import type { RouteTable } from './table.ts';
import type { Config } from '../config.ts';
import { parse } from '../middleware/validate.ts';
import { SendMailAgain, UndeliveredMailQuery } from '../../shared/schemas/mail-status.ts';
import { MailStatusService } from '../services/mail-status.ts';

/** The office's undelivered e-mails (job page, Reports) and "Send again". */
export function mailStatusRoutes(
  table: RouteTable,
  { knex, config }: { knex: Knex; config: Pick<Config, 'PUBLIC_URL' | 'MAIL_FROM' | 'LINK_SECRET'> },
): void {
  const mail = new MailStatusService(knex, config);
  table
    .get('/api/mail/undelivered', 'mail:read', async (req, res) => {
      res.json(await mail.list(req.actor!, parse(UndeliveredMailQuery, req.query, 'query')));
    })
    .post('/api/mail/send-again', 'mail:resend', async (req, res) => {
      res.json(await mail.sendAgain(req.actor!, parse(SendMailAgain, req.body ?? {}).id));
    });
}
