import { reachOf, type Actor, type Reach } from './actor.ts';
import type { SlotSupply } from '../../shared/slot-supply.ts';
import { setsUnitDown, unitFacingLine } from '../../shared/unit-facing.ts';

/**
 * The read policy: what each reach (installer office, crew, partner firm) may read, and which
 * fields of it. Which rows exist for a reader is the model scopes' business (`scoped()` in
 * scope.ts, `static scope` in models/index.ts); which of their fields, which booking states and
 * which live events reach whom is decided here, and only here. Services call these functions
 * rather than testing roles themselves, so one file answers "who sees what".
 *
 * In short (DEVELOPERS.md, "Firms, roles and what each sees"):
 * - installer office (owner, scheduler, manager, viewer): everything of their own firm's jobs;
 *   another installer's booking of a shared partner resource only as an anonymous busy block;
 * - crew: their own bookings and what the day needs (site, times, cautions, who else is on the
 *   stage, the office's phone, and the householder's name and phone on those bookings); a job's
 *   page without the householder's e-mail or phone;
 * - partner firm: its own resources' slots once sent (sent, confirmed, on site), with the site and
 *   the installer's phone; the householder's name and phone only where that installer switched
 *   `shareCustomerContactWithPartners` on. Never the board, the bookings API or the jobs API.
 */

/** The booking states a partner firm sees: a pencilled booking is the installer's private plan. */
export const PARTNER_VISIBLE_STATES = ['sent', 'confirmed', 'on_site'] as const;

/**
 * The states in which another installer's booking of a shared partner resource blocks it for
 * this installer ("busy elsewhere"): once the partner has been asked. A pencilled booking is a
 * private plan and blocks nobody else; a declined one is over; a done one really happened.
 */
export const ELSEWHERE_BLOCKING_STATES = ['sent', 'confirmed', 'on_site', 'done'] as const;

/** The one state every busy-elsewhere placeholder carries, whatever the other installer's is. */
export const ELSEWHERE_STATE = 'confirmed' as const;

/**
 * A booking of the reader's own resource, as a list of what time away or taking it off the books
 * would leave behind: the reader's own firm's job named; another installer's job (a partner's person
 * booked by them) only its times, and only once the partner was asked (its pencilled plan stays its
 * own). Null when the reader may not hear of it at all.
 */
export function bookingOfOwnResource(
  actor: Actor,
  b: {
    id: string;
    startsAt: Date;
    endsAt: Date;
    state: string;
    jobFirmId: string;
    reference: string;
    stageName: string;
  },
): {
  bookingId: string;
  startsAt: string;
  endsAt: string;
  jobReference: string | null;
  stageName: string | null;
} | null {
  const own = String(b.jobFirmId) === actor.firmId;
  if (!own && !(PARTNER_VISIBLE_STATES as readonly string[]).includes(b.state)) return null;
  return {
    bookingId: String(b.id),
    startsAt: b.startsAt.toISOString(),
    endsAt: b.endsAt.toISOString(),
    jobReference: own ? b.reference : null,
    stageName: own ? b.stageName : null,
  };
}

export function isOffice(actor: Actor): boolean {
  return reachOf(actor) === 'installer-office';
}

/** Booking states a reader may list on a day sheet or My work (declined never shows). */
export function visitStatesFor(actor: Actor): readonly string[] {
  return reachOf(actor) === 'partner' ? PARTNER_VISIBLE_STATES : ['pencilled', 'sent', 'confirmed', 'on_site', 'done'];
}

/** A job as a reader may see it: crew get the site and the householder's name, not their e-mail or phone. */
export function jobForReader<J extends { customerPhone: string | null; customerEmail: string | null }>(
  actor: Actor,
  job: J,
): J {
  if (isOffice(actor)) return job;
  return { ...job, customerPhone: null, customerEmail: null };
}

/** The householder's name on the board: the office only (crew and partners plan nothing by it). */
export function boardCustomerName(actor: Actor, name: string): string {
  return isOffice(actor) ? name : '';
}

