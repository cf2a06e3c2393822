import express, { type Request, type Response } from 'express';
import type { Knex } from 'knex';
import type { RouteTable } from './table.ts';
import { bookingLimitsOf, type Config } from '../config.ts';
import {
  LinkError,
  LinkSigner,
  type AnswerAction,
  type AnswerClaims,
  type InviteClaims,
  type LinkRefusal,
} from '../services/links.ts';
import { ConfirmationsService, requestKeyOf } from '../services/confirmations.ts';
import { InvitationsService, type InvitationView } from '../services/invitations.ts';
import { FeedsService } from '../services/feeds.ts';
import { loadBookingFacts, type BookingFacts } from '../mail/facts.ts';
import { CertificateLinks, certificateLinkFor } from '../services/certificates.ts';
import { certificateSection } from '../pages/certificates.ts';
import { answerForm, answeredPage, closedPage, refusalPage, stalePage, takenPage, usedPage } from '../pages/answers.ts';
import { escapeHtml as e, page } from '../pages/page.ts';
import { z } from 'zod';
import { AnswerReason, DECLINE_REASON_CHOICES, reasonText } from '../../shared/schemas/answers.ts';
import { ROLE_LABELS } from '../../shared/permissions.ts';
import { answerLinkSeesSlot } from '../services/read-policy.ts';
import { parse } from '../middleware/validate.ts';
import { BadRequestError } from '../errors.ts';
import {
  dayNumber,
  isoDateOfDay,
  localDayOf,
  localToInstant,
  timeZoneOffset,
} from '../../shared/scheduler/time-zone.ts';

export interface AnswerRouteDeps {
  knex: Knex;
  config: Config;
  now?: () => number;
}

const formParser = express.urlencoded({ extended: false, limit: '4kb' });
const parseForm = (req: Request, res: Response) =>
  new Promise<void>((resolve, reject) => formParser(req, res, (err?: unknown) => (err ? reject(err) : resolve())));

const STATUS: Record<LinkRefusal | 'used' | 'gone', number> = {
  tampered: 400,
  'wrong-purpose': 400,
  expired: 410,
  used: 409,
  gone: 410,
};

const ReasonForm = z.object({ reason: AnswerReason.optional() });

/**
 * The reason a decline or proposal form sent: a quick choice (decline only) and the partner's own
 * words, joined, then checked like the app's (≤ 500 characters, one line, no control characters).
 * Bad input → 400 problem+json naming `reason` or `choice`.
 */
export function reasonOf(body: Record<string, unknown>): string | undefined {
  const choice = body.choice ?? '';
  if (choice !== '' && !(DECLINE_REASON_CHOICES as readonly unknown[]).includes(choice)) {
    throw new BadRequestError('The form has fields that are not valid.', [
      { field: 'choice', message: `must be one of: ${DECLINE_REASON_CHOICES.join(', ')}` },
    ]);
  }
  const text = body.reason ?? '';
  if (typeof text !== 'string')
    throw new BadRequestError('The form has fields that are not valid.', [
      { field: 'reason', message: 'must be one piece of text' },
    ]);
  return parse(ReasonForm, { reason: reasonText(choice as string, text) }).reason;
}

/**
 * 2026-10-06 + 08:30 in a zone → the instant, or null when the form's values are not a real date
 * and a time that exists there (30 February, or 01:30 on the morning the clocks go forward).
 */
export function instantOf(date: unknown, time: unknown, timeZone: string): Date | null {
  const d = typeof date === 'string' ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(date) : null;
  const t = typeof time === 'string' ? /^(\d{2}):(\d{2})$/.exec(time) : null;
  if (!d || !t || Number(t[1]) > 23 || Number(t[2]) > 59) return null;
  const day = dayNumber(Number(d[1]), Number(d[2]), Number(d[3]));
  if (isoDateOfDay(day) !== date) return null;
  const minute = Number(t[1]) * 60 + Number(t[2]);
  const instant = localToInstant(timeZone, day, minute);
  // A local time that does not exist is moved by the conversion: going back must give the same day and minute.
  if (
    localDayOf(timeZone, instant) !== day ||
    Math.round((instant + timeZoneOffset(timeZone, instant)) / 60_000) - day * 1440 !== minute
  )
    return null;
  return new Date(instant);
}

/**
 * Public pages behind the links in e-mails, for people without a session. A GET only shows a page
 * (mail scanners and link previews follow links); the page's form POSTs the one action the token
 * names. These POSTs are exempt from the session CSRF check (middleware/csrf.ts): the signed,
 * single-use token is the proof.
 */
