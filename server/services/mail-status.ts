import type { Knex } from 'knex';
import type { Config } from '../config.ts';
import { Job } from '../models/index.ts';
import { NotFoundError } from '../errors.ts';
import { composeMessage, type OutboxKind, type OutboxPayload } from '../mail/messages.ts';
import { isOffice } from './read-policy.ts';
import { scoped } from './scope.ts';
import type { Actor } from './actor.ts';
import { recordChange } from './audit.ts';
import type { SendAgainResult, UndeliveredMail, UndeliveredMailList } from '../../shared/schemas/mail-status.ts';

/** Mail still waiting after this long counts as undelivered (its queue may be down). */
export const WAITING_TOO_LONG_MINUTES = 30;
/** The most a list shows: the oldest problems are not hidden behind newer ones beyond this. */
const LIST_LIMIT = 100;

const KIND_WORDS: Record<string, string> = {
  booking_request: 'Booking request',
  booking_update: 'Booking change',
  booking_reminder: 'Reminder of a booking request',
  booking_cancel: 'Booking cancellation',
  proposal_refused: 'Answer to a proposed time',
  customer_notice: 'Date notice to the householder',
  invitation: 'Invitation to join the firm',
  booking_declined: 'Notice of a declined booking',
  booking_confirmed: 'Notice of a confirmed booking',
  handover_pack: 'Handover pack',
  service_plan_notice: 'Service plan notice',
  payment_request: 'Payment request',
};

/**
 * Why an e-mail did not go, in words for the office (the raw error stays in `detail`). Mail servers
 * answer with a three-digit code (RFC 5321 §4.2): 4xx means "try later", 5xx "refused for good".
 */
export function plainReason(state: 'failed' | 'waiting', lastError: string | null): string {
  const e = lastError ?? '';
  if (!e)
    return state === 'waiting'
      ? 'It has not been sent yet: the mail queue may be down. It goes out by itself once the queue is back.'
      : 'It could not be sent.';
  if (/no booking address|no e-mail address/i.test(e))
    return "There is no e-mail address to send it to: add the firm's booking address (or the person's e-mail) and send it again.";
  if (/no customer e-mail/i.test(e))
    return 'The job has no e-mail address for the householder: add one on the job and send it again.';
  if (/no longer exists/i.test(e)) return 'What it was about has since been removed, so there is nothing to send.';
  if (
    /ECONNREFUSED|ECONNRESET|ETIMEDOUT|EHOSTUNREACH|ENOTFOUND|EAI_AGAIN|Greeting never received|Connection closed|connection timeout/i.test(
      e,
    )
  ) {
    return 'Our mail server could not be reached. Nothing is wrong with the address; send it again once mail is working.';
  }
  if (/\b552\b|mailbox full|quota/i.test(e))
    return "The recipient's mailbox is full. Send it again later, or call them.";
  if (/\b55[0134]\b|user unknown|no such user|mailbox unavailable|address rejected/i.test(e))
    return 'The receiving mail server refused the address: it may be misspelt or no longer in use. Check it and send again.';
  if (/\b5\d\d\b/.test(e)) return 'The receiving mail server refused the message.';
  if (/\b4\d\d\b/.test(e))
    return 'The receiving mail server kept asking us to try again later, and we ran out of tries.';
  return 'It could not be sent.';
}

interface Row {
  id: string;
  kind: OutboxKind;
  payload: OutboxPayload;
  status: string;
  attempts: number;
  lastError: string | null;
  createdAt: Date;
  nextAttemptAt: Date;
  jobId: string | null;
  jobReference: string | null;
  invitationEmail: string | null;
  resourceFirmName: string | null;
  customerName: string | null;
}

/**
 * The office's view of its e-mails that did not go: failed ones, and ones waiting longer than
 * WAITING_TOO_LONG_MINUTES, with a "Send again" that hands the same outbox row back to the relay.
 * Rows belong to the installer firm whose job (or invitation) caused them; only that firm's office
 * sees them (jobs through scoped(Job), invitations by firm; crew and partners see none).
 */
export class MailStatusService {
  constructor(
    private readonly knex: Knex,
    private readonly config: Pick<Config, 'PUBLIC_URL' | 'MAIL_FROM' | 'LINK_SECRET'>,
  ) {}

  /** The cut-off for "waiting too long", on the database's clock (the outbox's times are its). */
  private waitingSince(): Knex.Raw {
    return this.knex.raw('now() - make_interval(mins => ?)', [WAITING_TOO_LONG_MINUTES]);
  }

  /** Every outbox row with the job (or invitation) it belongs to, narrowed to the actor's firm. */
  private inScope(actor: Actor): Knex.QueryBuilder {
    const k = this.knex;
    const visibleJobs = scoped(Job, actor).select('jobs.id').toKnexQuery();
    return k('outbox as o')
      .leftJoin('bookings as b', 'b.id', k.raw("nullif(o.payload->>'bookingId', '')::bigint"))
      .leftJoin('stages as s', 's.id', 'b.stage_id')
      .leftJoin(
        'resources as r',
        'r.id',
        k.raw("coalesce(nullif(o.payload->>'resourceId', '')::bigint, b.resource_id)"),
      )
      .leftJoin('firms as rf', 'rf.id', 'r.firm_id')
      .leftJoin('audit_log as a', 'a.id', k.raw("nullif(o.payload->>'auditId', '')::bigint"))
      .leftJoin('stages as gone', 'gone.id', k.raw("nullif(a.before->>'stageId', '')::bigint"))
      .leftJoin('jobs as j', 'j.id', k.raw("coalesce(nullif(o.payload->>'jobId', '')::bigint, s.job_id, gone.job_id)"))
      .leftJoin('invitations as i', 'i.id', k.raw("nullif(o.payload->>'invitationId', '')::bigint"))
      .where((q) => {
        q.whereIn('j.id', visibleJobs).orWhere((w) => w.whereNull('j.id').where('i.firm_id', actor.firmId));
      });
  }