/**
 * Which way the unit faces, as the survey recorded it, for a reader's visit of a stage: the
 * installer's office and crew on any of their job's stages (the pit is dug to it); a partner firm
 * only on the stages that set the unit down (the delivery, the lift, the placement), as
 * `partnerSlotFacts` says it on their slots and e-mails.
 */
export function unitFacingFor(actor: Actor, stageKind: string, unitFacing: string | null): string | null {
  return reachOf(actor) !== 'partner' || setsUnitDown(stageKind) ? unitFacing : null;
}

/** Everything a day-sheet visit could tell; `contactsFor` and `alongsideFor` pick what a reader gets. */
export interface VisitFacts {
  customerName: string;
  customerPhone: string | null;
  officeName: string;
  officePhone: string | null;
  /** The installer whose job it is switched sharing the householder's contact with partners on. */
  sharesCustomerContact: boolean;
}

export interface VisitContact {
  name: string;
  phone: string | null;
  role: string;
}

/**
 * Whom a reader may call about a visit. The installer's office always. The householder: the
 * office; the crew on their own booking (they knock on the door); a partner only where the
 * installer shares it.
 */
export function contactsFor(actor: Actor | { reach: Reach }, v: VisitFacts): VisitContact[] {
  const office = { name: v.officeName, phone: v.officePhone, role: 'Installer office' };
  const customer = { name: v.customerName, phone: v.customerPhone, role: 'Customer' };
  const reach = 'reach' in actor ? actor.reach : reachOf(actor);
  if (reach === 'partner' && !v.sharesCustomerContact) return [office];
  return [customer, office];
}

/** The trades that get the house's electrical supply details with their slot. */
export const SUPPLY_READING_KINDS = ['electrician'] as const;

/** Booking states of the installer's own crew that name them as the day's site contact (a plan, never a decline). */
export const SITE_CONTACT_STATES = ['pencilled', 'confirmed', 'on_site'] as const;

/** Everything a partner's slot (e-mail, answer page, slot list) could tell beyond the site and times. */
export interface SlotFacts extends VisitFacts {
  /** The kind of the partner's resource booked (electrician, crane, …). */
  resourceKind: string;
  /** The installer's own crew on the job that day, if any (its name and phone). */
  siteContact: { name: string; phone: string | null } | null;
  supply: SlotSupply;
  /** The stage booked, the job's installation and which way the unit faces (the survey's; null until settled). */
  stageKind: string;
  installationType: string;
  unitFacing: string | null;
}

/**
 * What a partner firm reads about one of its slots, with no signed-in actor (the e-mail and the
 * answer page) or as the partner coordinator (the slot list): whom to call — the installer's crew
 * on site that day, the office, and the householder only where the installer shares it — and the
 * house's supply only for electrical work (nobody else prepares for it), and which way the unit
 * faces only to those who set it down (the delivery, the lift, the placement).
 */
export function partnerSlotFacts(f: SlotFacts): {
  contacts: VisitContact[];
  supply: SlotSupply | null;
  facing: string | null;
} {
  const contacts: VisitContact[] = [
    ...(f.siteContact ? [{ name: f.siteContact.name, phone: f.siteContact.phone, role: 'On site that day' }] : []),
    ...contactsFor({ reach: 'partner' }, f),
  ];
  return {
    contacts,
    supply: (SUPPLY_READING_KINDS as readonly string[]).includes(f.resourceKind) ? f.supply : null,
    facing: unitFacingLine(f.stageKind, f.installationType, f.unitFacing),
  };
}

/** Another booking on the same stage, as the day sheet's "with" line may show it. */
export interface AlongsideRow {
  resourceId: string;
  name: string;
  kind: string;
  category: string;
  firmId: string;
  firmName: string;
  state: string;
}

