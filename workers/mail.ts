import type { Knex } from 'knex';
import type { Logger } from 'pino';
import nodemailer, { type Transporter } from 'nodemailer';
import { UnrecoverableError, Worker, type ConnectionOptions, type Job } from 'bullmq';
import type { Config } from '../server/config.ts';
import { composeMessage, type OutboxKind, type OutboxPayload } from '../server/mail/messages.ts';
import { outboxMessageId } from '../server/mail/ids.ts';
import type { MailJobData } from './relay.ts';
import { QUEUE_PREFIX } from './connection.ts';
import { S3ObjectStore, type ObjectStore } from '../server/storage/object-store.ts';

export interface MailWorkerOptions {
  knex: Knex;
  config: Pick<Config, 'SMTP_URL' | 'MAIL_FROM' | 'PUBLIC_URL' | 'LINK_SECRET' | 'MAIL_QUEUE'> &
    Partial<Pick<Config, 'S3_ENDPOINT' | 'S3_BUCKET' | 'S3_ACCESS_KEY_ID' | 'S3_SECRET_ACCESS_KEY'>>;
  connection: ConnectionOptions;
  logger: Logger;
  concurrency?: number;
}

interface OutboxRow {
  id: string;
  idempotencyKey: string;
  kind: OutboxKind;
  payload: OutboxPayload;
  status: string;
}

export function createTransport(smtpUrl: string): Transporter {
  return nodemailer.createTransport({ url: smtpUrl, pool: true, maxConnections: 10, maxMessages: 500 } as never);
}

/**
 * Renders and sends one outbox row. Idempotent: a row already sent is not sent again; a booking
 * message whose version has moved on is settled without sending (its links would be dead).
 * An SMTP failure throws, and BullMQ retries with exponential back-off.
 */
export async function processMailJob(
  job: Pick<Job<MailJobData>, 'data'>,
  deps: { knex: Knex; config: MailWorkerOptions['config']; transport: Transporter; store?: ObjectStore },
): Promise<string> {
  const { knex, config, transport, store } = deps;
  const row = (await knex('outbox').where('id', job.data.outboxId).first()) as OutboxRow | undefined;
  if (!row) throw new UnrecoverableError(`no outbox row ${job.data.outboxId}`);
  if (row.status === 'sent') return 'already sent';
  const mail = await composeMessage({ knex, config, store }, row.kind, row.payload);
  if ('skip' in mail) {
    // Nobody to send to is the office's problem to see (failed); a superseded message is simply settled.
    const nobody = /no booking address|no customer e-mail|no longer exists/.test(mail.skip);
    await knex('outbox')
      .where('id', row.id)
      .update({ status: nobody ? 'failed' : 'sent', last_error: `not sent: ${mail.skip}` });
    return `skipped: ${mail.skip}`;
  }
  await sendOrExplain(transport, {
    from: config.MAIL_FROM,
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    // A stable Message-ID per outbox row lets a receiving server drop a resend after a crash; its
    // domain is this installation's host, so another installation's keys never collide with it.
    messageId: outboxMessageId(row.idempotencyKey, config.PUBLIC_URL),
    headers: { 'X-Waterline-Message': row.idempotencyKey },
    ...(mail.attachments?.length ? { attachments: mail.attachments } : {}),
    ...(mail.ics
      ? {
          icalEvent: {
            method: mail.ics.method,
            filename: mail.ics.method === 'CANCEL' ? 'cancel.ics' : 'invite.ics',
            content: mail.ics.content,
          },
        }
      : {}),
  });
  await knex('outbox')
    .where('id', row.id)
    .update({ status: 'sent', sent_at: new Date(), last_error: null, attempts: knex.raw('attempts + 1') });
  return 'sent';
}

/**
 * Sends through the pool. A refusal the mail server says is permanent (a 5xx reply: no such
 * mailbox, address refused) is not retried: the row shows failed at once for the office to see.
 * Anything else (a 4xx "try later", a connection refused or cut) throws for BullMQ's back-off.
 */
async function sendOrExplain(transport: Transporter, message: Parameters<Transporter['sendMail']>[0]): Promise<void> {
  try {
    await transport.sendMail(message);
  } catch (err) {
    const code = (err as { responseCode?: unknown }).responseCode;
    if (typeof code === 'number' && code >= 500 && code < 600) throw new UnrecoverableError((err as Error).message);
    throw err;
  }
}

/** The BullMQ worker for the mail queue, with its SMTP pool. */
export function createMailWorker(options: MailWorkerOptions): { worker: Worker<MailJobData>; close(): Promise<void> } {
  const { knex, config, logger } = options;
  const transport = createTransport(config.SMTP_URL);
  // Attachments (the handover pack) are read from the job files' storage.
  const store = config.S3_BUCKET
    ? new S3ObjectStore({
        S3_BUCKET: config.S3_BUCKET,
        S3_ENDPOINT: config.S3_ENDPOINT,
        S3_ACCESS_KEY_ID: config.S3_ACCESS_KEY_ID,
        S3_SECRET_ACCESS_KEY: config.S3_SECRET_ACCESS_KEY,
      })
    : undefined;
  const worker = new Worker<MailJobData>(
    config.MAIL_QUEUE,
    (job) => processMailJob(job, { knex, config, transport, store }),
    {
      connection: options.connection,
      prefix: QUEUE_PREFIX,
      concurrency: options.concurrency ?? 10,
    },
  );
  worker.on('error', (err) => logger.warn({ err }, 'mail worker lost Redis; it reconnects by itself'));
  worker.on('failed', (job, err) => {
    if (!job) return;
    const final = job.attemptsMade >= (job.opts.attempts ?? 1) || err instanceof UnrecoverableError;
    logger.warn(
      { err, outboxId: job.data.outboxId, attempt: job.attemptsMade, final },
      final ? 'e-mail failed for good' : 'e-mail failed; will retry',
    );
    void knex('outbox')
      .where('id', job.data.outboxId)
      .whereNot('status', 'sent')
      .update({
        status: final ? 'failed' : 'queued',
        attempts: job.attemptsMade,
        next_attempt_at: new Date(),
        last_error: String(err?.message ?? err).slice(0, 500),
      })
      .catch((e: unknown) => logger.error({ err: e }, 'could not record a mail failure'));
  });
  return {
    worker,
    async close() {
      await worker.close();
      transport.close();
      store?.close();
    },
  };
}
