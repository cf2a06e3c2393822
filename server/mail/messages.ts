import type { Knex } from 'knex';
import type { Config } from '../config.ts';
import { LinkSigner, type AnswerAction } from '../services/links.ts';
import { CAUTION_NOTE, cautionLines } from '../../shared/cautions.ts';
import { ROLE_LABELS, type Role } from '../../shared/permissions.ts';
import { whatToBring } from './what-to-bring.ts';
import { bookingInvite } from './calendar.ts';
import { loadBookingFacts, slotSections, type BookingFacts } from './facts.ts';
import { describeWindow } from '../../shared/slot-window.ts';
import { renderMail, type MailContent } from './layout.ts';
import { localDateOf } from '../../shared/local-dates.ts';
import { composePaymentRequest } from './payment-request.ts';
import type { ObjectStore } from '../storage/object-store.ts';
import { composeHandoverPack, composeServicePlanNotice } from './handover.ts';

/** What the outbox can send; each row's payload carries ids only. */
export const OUTBOX_KINDS = [
  'booking_request',
  'booking_update',
  'booking_reminder',
  'booking_cancel',
  'proposal_refused',
  'customer_notice',
  'invitation',
  'booking_declined',
  'booking_confirmed',
  'handover_pack',
  'service_plan_notice',
  'payment_request',
] as const;
export type OutboxKind = (typeof OUTBOX_KINDS)[number];

export interface OutboxPayload {
  bookingId?: string;
  version?: number;
  /** The resource a cancellation is for (the booking may have moved to another since). */
  resourceId?: string;
  event?: 'confirmed' | 'changed';
  /** For a booking that was deleted: the audit row holding its last state. */
  auditId?: string;
  invitationId?: string;
  /** A deposit or balance asked of the householder (server/mail/payment-request.ts). */
  paymentId?: string;
  /** The job a handover pack or service-plan notice is about. */
  jobId?: string;
}

export interface OutgoingMail {
  to: string[];
  subject: string;
  html: string;
  text: string;
  ics?: { method: 'REQUEST' | 'CANCEL'; content: string };
  /** Files sent with it (the handover pack's PDF). */
  attachments?: { filename: string; content: Buffer; contentType: string }[];
}

/** A message that should not go (superseded, nobody to send to): recorded, not retried. */
export interface SkippedMail {
  skip: string;
}

export interface ComposeDeps {
  knex: Knex;
  config: Pick<Config, 'PUBLIC_URL' | 'MAIL_FROM' | 'LINK_SECRET'>;
  now?: Date;
  /** Where attached files are read from. */ store?: ObjectStore;
}