export function answerRoutes(table: RouteTable, { knex, config, now = Date.now }: AnswerRouteDeps): void {
  const signer = new LinkSigner(config.LINK_SECRET);
  const confirmations = new ConfirmationsService(knex, now, bookingLimitsOf(config));
  const invitations = new InvitationsService(knex, now);
  const feeds = new FeedsService(knex, config.PUBLIC_URL);
  const certificateLinks = new CertificateLinks(config.LINK_SECRET);

  /** Below a confirmed electrical connection: where the electrician uploads the certificate later. */
  async function certificateAfter(f: BookingFacts): Promise<string> {
    const link = await certificateLinkFor(
      certificateLinks,
      config.PUBLIC_URL,
      {
        bookingId: f.booking.id,
        stageKind: f.stage.kind,
        state: f.booking.state,
        endsAt: f.booking.endsAt,
        partnerFirmId: f.resource.firmId,
      },
      new Date(now()),
    );
    return link ? certificateSection(link) : '';
  }

  /** A refusal, logged as an attempt; `html` in place of the reason's own page. */
  async function refuse(
    req: Request,
    res: Response,
    reason: LinkRefusal | 'used' | 'gone',
    jti?: string,
    html?: string,
  ): Promise<void> {
    const path = req.path.replace(/\/[^/]+$/, '/…');
    req.log?.warn({ reason, jti, path }, 'link refused');
    await knex('link_attempts').insert({ reason, path, jti: jti ?? null, ip: req.ip ?? null });
    res
      .status(STATUS[reason])
      .type('html')
      .send(html ?? refusalPage(reason, req.path.startsWith('/invite/') ? 'invite' : 'answer'));
  }

  /** Whether the link may see its slot as it is now (the read policy's answerLinkSeesSlot). */
  async function stillTheirs(c: AnswerClaims, facts: BookingFacts): Promise<boolean> {
    // booking_requests keeps the resource each request was sent for.
    const sentTo = await knex('booking_requests as q')
      .join('resources as r', 'r.id', 'q.resource_id')
      .where({ 'q.booking_id': c.bookingId, 'q.booking_version': c.version })
      .first<{ firmId: string } | undefined>('r.firm_id');
    return answerLinkSeesSlot({
      requestedFirmId: sentTo === undefined ? null : String(sentTo.firmId),
      bookingFirmId: String(facts.resource.firmId),
    });
  }

  /** A link of a slot no longer with the firm it was sent to: refused, saying nothing of the slot now. */
  const refuseNotTheirs = (req: Request, res: Response, c: AnswerClaims) =>
    refuse(
      req,
      res,
      'gone',
      c.jti,
      page(
        'This slot is no longer with your firm',
        `<p>${e('The installer has given this work to someone else, so its links no longer work. Nothing more is needed from you.')}</p>`,
        'refused',
      ),
    );

  /**
   * A link of a request answered already: refused (each request's links work once), with when and
   * how it was answered and the slot as it is now (see usedPage).
   */
  async function refuseUsed(req: Request, res: Response, c: AnswerClaims, facts: BookingFacts): Promise<void> {
    const answer = await knex('booking_answers')
      .where({ booking_id: c.bookingId, booking_version: c.version })
      .orderBy('created_at')
      .first<{ action: AnswerAction; createdAt: Date } | undefined>('action', 'created_at');
    const html = answer
      ? usedPage(facts, { action: answer.action, at: answer.createdAt }, await certificateAfter(facts))
      : undefined;
    return refuse(req, res, 'used', c.jti, html);
  }

  async function claims(req: Request, res: Response, purpose: 'answer'): Promise<AnswerClaims | null>;
  async function claims(req: Request, res: Response, purpose: 'invite'): Promise<InviteClaims | null>;
  async function claims(
    req: Request,
    res: Response,
    purpose: 'answer' | 'invite',
  ): Promise<AnswerClaims | InviteClaims | null> {
    try {
      return await signer.verify(String(req.params.token), purpose, new Date(now()));
    } catch (error) {
      if (!(error instanceof LinkError)) throw error;
      await refuse(req, res, error.reason, error.jti);
      return null;
    }
  }

  const noStore = (res: Response) => res.set('Cache-Control', 'no-store');

  table.get('/answer/:token', 'public', async (req, res) => {
    noStore(res);
    const c = await claims(req, res, 'answer');
    if (!c) return;
    const facts = await loadBookingFacts(knex, c.bookingId);
    if (!facts) return refuse(req, res, 'gone', c.jti);
    if (!(await stillTheirs(c, facts))) return refuseNotTheirs(req, res, c);
    if (await knex('link_uses').where('jti', requestKeyOf(c)).first()) return refuseUsed(req, res, c, facts);
    if (facts.booking.version !== c.version) {
      res.type('html').send(stalePage(facts));
      return;
    }
    const open =
      c.action === 'confirm' ? facts.booking.state === 'sent' : ['sent', 'confirmed'].includes(facts.booking.state);
    res
      .type('html')
      .send(open ? answerForm(facts, c.action, req.originalUrl) : closedPage(facts, await certificateAfter(facts)));
  });

  table.post('/answer/:token', 'public', async (req, res) => {
    noStore(res);
    const c = await claims(req, res, 'answer');
    if (!c) return;
    // A booking gone is the write path's to find (it answers 'gone'); one given to another firm is
    // refused here, before anything of it is shown or tried.
    const asked = await loadBookingFacts(knex, c.bookingId);
    if (asked && !(await stillTheirs(c, asked))) return refuseNotTheirs(req, res, c);
    let proposal: { start: Date; end: Date } | undefined;
    let reason: string | undefined;
    if (c.action !== 'confirm') {
      await parseForm(req, res);
      reason = reasonOf((req.body ?? {}) as Record<string, unknown>);
    }
    if (c.action === 'propose') {
      if (!asked) return refuse(req, res, 'gone', c.jti);
      const body = (req.body ?? {}) as Record<string, unknown>;
      const start = instantOf(body.date, body.start, asked.installer.timeZone);
      const end = instantOf(body.endDate || body.date, body.end, asked.installer.timeZone);
      if (!start || !end || end <= start) {
        res
          .status(400)
          .type('html')
          .send(answerForm(asked, 'propose', req.originalUrl, 'Give a date and a finishing time after the start.'));
        return;
      }
      proposal = { start, end };
    }
    const outcome = await confirmations.answerByLink(c, proposal, reason);
    if (outcome.result === 'gone') return refuse(req, res, 'gone', c.jti);
    const facts = await loadBookingFacts(knex, c.bookingId);
    if (!facts) return refuse(req, res, 'gone', c.jti);
    // Given to another firm while this answer waited: the slot as it is now is not this firm's to
    // see (an answer taken is the link's own firm's, by its version).
    if ((outcome.result === 'used' || outcome.result === 'stale') && !(await stillTheirs(c, facts)))
      return refuseNotTheirs(req, res, c);
    if (outcome.result === 'used') return refuseUsed(req, res, c, facts);
    switch (outcome.result) {
      case 'stale':
        res.status(409).type('html').send(stalePage(facts));
        return;
      case 'closed':
        res
          .status(409)
          .type('html')
          .send(closedPage(facts, await certificateAfter(facts)));
        return;
      case 'taken':
        res.status(409).type('html').send(takenPage(facts));
        return;
      default:
        req.log?.info(
          { bookingId: c.bookingId, version: c.version, result: outcome.result },
          'partner answered by link',
        );
        res.type('html').send(answeredPage(facts, outcome.result, await certificateAfter(facts)));
    }
  });

  const invitationBody = (
    inv: InvitationView,
  ) => `<dl><dt>Firm</dt><dd>${e(inv.firmName)}</dd><dt>Role</dt><dd>${e(ROLE_LABELS[inv.role])}</dd>
<dt>For</dt><dd>${e(inv.email)}</dd></dl>`;

  /** "Sign in with Google using …" and its button: where an invitation accepted leads. */
  const signInTo = (inv: InvitationView) => `<p>Now sign in with Google using <strong>${e(inv.email)}</strong>.</p>
<form method="get" action="/auth/google"><button type="submit">Sign in with Google</button></form>`;

  /** An invitation link opened again once accepted: refused (it works once), with the way in. */
  const refuseAccepted = (req: Request, res: Response, c: InviteClaims, inv: InvitationView) =>
    refuse(
      req,
      res,
      'used',
      c.jti,
      page(
        'This invitation was already accepted',
        `${invitationBody(inv)}
<p>Each invitation link works once.</p>${signInTo(inv)}`,
        'warn',
      ),
    );

  table.get('/invite/:token', 'public', async (req, res) => {
    noStore(res);
    const c = await claims(req, res, 'invite');
    if (!c) return;
    const inv = await invitations.peek(c);
    if (!inv) return refuse(req, res, 'gone', c.jti);
    if (inv.acceptedAt || (await knex('link_uses').where('jti', c.jti).first()))
      return refuseAccepted(req, res, c, inv);
    res.type('html').send(
      page(
        `Join ${inv.firmName} on Waterline`,
        `${invitationBody(inv)}
<form method="post" action="${e(req.originalUrl)}"><button type="submit">Accept the invitation</button></form>`,
      ),
    );
  });

  table.post('/invite/:token', 'public', async (req, res) => {
    noStore(res);
    const c = await claims(req, res, 'invite');
    if (!c) return;
    const outcome = await invitations.accept(c);
    if (outcome.result === 'used') {
      const inv = await invitations.peek(c);
      return inv ? refuseAccepted(req, res, c, inv) : refuse(req, res, 'gone', c.jti);
    }
    if (outcome.result === 'gone' || outcome.result === 'expired') return refuse(req, res, outcome.result, c.jti);
    res.type('html').send(
      page(
        outcome.result === 'accepted' ? 'Invitation accepted' : 'You are already a member',
        `${invitationBody(outcome.invitation)}
${signInTo(outcome.invitation)}`,
        'ok',
      ),
    );
  });

  // A calendar app polls this; the token in the path is the whole credential (see FeedsService).
  table.get('/feeds/:token.ics', 'public', async (req, res) => {
    const body = await feeds.render(String(req.params.token));
    if (!body) {
      res.status(404).type('text').send('No such feed');
      return;
    }
    res.set('Cache-Control', 'private, max-age=300').type('text/calendar; charset=utf-8').send(body);
  });
}
