/**
 * Declines as work for the scheduler: every declined booking on the board, who declined it and
 * when, and whether the request can simply be sent again. Pure, so it is tested without a browser.
 */
import type { BoardData } from '@shared/board-data';
import { actionsFor } from '@shared/booking-states';

export interface DeclinedItem {
  bookingId: string;
  stageId: string;
  jobId: string;
  stageName: string;
  jobReference: string;
  resourceName: string;
  firmName: string;
  start: number;
  /** When the partner said no, and how (their page or the e-mailed link), when known. */
  declinedAt: number | null;
  via: 'link' | 'app' | null;
  /** Why, in the partner's own words (shown as text, never as markup); null when they gave none. */
  reason: string | null;
  /** The state machine lets the office send the request again (a partner's resource). */
  canSendAgain: boolean;
}

/**
 * The declined bookings of the board, soonest first.
 *
 * @example
 * declinedItems(data) // [{ firmName: 'Brightspark Electrical', stageName: 'Connect and certify', canSendAgain: true, … }]
 */
export function declinedItems(data: BoardData): DeclinedItem[] {
  const out: DeclinedItem[] = [];
  for (const b of data.bookings) {
    if (b.state !== 'declined' || b.elsewhere) continue;
    const stage = data.stages.find((s) => s.id === b.stageId);
    const job = data.jobs.find((j) => j.id === stage?.jobId);
    const resource = data.resources.find((r) => r.id === b.resourceId);
    if (!stage || !job || !resource) continue;
    const side = resource.ownership === 'partner' ? 'partner' : 'own';
    out.push({
      bookingId: b.id,
      stageId: stage.id,
      jobId: job.id,
      stageName: stage.name,
      jobReference: job.reference,
      resourceName: resource.name,
      firmName: resource.firmName,
      start: b.start,
      declinedAt: b.declined?.at ?? null,
      via: b.declined?.via ?? null,
      reason: b.declined?.reason ?? null,
      canSendAgain: actionsFor('declined', { party: 'office', side }).includes('send'),
    });
  }
  return out.sort((a, b) => a.start - b.start || a.bookingId.localeCompare(b.bookingId));
}

/**
 * Bookings declined since the board last loaded: the ones to tell the scheduler about now.
 *
 * @example
 * newlyDeclined(before, after) // ['b7']
 */
export function newlyDeclined(before: BoardData | null, after: BoardData): string[] {
  if (!before) return [];
  const was = new Map(before.bookings.map((b) => [b.id, b.state]));
  return after.bookings
    .filter((b) => b.state === 'declined' && !b.elsewhere && was.has(b.id) && was.get(b.id) !== 'declined')
    .map((b) => b.id);
}