const HOUR = 3_600_000;
const shortDate = (d: Date, timeZone: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone, weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' })
    .format(d)
    .replace(',', '');
const fromAddress = (mailFrom: string) => /<([^>]+)>/.exec(mailFrom)?.[1] ?? mailFrom;

/** Builds the e-mail an outbox row stands for, from the rows as they are now. */
export async function composeMessage(
  deps: ComposeDeps,
  kind: OutboxKind,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  if (kind === 'invitation') return composeInvitation(deps, payload);
  if (kind === 'payment_request') return composePaymentRequest(deps, payload);
  if (kind === 'handover_pack') return composeHandoverPack(deps, payload);
  if (kind === 'service_plan_notice') return composeServicePlanNotice(deps, payload);
  const snapshot = payload.auditId
    ? (await deps.knex('audit_log').where('id', payload.auditId).first('before'))?.before
    : undefined;
  const facts = payload.bookingId
    ? await loadBookingFacts(
        deps.knex,
        payload.bookingId,
        kind === 'booking_cancel' ? payload.resourceId : undefined,
        snapshot,
      )
    : null;
  if (!facts) return { skip: 'the booking no longer exists' };
  if (kind === 'customer_notice') return composeCustomerNotice(deps, facts, payload);
  if (kind === 'booking_cancel') return composeCancel(deps, facts, payload.version ?? facts.booking.version);
  if (kind === 'booking_declined') return composeDeclined(deps, facts, payload);
  if (kind === 'booking_confirmed') return composeConfirmed(deps, facts, payload);
  // A request, update or reminder for a version that has since changed would carry dead links.
  if (payload.version !== facts.booking.version) return { skip: `superseded by version ${facts.booking.version}` };
  if (kind === 'booking_reminder' && facts.booking.state !== 'sent')
    return { skip: `already answered (${facts.booking.state})` };
  if (facts.booking.state !== 'sent' && facts.booking.state !== 'confirmed')
    return { skip: `booking is ${facts.booking.state}` };
  return composeRequest(deps, facts, kind);
}

function cautionBlock(stageKind: string): MailContent['cautions'] {
  const lines = cautionLines(stageKind);
  return {
    heading: 'Safety on this job',
    lines: lines.length ? lines : ['Check the site for hazards on arrival and agree the plan with the installer.'],
    footnote: CAUTION_NOTE,
  };
}

async function composeRequest(
  deps: ComposeDeps,
  f: BookingFacts,
  kind: OutboxKind,
): Promise<OutgoingMail | SkippedMail> {
  if (f.recipients.length === 0) return { skip: `${f.partner.name} has no booking address or coordinator` };
  const now = deps.now ?? new Date();
  const signer = new LinkSigner(deps.config.LINK_SECRET);
  // A link is good until the slot is over, and never for less than three days.
  const expiresAt = new Date(Math.max(f.booking.endsAt.getTime(), now.getTime() + 72 * HOUR));
  const link = async (action: AnswerAction) =>
    `${deps.config.PUBLIC_URL}/answer/${await signer.signAnswer({ bookingId: f.booking.id, version: f.booking.version, action, expiresAt })}`;
  const [confirm, decline, propose] = [await link('confirm'), await link('decline'), await link('propose')];
  const day = shortDate(f.booking.startsAt, f.installer.timeZone);
  const what = `${f.stage.name}, ${f.job.siteTown}, ${day}`;
  const heads: Record<string, { subject: string; title: string; intro: string }> = {
    booking_request: {
      subject: `Booking request: ${what}`,
      title: `${f.installer.name} would like to book ${f.resource.name}`,
      intro: 'Please confirm the slot below, decline it, or propose another time.',
    },
    booking_update: {
      subject: `Booking changed: ${what}`,
      title: `${f.installer.name} has changed a booking of ${f.resource.name}`,
      intro:
        'The slot below replaces the one sent before. Please confirm it again, decline it, or propose another time.',
    },
    booking_reminder: {
      subject: `Reminder, please answer: ${what}`,
      title: `Still waiting for your answer: ${f.resource.name}`,
      intro: `${f.installer.name} has not had an answer to this request yet. Please confirm, decline or propose another time.`,
    },
    proposal_refused: {
      subject: `Your proposed time could not be used: ${what}`,
      title: `${f.installer.name} could not move to the time you proposed`,
      intro: 'The original slot below still stands. Please confirm it, decline it, or propose another time.',
    },
  };
  const head = heads[kind]!;
  const sections = [...slotSections(f), { heading: 'What to bring', lines: whatToBring(f.resource.kind) }];
  const content: MailContent = {
    preview: `${head.intro} ${describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone).window}`,
    title: head.title,
    intro: [head.intro],
    sections,
    cautions: cautionBlock(f.stage.kind),
    buttons: [
      { label: 'Confirm', href: confirm },
      { label: 'Decline', href: decline, tone: 'plain' },
      { label: 'Propose another time', href: propose, tone: 'plain' },
    ],
    footer: [
      `Sent by Waterline for ${f.installer.name} to ${f.partner.name}. Each button opens a page where you confirm your choice; the links stop working once used or when the slot changes.`,
    ],
  };
  const { html, text } = renderMail(content);
  // The calendar entry carries the facts, not the single-use answer links (calendars get shared).
  const description = renderMail({ ...content, buttons: [] }).text;
  const ics = bookingInvite(f, f.booking.version, {
    method: 'request',
    organizerEmail: f.installer.email ?? fromAddress(deps.config.MAIL_FROM),
    publicUrl: deps.config.PUBLIC_URL,
    description,
    now,
  });
  return { to: f.recipients, subject: head.subject, html, text, ics: { method: 'REQUEST', content: ics } };
}

/**
 * The partner confirmed: they get the slot once more as it now stands, with an updated invite (the
 * same UID, the confirmed version as SEQUENCE, STATUS:CONFIRMED) that replaces the tentative entry
 * in their calendar. Skipped once the booking has changed again (that change sends its own).
 */
async function composeConfirmed(
  deps: ComposeDeps,
  f: BookingFacts,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  if (f.booking.state !== 'confirmed' || payload.version !== f.booking.version) {
    return { skip: `superseded (the booking is ${f.booking.state}, version ${f.booking.version})` };
  }
  if (f.recipients.length === 0) return { skip: `${f.partner.name} has no booking address or coordinator` };
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const content: MailContent = {
    preview: `Confirmed: ${f.stage.name}, ${when.date}, ${when.window}`,
    title: `Confirmed: ${f.resource.name} for ${f.installer.name}`,
    intro: [
      `Thank you: ${f.installer.name} has your confirmation of the slot below. The attached invite marks it confirmed in your calendar.`,
    ],
    sections: [...slotSections(f), { heading: 'What to bring', lines: whatToBring(f.resource.kind) }],
    cautions: cautionBlock(f.stage.kind),
    footer: [
      `Sent by Waterline for ${f.installer.name} to ${f.partner.name}. To change anything now, call ${f.installer.name}${f.installer.phone ? ` on ${f.installer.phone}` : ''}.`,
    ],
  };
  const { html, text } = renderMail(content);
  const ics = bookingInvite(f, f.booking.version, {
    method: 'request',
    organizerEmail: f.installer.email ?? fromAddress(deps.config.MAIL_FROM),
    publicUrl: deps.config.PUBLIC_URL,
    description: text,
    now: deps.now ?? new Date(),
  });
  return {
    to: f.recipients,
    subject: `Confirmed: ${f.stage.name}, ${f.job.siteTown}, ${shortDate(f.booking.startsAt, f.installer.timeZone)}`,
    html,
    text,
    ics: { method: 'REQUEST', content: ics },
  };
}

async function composeCancel(deps: ComposeDeps, f: BookingFacts, version: number): Promise<OutgoingMail | SkippedMail> {
  if (f.recipients.length === 0) return { skip: `${f.partner.name} has no booking address or coordinator` };
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const content: MailContent = {
    preview: `${f.installer.name} no longer needs ${f.resource.name} for this slot.`,
    title: `${f.installer.name} has cancelled a booking of ${f.resource.name}`,
    intro: ['You are released from the slot below; your calendar entry is withdrawn by the attached invite.'],
    sections: [
      {
        heading: 'Cancelled slot',
        lines: [
          `${f.stage.name} for job ${f.job.reference}`,
          when.date,
          `${when.window} (${when.zone})`,
          `${f.job.siteAddress}, ${f.job.siteTown}`,
        ],
      },
      { heading: 'Questions', lines: [questionsTo(f)] },
    ],
    footer: [`Sent by Waterline for ${f.installer.name} to ${f.partner.name}.`],
  };
  const { html, text } = renderMail(content);
  const ics = bookingInvite(f, version, {
    method: 'cancel',
    organizerEmail: f.installer.email ?? fromAddress(deps.config.MAIL_FROM),
    publicUrl: deps.config.PUBLIC_URL,
    description: text,
    now: deps.now ?? new Date(),
  });
  return {
    to: f.recipients,
    subject: `Booking cancelled: ${f.stage.name}, ${f.job.siteTown}, ${shortDate(f.booking.startsAt, f.installer.timeZone)}`,
    html,
    text,
    ics: { method: 'CANCEL', content: ics },
  };
}

/**
 * The installer's schedulers hear that a partner declined a slot: the booking stays on their board
 * marked declined until someone books the stage again. Goes to the firm's schedulers (its owners
 * when it has none); not sent once the booking has been rebooked or sent again.
 */
async function composeDeclined(
  deps: ComposeDeps,
  f: BookingFacts,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  if (f.booking.state !== 'declined' || (payload.version !== undefined && payload.version !== f.booking.version)) {
    return { skip: `already dealt with (the booking is ${f.booking.state}, version ${f.booking.version})` };
  }
  const people = (role: string): Promise<string[]> =>
    deps
      .knex('memberships as m')
      .join('users as u', 'u.id', 'm.user_id')
      .where({ 'm.firm_id': f.installer.id, 'm.role': role })
      .orderBy('u.email')
      .pluck('u.email');
  const schedulers = await people('scheduler');
  const to = [...new Set((schedulers.length ? schedulers : await people('owner')).map((e) => e.toLowerCase()))];
  if (to.length === 0) return { skip: `${f.installer.name} has no scheduler or owner to tell` };
  const answer = await deps
    .knex('booking_answers')
    .where({ booking_id: f.booking.id, action: 'decline' })
    .orderBy('created_at', 'desc')
    .orderBy('id', 'desc')
    .first('via', 'created_at', 'reason');
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const day = localDateOf(f.booking.startsAt, f.installer.timeZone);
  const board = `${deps.config.PUBLIC_URL}/board?date=${day}&job=${encodeURIComponent(f.job.id)}`;
  const answered = answer
    ? [
        `Declined ${answer.via === 'link' ? 'from the e-mailed request' : 'on their Waterline page'} on ${describeWindow(answer.createdAt, answer.createdAt, f.installer.timeZone).date}.`,
      ]
    : [];
  const content: MailContent = {
    preview: `${f.partner.name} can't do ${f.stage.name} for job ${f.job.reference} on ${when.date}.`,
    title: `${f.partner.name} declined ${f.stage.name} for job ${f.job.reference}`,
    intro: [
      `${f.partner.name} can't do the slot below with ${f.resource.name}.`,
      'The booking stays on the board marked declined until the stage is booked again.',
    ],
    sections: [
      { heading: 'Declined slot', lines: [when.date, `${when.window} (${when.zone})`, ...answered] },
      // The partner's own words, as typed: renderMail escapes them for the HTML part.
      ...(answer?.reason ? [{ heading: `${f.partner.name} said why`, lines: [`“${answer.reason}”`] }] : []),
      {
        heading: 'Work',
        lines: [
          `${f.stage.name} for job ${f.job.reference}`,
          `${f.job.siteAddress}, ${f.job.siteTown}`,
          `Asked of: ${f.resource.name} (${f.partner.name})`,
        ],
      },
      {
        heading: 'What now',
        lines: [
          'Drop the stage again on the board: at another time, or on another resource of the same kind.',
          `Or send ${f.partner.name} the request again, if they may manage it after all.`,
        ],
      },
    ],
    buttons: [{ label: 'Open the board at that day', href: board }],
    footer: [`Sent by Waterline to ${f.installer.name}'s schedulers.`],
  };
  const { html, text } = renderMail(content);
  return {
    to,
    subject: `Declined: ${f.stage.name}, ${f.job.reference}, ${shortDate(f.booking.startsAt, f.installer.timeZone)}`,
    html,
    text,
  };
}

/**
 * Whom to ask about a slot: the installer with its phone, or its e-mail where it keeps no phone (a
 * firm's phone is optional), never a name with nothing after its colon.
 * @example questionsTo(f) // 'Tideway Hot Tubs: 0113 496 0001'
 */
export function questionsTo(f: Pick<BookingFacts, 'installer'>): string {
  const reach = f.installer.phone ?? f.installer.email;
  return reach ? `${f.installer.name}: ${reach}` : f.installer.name;
}

/** The householder's checklist before a delivery or lift day. */
export const CUSTOMER_CHECKLIST = [
  'Clear the access route from the road to the spa position: gates open or removed, bins, pots and garden furniture out of the way.',
  'Parking: keep room at the kerb for the lorry (and the crane on lift day), and let neighbours know; the crane needs firm, level ground to stand on.',
  "Power ready: the electrician's supply and isolator in place, but do not switch the spa on until the installer says so.",
  'On the day keep children and pets indoors, and keep everyone out of the area the crew marks off while the unit is lifted or moved.',
];

async function composeCustomerNotice(
  deps: ComposeDeps,
  f: BookingFacts,
  payload: OutboxPayload,
): Promise<OutgoingMail | SkippedMail> {
  if (!f.job.customerEmail) return { skip: 'the job has no customer e-mail' };
  const when = describeWindow(f.booking.startsAt, f.booking.endsAt, f.installer.timeZone);
  const what = f.stage.kind === 'lift' ? 'lift day' : 'delivery day';
  const changed = payload.event === 'changed';
  const stillToConfirm = changed && f.booking.state !== 'confirmed';
  const content: MailContent = {
    preview: `${changed ? 'New date' : 'Date'} for your ${what}: ${when.date}`,
    title: changed ? `Your ${what} has changed` : `Your ${what} is booked`,
    intro: [
      `Hello ${f.job.customerName},`,
      changed
        ? `${f.installer.name} has had to move your ${what}.${stillToConfirm ? ' The new time is being confirmed with the firms involved; we will write again if it changes.' : ''}`
        : `${f.installer.name} has confirmed your ${what} (job ${f.job.reference}).`,
    ],
    sections: [
      { heading: changed ? 'New date' : 'Date', lines: [when.date, `${when.window} (${when.zone})`] },
      { heading: 'Where', lines: [f.job.siteAddress, `${f.job.siteTown} ${f.job.sitePostcode}`] },
      { heading: 'Before the day, please', lines: CUSTOMER_CHECKLIST },
      { heading: 'Questions', lines: [questionsTo(f)] },
    ],
    footer: [`Sent by Waterline for ${f.installer.name}.`],
  };
  const { html, text } = renderMail(content);
  return {
    to: [f.job.customerEmail],
    subject: `${changed ? 'Change to your' : 'Your'} ${what}: ${shortDate(f.booking.startsAt, f.installer.timeZone)}`,
    html,
    text,
  };
}

async function composeInvitation(deps: ComposeDeps, payload: OutboxPayload): Promise<OutgoingMail | SkippedMail> {
  const row = payload.invitationId
    ? await deps
        .knex('invitations as i')
        .join('firms as f', 'f.id', 'i.firm_id')
        .leftJoin('users as u', 'u.id', 'i.invited_by')
        .where('i.id', payload.invitationId)
        .first(
          'i.id',
          'i.email',
          'i.role',
          'i.expires_at',
          'i.accepted_at',
          'i.withdrawn_at',
          'f.name as firm_name',
          'f.time_zone',
          'u.name as inviter',
        )
    : null;
  if (!row) return { skip: 'the invitation no longer exists' };
  if (row.acceptedAt) return { skip: 'already accepted' };
  // Withdrawn before the relay got to it: the person is never sent a link that would not work.
  if (row.withdrawnAt) return { skip: 'withdrawn by the owner' };
  const token = await new LinkSigner(deps.config.LINK_SECRET).signInvite({
    invitationId: String(row.id),
    expiresAt: row.expiresAt,
  });
  const href = `${deps.config.PUBLIC_URL}/invite/${token}`;
  const content: MailContent = {
    preview: `${row.inviter ?? row.firmName} invited you to Waterline`,
    title: `Join ${row.firmName} on Waterline`,
    intro: [
      `${row.inviter ?? 'The owner'} has invited you to ${row.firmName}'s schedule as ${ROLE_LABELS[row.role as Role].toLowerCase()}.`,
      `Accept, then sign in with the Google account for ${row.email}.`,
    ],
    sections: [{ heading: 'Good until', lines: [describeWindow(row.expiresAt, row.expiresAt, row.timeZone).date] }],
    buttons: [{ label: 'Accept the invitation', href }],
    footer: ['If you did not expect this, ignore it: nothing happens unless the link is used.'],
  };
  const { html, text } = renderMail(content);
  return { to: [row.email], subject: `${row.firmName} invited you to Waterline`, html, text };
}