  /** Failed, or not sent for longer than WAITING_TOO_LONG_MINUTES. */
  private undelivered(actor: Actor): Knex.QueryBuilder {
    const before = this.waitingSince();
    return this.inScope(actor).where((q) => {
      q.where('o.status', 'failed').orWhere((w) =>
        w
          .whereIn('o.status', ['pending', 'queued'])
          .where('o.created_at', '<', before)
          .where('o.next_attempt_at', '<', before),
      );
    });
  }

  /** The firm's undelivered e-mails, newest problem first; `jobId` narrows them to one job's. */
  async list(actor: Actor, options: { jobId?: string } = {}): Promise<UndeliveredMailList> {
    if (!isOffice(actor)) throw new NotFoundError('list of e-mails');
    if (options.jobId && !(await scoped(Job, actor).findById(options.jobId))) throw new NotFoundError('job');
    const base = () => {
      const q = this.undelivered(actor);
      if (options.jobId) q.where('j.id', options.jobId);
      return q;
    };
    const [count] = await base().count<{ count: string }[]>('o.id as count');
    const rows = (await base()
      .orderBy('o.next_attempt_at', 'desc')
      .orderBy('o.id', 'desc')
      .limit(LIST_LIMIT)
      .select(
        'o.id',
        'o.kind',
        'o.payload',
        'o.status',
        'o.attempts',
        'o.last_error',
        'o.created_at',
        'o.next_attempt_at',
        'j.id as job_id',
        'j.reference as job_reference',
        'j.customer_name',
        'i.email as invitation_email',
        'rf.name as resource_firm_name',
      )) as Row[];
    const items: UndeliveredMail[] = [];
    for (const row of rows) items.push(await this.describe(row));
    return { items, total: Number(count?.count ?? 0), waitingAfterMinutes: WAITING_TOO_LONG_MINUTES };
  }

  /** Who and what, from the message as it would be written now (or, where it cannot be, from the rows). */
  private async describe(row: Row): Promise<UndeliveredMail> {
    const state = row.status === 'failed' ? 'failed' : 'waiting';
    const kindWords = KIND_WORDS[row.kind] ?? 'E-mail';
    let to: string | null = null;
    let subject: string | null = null;
    try {
      const mail = await composeMessage({ knex: this.knex, config: this.config }, row.kind, row.payload);
      if (!('skip' in mail)) {
        to = mail.to.join(', ');
        subject = mail.subject;
      }
    } catch {
      /* described from the rows below */
    }
    const who =
      row.invitationEmail ??
      (row.kind === 'customer_notice' ||
      row.kind === 'payment_request' ||
      row.kind === 'handover_pack' ||
      row.kind === 'service_plan_notice'
        ? row.customerName
        : ['booking_declined', 'booking_confirmed'].includes(row.kind)
          ? 'your schedulers'
          : row.resourceFirmName);
    const toText = who && to && who !== to ? `${who} (${to})` : (to ?? who ?? 'nobody yet');
    return {
      id: String(row.id),
      state,
      kind: row.kind,
      to: toText,
      about: subject ?? `${kindWords}${row.jobReference ? ` for job ${row.jobReference}` : ''}`,
      jobId: row.jobId ? String(row.jobId) : null,
      jobReference: row.jobReference,
      createdAt: row.createdAt.toISOString(),
      lastTriedAt: row.nextAttemptAt.toISOString(),
      attempts: row.attempts,
      reason: plainReason(state, row.lastError),
      detail: row.lastError ? row.lastError.slice(0, 300) : null,
    };
  }

  /**
   * Hands one undelivered e-mail back to the relay: the same outbox row (so still one message per
   * cause), pending again with a fresh count of attempts. Only a failed row, or one waiting too
   * long, is taken: a second click, or two at once, finds it already on its way and changes nothing.
   */
  async sendAgain(actor: Actor, id: string): Promise<SendAgainResult> {
    if (!isOffice(actor)) throw new NotFoundError('e-mail');
    // The row must be the actor's firm's, whatever its state (one just sent again is still theirs).
    if (!(await this.inScope(actor).where('o.id', id).first('o.id'))) throw new NotFoundError('e-mail');
    const before = this.waitingSince();
    // One UPDATE decides: a concurrent click waits for this row's lock, then no longer matches.
    const requeued = await this.knex.transaction(async (trx) => {
      const was = await trx('outbox').where('id', id).forUpdate().first('status', 'attempts');
      const updated = await trx('outbox')
        .where('id', id)
        .where((q) => {
          q.where('status', 'failed').orWhere((w) =>
            w.whereIn('status', ['pending', 'queued']).where('next_attempt_at', '<', before),
          );
        })
        .update({ status: 'pending', attempts: 0, next_attempt_at: trx.fn.now() })
        .returning('status');
      // Who sent it again, and from what: in the audit log with every other change.
      if (updated.length)
        await recordChange(trx, actor, 'outbox', String(id), 'update', was, { status: 'pending', attempts: 0 });
      return updated.length > 0;
    });
    if (requeued) return { id, status: 'pending', requeued: true };
    const current = (await this.knex('outbox').where('id', id).first('status')) as {
      status: 'pending' | 'queued' | 'sent';
    };
    return { id, status: current.status, requeued: false };
  }
}
