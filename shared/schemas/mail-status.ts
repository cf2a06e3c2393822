import { z } from 'zod';
import { Id } from './common.ts';

/** GET /api/mail/undelivered: the firm's e-mails that did not go, optionally one job's. */
export const UndeliveredMailQuery = z.object({ jobId: Id.optional() });
export type UndeliveredMailQuery = z.infer<typeof UndeliveredMailQuery>;

/** POST /api/mail/send-again: hands one undelivered e-mail (its outbox row) back to be sent. */
export const SendMailAgain = z.object({ id: Id });
export type SendMailAgain = z.infer<typeof SendMailAgain>;

/** One e-mail the office should know did not go, in plain words. */
export interface UndeliveredMail {
  id: string;
  /** failed: tried and given up; waiting: not sent for longer than the list's waitingAfterMinutes. */
  state: 'failed' | 'waiting';
  kind: string;
  /** Who it was for, e.g. "Fellside Crane Hire (bookings@fellside.example)". */
  to: string;
  /** What it was about: its subject, or the kind of message and the job. */
  about: string;
  jobId: string | null;
  jobReference: string | null;
  createdAt: string;
  /** When it was last tried (or handed to the queue). */
  lastTriedAt: string;
  attempts: number;
  /** Why, in plain words. */
  reason: string;
  /** The mail server's own words, for whoever looks after it (never shown alone). */
  detail: string | null;
}

export interface UndeliveredMailList {
  items: UndeliveredMail[];
  total: number;
  waitingAfterMinutes: number;
}

/** What "Send again" answers: requeued is false when it was already on its way (or sent). */
export interface SendAgainResult {
  id: string;
  status: 'pending' | 'queued' | 'sent';
  requeued: boolean;
}
