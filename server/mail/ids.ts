/**
 * The domain part of the identifiers this installation mints (iCalendar UIDs, Message-IDs): the host
 * of its PUBLIC_URL, so two installations serving one partner never hand out the same identifier
 * (RFC 5545 §3.8.4.7 recommends a domain name on the right-hand side of a UID; RFC 5322 §3.6.4 the
 * same for a Message-ID). The host is taken as given (an address such as 127.0.0.1 stays one); the
 * port is left out, as neither identifier allows a colon there.
 */
export function identityDomain(publicUrl: string): string {
  return new URL(publicUrl).hostname;
}

/** The one UID a booking keeps in every invite, update, cancellation and feed of one installation. */
export function bookingUid(bookingId: string, publicUrl: string): string {
  return `booking-${bookingId}@${identityDomain(publicUrl)}`;
}

/** The Message-ID of one outbox row's e-mail: stable, so a receiving server can drop a resend. */
export function outboxMessageId(idempotencyKey: string, publicUrl: string): string {
  return `<${idempotencyKey}@${identityDomain(publicUrl)}>`;
}
