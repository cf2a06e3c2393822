import type { Page } from 'playwright-core';
import type { Knex } from 'knex';
import type { Agent } from '../helpers/server.ts';

/**
 * What the scheduler's end-to-end tests do with the board: drags made the way a person makes them
 * (the mouse pressed, moved in steps, released), and the stored bookings read back to check them.
 */

/** Moves the pressed mouse to a point in small steps, so FullCalendar sees a drag, not a jump. */
async function glide(page: Page, from: { x: number; y: number }, to: { x: number; y: number }): Promise<void> {
  for (let i = 1; i <= 20; i += 1)
    await page.mouse.move(from.x + ((to.x - from.x) * i) / 20, from.y + ((to.y - from.y) * i) / 20);
}

/** Opens the board at a view and date and waits for a row to be drawn. */
export async function openBoard(page: Page, baseUrl: string, query: string, rowId: string): Promise<void> {
  await page.goto(`${baseUrl}/board?${query}`);
  await page.waitForSelector(`td.fc-timeline-lane[data-resource-id="${rowId}"]`);
}

/**
 * Where a drop lands: a resource's row at a fraction of a timeline slot (the week view's slots are
 * half days: 06:00–12:00 and 12:00–18:00 local, so a third into the morning is 08:00).
 */
async function rowPoint(
  page: Page,
  resourceId: string,
  slotDate: string,
  fractionIntoSlot: number,
): Promise<{ x: number; y: number }> {
  const laneLocator = page.locator(`td.fc-timeline-lane[data-resource-id="${resourceId}"]`).first();
  // The row in the middle of the timeline, as a person would put it before dragging: a row left at
  // the edge is where the timeline scrolls by itself during a drag, and on a busy machine it
  // scrolled the next row under the pointer.
  await laneLocator.evaluate((el) => el.scrollIntoView({ block: 'center', inline: 'nearest' }));
  const slot = (await page.locator(`td.fc-timeline-slot-lane[data-date="${slotDate}"]`).first().boundingBox())!;
  const lane = (await laneLocator.boundingBox())!;
  return { x: slot.x + slot.width * fractionIntoSlot + 4, y: lane.y + lane.height / 2 };
}

/** Drags a tray stage (by its "REF · Stage" title) onto a resource's row; returns what the box by the pointer said. */
export async function dragTrayStage(
  page: Page,
  stageTitle: string,
  resourceId: string,
  slotDate: string,
  fractionIntoSlot: number,
): Promise<string> {
  const item = page.locator(`.tray-stage[data-title="${stageTitle}"]`);
  // A drag that never took (the button went down as the tray was redrawn under it) is made again,
  // as a person would; one that took always shows the engine's verdict by the pointer.
  for (let attempt = 1; ; attempt++) {
    await item.scrollIntoViewIfNeeded();
    const to = await rowPoint(page, resourceId, slotDate, fractionIntoSlot);
    const box = (await item.boundingBox())!;
    const from = { x: box.x + 20, y: box.y + 10 };
    await page.mouse.move(from.x, from.y);
    await page.mouse.down();
    await glide(page, from, to);
    // The engine's verdict shows by the pointer once FullCalendar has checked the place: drop then.
    // On a loaded machine the timeline may still be settling when the glide ends, and FullCalendar
    // only looks again on the next pointer move: a person's hand is never still, so nudge it.
    const reason = page.locator('.drag-reason');
    let shown = false;
    for (let nudge = 0; nudge < 4 && !shown; nudge++) {
      shown = await reason.waitFor({ timeout: 2_500 }).then(
        () => true,
        () => false,
      );
      if (!shown) await page.mouse.move(to.x + (nudge % 2 === 0 ? 1 : 0), to.y);
    }
    if (shown) {
      const said = (await reason.innerText()).replace(/\s+/g, ' ').trim();
      await page.mouse.up();
      return said;
    }
    // Nothing in hand: let go over the tray (where a drop does nothing) and start again.
    await glide(page, to, from);
    await page.mouse.up();
    if (attempt === 2) throw new Error(`dragging '${stageTitle}' never showed the engine's verdict, twice`);
  }
}

/** Drags a booking on the board onto a resource's row at a fraction of a slot. */
export async function dragBooking(
  page: Page,
  bookingId: string,
  resourceId: string,
  slotDate: string,
  fractionIntoSlot: number,
): Promise<void> {
  const event = page.locator(`[data-booking-id="${bookingId}"]`);
  await event.scrollIntoViewIfNeeded();
  const to = await rowPoint(page, resourceId, slotDate, fractionIntoSlot);
  const box = (await event.boundingBox())!;
  // Held by its middle (its ends are resize handles), and let go where its start lands at the chosen time.
  const from = { x: box.x + box.width / 2, y: box.y + box.height / 2 };
  await page.mouse.move(from.x, from.y);
  await page.mouse.down();
  await glide(page, from, { x: to.x - 4 + box.width / 2, y: to.y });
  await page.locator('.drag-reason').waitFor({ timeout: 5_000 });
  await page.mouse.up();
}

/** Drags a booking on the board back onto the tray. */
export async function dragBookingToTray(page: Page, bookingId: string): Promise<void> {
  const event = page.locator(`[data-booking-id="${bookingId}"]`);
  await event.scrollIntoViewIfNeeded();
  const box = (await event.boundingBox())!;
  const tray = (await page.locator('.tray').boundingBox())!;
  const from = { x: box.x + Math.min(12, box.width / 2), y: box.y + box.height / 2 };
  await page.mouse.move(from.x, from.y);
  await page.mouse.down();
  await glide(page, from, { x: tray.x + tray.width / 2, y: tray.y + tray.height / 2 });
  await page.getByText('Drop here to take it off the board').waitFor({ timeout: 5_000 });
  await page.mouse.up();
}

/** A booking as the test reads it back from the database. */
export interface StoredBooking {
  id: string;
  resourceId: string;
  startsAt: string;
  endsAt: string;
  state: string;
}

/** The bookings of a stage as stored, by resource name. */
export async function storedBookings(knex: Knex, stageId: string): Promise<(StoredBooking & { resource: string })[]> {
  const rows = await knex('bookings')
    .join('resources', 'resources.id', 'bookings.resource_id')
    .where('bookings.stage_id', stageId)
    .orderBy('resources.name')
    .select(
      'bookings.id',
      'bookings.resource_id',
      'bookings.starts_at',
      'bookings.ends_at',
      'bookings.state',
      'resources.name',
    );
  return rows.map(
    (r: { id: unknown; resourceId: unknown; startsAt: Date; endsAt: Date; state: string; name: string }) => ({
      id: String(r.id),
      resourceId: String(r.resourceId),
      startsAt: r.startsAt.toISOString(),
      endsAt: r.endsAt.toISOString(),
      state: r.state,
      resource: r.name,
    }),
  );
}

/** The bookings of a stage the API lists to the signed-in office in a range (GET /api/bookings). */
export async function apiBookings(
  agent: Agent,
  stageId: string,
  from: string,
  to: string,
): Promise<{ id: string; resourceId: string; state: string; startsAt: string }[]> {
  const res = await agent.get('/api/bookings').query({ from, to }).expect(200);
  return (res.body.items as { id: string; stageId: string; resourceId: string; state: string; startsAt: string }[])
    .filter((b) => String(b.stageId) === stageId)
    .map((b) => ({ id: String(b.id), resourceId: String(b.resourceId), state: b.state, startsAt: b.startsAt }));
}
