import type { Knex } from 'knex';
import type { Logger } from 'pino';
import nodemailer, { type Transporter } from 'nodemailer';
import { UnrecoverableError, Worker, type ConnectionOptions, type Job } from 'bullmq';
import type { Config } from '../server/config.ts';
import { composeMessage, type OutboxKind, type OutboxPayload } from '../server/mail/messages.ts';
import { outboxMessageId } from '../server/mail/ids.ts';
import type { MailJobData } from './relay.ts';
import { QUEUE_PREFIX } from './connection.ts';

export interface MailWorkerOptions {
  knex: Knex;
  config: Pick<Config, 'SMTP_URL' | 'MAIL_FROM' | 'PUBLIC_URL' | 'LINK_SECRET' | 'MAIL_QUEUE'>;
  connection: ConnectionOptions;
  logger: Logger;
  concurrency?: number;
}

interface OutboxRow { id: string; idempotencyKey: string; kind: OutboxKind; payload: OutboxPayload; status: string }

export function createTransport(smtpUrl: string): Transporter {
  return nodemailer.createTransport({ url: smtpUrl, pool: true, maxConnections: 10, maxMessages: 500 } as never);
}

/**
 * Renders and sends one outbox row. Idempotent: a row already sent is not sent again; a booking
 * message whose version has moved on is settled without sending (its links would be dead).
 * An SMTP failure throws, and BullMQ retries with exponential back-off.
 */
export async function processMailJob(job: Pick<Job<MailJobData>, 'data'>, deps: { knex: Knex; config: MailWorkerOptions['config']; transport: Transporter }): Promise<string> {
  const { knex, config, transport } = deps;
  const row = await knex('outbox').where('id', job.data.outboxId).first() as OutboxRow | undefined;
  if (!row) throw new UnrecoverableError(`no outbox row ${job.data.outboxId}`);
  if (row.status === 'sent') return 'already sent';
  const mail = await composeMessage({ knex, config }, row.kind, row.payload);
  if ('skip' in mail) {
    // Nobody to send to is the office's problem to see (failed); a superseded message is simply settled.
    const nobody = /no booking address|no customer e-mail|no longer exists/.test(mail.skip);
    await knex('outbox').where('id', row.id).update({ status: nobody ? 'failed' : 'sent', last_error: `not sent: ${mail.skip}` });
    return `skipped: ${mail.skip}`;
  }
  await transport.sendMail({
    from: config.MAIL_FROM,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    // A stable Message-ID per outbox row lets a receiving server drop a resend after a crash; its
    // domain is this installation's host, so another installation's keys never collide with it.
    messageId: outboxMessageId(row.idempotencyKey, config.PUBLIC_URL),
    headers: { 'X-Waterline-Message': row.idempotencyKey },
    ...(mail.ics ? { icalEvent: { method: mail.ics.method, filename: mail.ics.method === 'CANCEL' ? 'cancel.ics' : 'invite.ics', content: mail.ics.content } } : {}),
  });
  await knex('outbox').where('id', row.id).update({ status: 'sent', sent_at: new Date(), last_error: null, attempts: knex.raw('attempts + 1') });
  return 'sent';
}

/** The BullMQ worker for the mail queue, with its SMTP pool. */
export function createMailWorker(options: MailWorkerOptions): { worker: Worker<MailJobData>; close(): Promise<void> } {
  const { knex, config, logger } = options;
  const transport = createTransport(config.SMTP_URL);
  const worker = new Worker<MailJobData>(config.MAIL_QUEUE, (job) => processMailJob(job, { knex, config, transport }), {
    connection: options.connection, prefix: QUEUE_PREFIX, concurrency: options.concurrency ?? 10,
  });
  worker.on('error', (err) => logger.warn({ err }, 'mail worker lost Redis; it reconnects by itself'));
  worker.on('failed', (job, err) => {
    if (!job) return;
    const final = job.attemptsMade >= (job.opts.attempts ?? 1) || err instanceof UnrecoverableError;
    logger.warn({ err, outboxId: job.data.outboxId, attempt: job.attemptsMade, final }, final ? 'e-mail failed for good' : 'e-mail failed; will retry');
    void knex('outbox').where('id', job.data.outboxId).whereNot('status', 'sent')
      .update({ status: final ? 'failed' : 'queued', attempts: job.attemptsMade, next_attempt_at: new Date(), last_error: String(err?.message ?? err).slice(0, 500) })
      .catch((e: unknown) => logger.error({ err: e }, 'could not record a mail failure'));
  });
  return {
    worker,
    async close() {
      await worker.close();
      transport.close();
    },
  };
}