/**
 * Who else is on the stage. The installer's office and crew see every active booking on it. A
 * partner sees only bookings already sent (another firm's pencilled booking is the installer's
 * plan), and other firms' people by their trade, not their name.
 */
export function alongsideFor(
  actor: Actor,
  rows: readonly AlongsideRow[],
): { name: string; kind: string; firmName: string }[] {
  const partner = reachOf(actor) === 'partner';
  return rows
    .filter(
      (o) => o.state !== 'declined' && (!partner || (PARTNER_VISIBLE_STATES as readonly string[]).includes(o.state)),
    )
    .map((o) => ({
      name: partner && o.firmId !== actor.firmId && o.category === 'person' ? o.kind.replace(/_/g, ' ') : o.name,
      kind: o.kind,
      firmName: o.firmName,
    }));
}

/** A booking of the delivery before a visit's stage, as `unitArrivalFor` reads it. */
export interface ArrivalRow {
  startsAt: Date;
  endsAt: Date;
  state: string;
  firmName: string;
}

/**
 * When the unit arrives for a visit of the lift or the placement: the earliest active booking of
 * the delivery before it. The installer's office and crew see any; a partner only one already
 * asked of the haulier (a pencilled delivery is the installer's plan), as on the "with" line.
 */
export function unitArrivalFor(
  actor: Actor,
  rows: readonly ArrivalRow[],
): { startsAt: string; endsAt: string; firmName: string } | null {
  const partner = reachOf(actor) === 'partner';
  const seen = rows
    .filter(
      (r) => r.state !== 'declined' && (!partner || (PARTNER_VISIBLE_STATES as readonly string[]).includes(r.state)),
    )
    .sort((a, b) => a.startsAt.getTime() - b.startsAt.getTime());
  const first = seen[0];
  return first
    ? { startsAt: first.startsAt.toISOString(), endsAt: first.endsAt.toISOString(), firmName: first.firmName }
    : null;
}

/** A booking change as the live stream hears of it (from PostgreSQL NOTIFY, server side only). */
export interface BookingChange {
  bookingId: string;
  installerFirmId: string | null;
  resourceId: string;
  resourceFirmId: string | null;
}

/** An open board stream's reader: who they act for, and (crew) the resources they work as. */
export interface StreamReader {
  reach: Reach;
  firmId: string;
  ownResourceIds: ReadonlySet<string>;
}

/**
 * Whether a change reaches a stream: only when it is to a booking the reader may read. The office
 * hears of its own firm's jobs (not of another installer booking a shared partner); crew hear of
 * their own bookings; partner firms keep no board stream.
 */
export function mayHearOf(reader: StreamReader, change: BookingChange): boolean {
  switch (reader.reach) {
    case 'installer-office':
      return change.installerFirmId === reader.firmId;
    case 'crew':
      return change.installerFirmId === reader.firmId && reader.ownResourceIds.has(change.resourceId);
    case 'partner':
      return false;
  }
}

/** What a live event tells its reader: the booking's id, nothing of any other firm. */
export function streamEvent(change: BookingChange): { bookingId: string } {
  return { bookingId: change.bookingId };
}

/** A busy interval of a shared resource, from another installer's booking. */
export interface BusySpan {
  resourceId: string;
  start: number;
  end: number;
}

/**
 * Another installer's bookings of shared resources as busy blocks: overlapping or touching spans
 * of one resource are merged, so neither their count, their ids, their states nor their own
 * clashes can be read from the board. Sorted by resource and start.
 */
export function busyElsewhere(spans: readonly BusySpan[]): BusySpan[] {
  const sorted = [...spans].sort((a, b) =>
    a.resourceId < b.resourceId ? -1 : a.resourceId > b.resourceId ? 1 : a.start - b.start,
  );
  const out: BusySpan[] = [];
  for (const s of sorted) {
    const last = out[out.length - 1];
    if (last && last.resourceId === s.resourceId && s.start <= last.end) last.end = Math.max(last.end, s.end);
    else out.push({ ...s });
  }
  return out;
}

