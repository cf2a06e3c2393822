import ical, { ICalCalendarMethod, ICalEventStatus, ICalAttendeeRole, ICalAttendeeStatus } from 'ical-generator';
import type { BookingFacts } from './facts.ts';
import { bookingUid } from './ids.ts';

const PRODUCT = { company: 'Waterline', product: 'Waterline', language: 'EN' } as const;

function summaryOf(f: BookingFacts): string {
  return `${f.stage.name} · ${f.job.siteTown} (${f.installer.name})`;
}
function locationOf(f: BookingFacts): string {
  return [f.job.siteAddress, f.job.siteTown, f.job.sitePostcode].join(', ');
}

export interface InviteOptions {
  method: 'request' | 'cancel';
  organizerEmail: string;
  description: string;
  now: Date;
  /** The installation's PUBLIC_URL: its host is the UID's domain. */
  publicUrl: string;
}

/**
 * An iTIP invite for one booking (RFC 5546 over RFC 5545): METHOD:REQUEST for a new or moved slot,
 * METHOD:CANCEL when it is withdrawn; SEQUENCE is the booking's version so each revision supersedes
 * the last (§3.8.7.4). A request still waiting for the partner's answer is STATUS:TENTATIVE; once
 * the partner confirmed, the update sent then (same UID, higher SEQUENCE) is STATUS:CONFIRMED with
 * the partner's attendance ACCEPTED (RFC 5545 §3.8.1.11, §3.2.12). Times are written in UTC, so no
 * VTIMEZONE is needed.
 */
export function bookingInvite(f: BookingFacts, version: number, options: InviteOptions): string {
  const cal = ical({
    prodId: PRODUCT,
    method: options.method === 'cancel' ? ICalCalendarMethod.CANCEL : ICalCalendarMethod.REQUEST,
  });
  // Only the partner's answer settles a slot: on site counts as settled too.
  const confirmed = f.booking.state === 'confirmed' || f.booking.state === 'on_site';
  cal.createEvent({
    id: bookingUid(f.booking.id, options.publicUrl),
    sequence: version,
    stamp: options.now,
    start: f.booking.startsAt,
    end: f.booking.endsAt,
    summary: summaryOf(f),
    location: locationOf(f),
    description: options.description,
    status:
      options.method === 'cancel'
        ? ICalEventStatus.CANCELLED
        : confirmed
          ? ICalEventStatus.CONFIRMED
          : ICalEventStatus.TENTATIVE,
    organizer: { name: f.installer.name, email: options.organizerEmail },
    attendees: f.recipients.map((email) => ({
      email,
      name: f.partner.name,
      role: ICalAttendeeRole.REQ,
      status: confirmed ? ICalAttendeeStatus.ACCEPTED : ICalAttendeeStatus.NEEDSACTION,
      rsvp: !confirmed,
    })),
  });
  return cal.toString();
}

export interface FeedEvent {
  facts: BookingFacts;
  description: string;
}

/** A subscription feed (METHOD:PUBLISH) of one person's slots; the same UIDs as the invites (same `publicUrl`). */
export function personFeed(name: string, events: FeedEvent[], now: Date, publicUrl: string): string {
  const cal = ical({ prodId: PRODUCT, name, method: ICalCalendarMethod.PUBLISH, ttl: 60 * 60 });
  for (const { facts: f, description } of events) {
    cal.createEvent({
      id: bookingUid(f.booking.id, publicUrl),
      sequence: f.booking.version,
      stamp: now,
      start: f.booking.startsAt,
      end: f.booking.endsAt,
      summary: summaryOf(f),
      location: locationOf(f),
      description,
      status: f.booking.state === 'sent' ? ICalEventStatus.TENTATIVE : ICalEventStatus.CONFIRMED,
    });
  }
  return cal.toString();
}
