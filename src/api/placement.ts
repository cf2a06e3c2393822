/**
 * Slots and auto-place, worked out by the server on complete data (every booking the search can
 * reach, months ahead), not on the week the board has loaded. Both only propose: what is chosen is
 * booked through the usual booking routes (the guarded write path).
 */
import type { z } from 'zod';
import { api } from '@/api/client';
import type { AutoPlaceAnswer, AutoPlaceRequest, SlotAnswer, SlotSearch } from '@shared/schemas/placement';

/** Where a stage could go: per kind it needs (or on one kind or resource), the earliest slots first. */
export function searchSlots(search: z.input<typeof SlotSearch>, signal?: AbortSignal): Promise<SlotAnswer> {
  return api.post<SlotAnswer>('/api/plan/slots', search, { signal });
}

/** Where the jobs' unbooked stages would go: a proposal of new pencilled bookings, nothing saved. */
export function proposeAutoPlace(
  request: z.input<typeof AutoPlaceRequest>,
  signal?: AbortSignal,
): Promise<AutoPlaceAnswer> {
  return api.post<AutoPlaceAnswer>('/api/plan/auto-place', request, { signal });
}