/**
 * A partner's reason for declining (or proposing another time), as a reader may see it: only the
 * installer firm whose booking it is. Any other firm gets null (a third firm never reads it; the
 * partner that wrote it has its own words already).
 */
export function answerReasonFor(
  actor: Actor,
  installerFirmId: string,
  reason: string | null | undefined,
): string | null {
  return String(actor.firmId) === String(installerFirmId) && reason ? reason : null;
}

/**
 * Who reads a job's handover records (the commissioning record, the electrical certificate and its
 * waiver): the installer's office, and crew on a job they are booked on (the model scopes decide
 * which jobs). A partner firm never reads them through the job; what it reads of its own upload is
 * {@link certificateForPartner}.
 */
export function readsHandoverRecords(actor: Actor): boolean {
  return reachOf(actor) !== 'partner';
}

/**
 * A job's electrical certificate as a partner firm sees it on its slot: the name and date of the
 * certificate only where this firm uploaded it (never another firm's file, never the office's waiver).
 */
export function certificateForPartner(
  actor: Actor | { firmId: string },
  row: { uploadedByFirmId: string; name: string; uploadedAt: Date } | null,
): { name: string; uploadedAt: string } | null {
  if (!row || String(row.uploadedByFirmId) !== String(actor.firmId)) return null;
  return { name: row.name, uploadedAt: row.uploadedAt.toISOString() };
}

/**
 * The householder's e-mail at handover: the office reads it whole; the crew, who stand with the
 * householder, get only a hint to check it by ("m…@home.example"), never the address itself.
 */
export function handoverEmailFor(actor: Actor, email: string | null): { email: string | null; hint: string | null } {
  if (!email) return { email: null, hint: null };
  if (isOffice(actor)) return { email, hint: null };
  const at = email.lastIndexOf('@');
  return { email: null, hint: at > 0 ? `${email.slice(0, 1)}…${email.slice(at)}` : null };
}

/**
 * Why a resource is away or a firm is closed, on the board: told to the office of the firm it is
 * about (its own people's holidays and sickness, its own shutdowns), never to another firm (a
 * partner's electrician "Off sick" is the partner's business: installers see the time, not why),
 * nor to crew, who read their own on My work.
 */
export function closureReasonFor(actor: Actor, ownerFirmId: string, reason: string): string | undefined {
  return reachOf(actor) === 'installer-office' && String(ownerFirmId) === String(actor.firmId) ? reason : undefined;
}

/**
 * A working week's name on the board (what the engine's refusals call it): told to its own firm
 * only; another firm's week is named by nothing but its hours.
 */
export function calendarNameFor(actor: Actor, ownerFirmId: string, name: string): string | undefined {
  return String(ownerFirmId) === String(actor.firmId) ? name : undefined;
}

/**
 * The working week a resource keeps, by name, on the Resources page: told to its own firm only,
 * and only when it is not the firm's standard week (null then, and for another firm's resource:
 * a partner's hours show on the board as shading, its week names are its own).
 */
export function workingWeekFor(
  actor: Actor,
  r: { firmId: string; weekName: string | null; standardWeek: boolean },
): string | null {
  return String(r.firmId) === String(actor.firmId) && !r.standardWeek ? r.weekName : null;
}

/**
 * What an answer link shows of its slot beyond the link's own refusal: the slot as it is now (its
 * times, people, site and contacts, a certificate link) only while the booking is still with the
 * firm the link's request went to. A slot since given to another firm is that firm's to read.
 * `requestedFirmId` null: the request has no record (a link made by hand, or older than the
 * record), taken as its booking's firm's.
 *
 * @example answerLinkSeesSlot({ requestedFirmId: '3', bookingFirmId: '4' }) // false
 */
export function answerLinkSeesSlot(link: { requestedFirmId: string | null; bookingFirmId: string }): boolean {
  return link.requestedFirmId === null || link.requestedFirmId === link.bookingFirmId;
}
