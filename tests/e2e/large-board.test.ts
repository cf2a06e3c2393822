import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';

/**
 * A board of more rows than the timeline draws bookings for at once (event-window.ts): the demo
 * firm gets 80 more machines, each with one booking of its own on Tuesday 2 June 2026, and the
 * board opens with every group open. Only the rows in view carry their bookings; the rest keep
 * their height, so the names and the lanes stay level and the scrollbar is true.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
const EXTRA = 80;
/** The booking on the last of the new machines (the board's foot), and its machine. */
let lastBooking = '';
let lastMachine = '';
let totalBookings = 0;

beforeAll(async () => {
  app = await startServer();
  const knex = app.ctx.knex;
  const firmId = await idOf(knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [{ calendar_id: calendarId }] = await knex('resources').where({ firm_id: firmId }).select('calendar_id');
  const [job] = await knex('jobs')
    .insert({
      firm_id: firmId,
      reference: 'TW-2499',
      customer_name: 'Orla Penhale',
      site_address: '8 Quarry Lane',
      site_town: 'Burley',
      site_postcode: 'LS29 7AB',
      installation_type: 'slab',
      status: 'planned',
    })
    .returning('id');
  for (let i = 0; i < EXTRA; i += 1) {
    // "Yard" names sort after the demo's own pallet trucks (the board orders rows by group, kind, name).
    const [machine] = await knex('resources')
      .insert({
        firm_id: firmId,
        name: `Yard pallet truck ${String(i).padStart(2, '0')}`,
        category: 'machine',
        kind: 'pallet_truck',
        calendar_id: calendarId,
      })
      .returning('id');
    const [stage] = await knex('stages')
      .insert({
        job_id: job.id,
        kind: 'delivery',
        name: `Move pallet ${i + 1}`,
        sequence: i + 1,
        duration_minutes: 120,
        requirements: JSON.stringify([{ kind: 'pallet_truck', count: 1 }]),
      })
      .returning('id');
    const [booking] = await knex('bookings')
      .insert({
        stage_id: stage.id,
        resource_id: machine.id,
        starts_at: new Date('2026-06-02T08:00:00Z'),
        ends_at: new Date('2026-06-02T10:00:00Z'),
        state: 'pencilled',
      })
      .returning('id');
    lastBooking = String(booking.id);
    lastMachine = String(machine.id);
  }
  browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 }, timezoneId: 'Europe/London' });
  page = await context.newPage();
  await signInThroughPage(page, app.url, account('scheduler').email);
  const answer = await page.evaluate(
    async () => (await (await fetch('/api/board?from=2026-06-01T00:00:00Z&to=2026-06-08T00:00:00Z')).json()) as never,
  );
  totalBookings = (answer as { bookings: { state: string }[] }).bookings.filter((b) => b.state !== 'declined').length;
}, 90_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

const scroller = 'document.querySelector(".fc-timeline-body").closest(".fc-scroller")';
const drawnIn = (p: Page, rowId: string) =>
  p.locator(`td.fc-timeline-lane[data-resource-id="${rowId}"] .fc-event.wl-booking`).count();

/** Every row's name cell and lane are as tall as each other (within a pixel). */
const unevenRows = (p: Page) =>
  p.evaluate(() =>
    [...document.querySelectorAll<HTMLElement>('td.fc-timeline-lane[data-resource-id]')]
      .map((lane) => {
        const id = lane.dataset.resourceId!;
        const name = document.querySelector(`.fc-datagrid-cell.fc-resource[data-resource-id="${id}"]`)!;
        return { id, lane: lane.getBoundingClientRect().height, name: name.getBoundingClientRect().height };
      })
      .filter((r) => Math.abs(r.lane - r.name) > 1),
  );

describe('a board of more rows than fit, every group open', () => {
  it('draws the bookings of the rows in view, and those further down once scrolled to', async () => {
    await page.goto(`${app.url}/board?view=week&date=2026-06-01&groups=open`);
    await page.waitForSelector(`td.fc-timeline-lane[data-resource-id="${lastMachine}"]`);
    await expect
      .poll(() => page.locator('.fc-event.wl-booking[title]').count(), { timeout: 10_000 })
      .toBeGreaterThan(5);
    const rows = await page.locator('td.fc-timeline-lane[data-resource-id]').count();
    expect(rows).toBeGreaterThan(EXTRA);
    // Every row is there; the bookings drawn are fewer than the week has, and none at the foot.
    const drawnAtTop = await page.locator('.fc-event.wl-booking').count();
    expect(drawnAtTop).toBeLessThan(totalBookings);
    expect(await drawnIn(page, lastMachine)).toBe(0);
    expect(await unevenRows(page)).toEqual([]);
    const height = await page.evaluate(`${scroller}.scrollHeight`);

    // Scrolled down to the last new machine (partners' rows follow it, to the foot).
    await page.evaluate(
      ([sel, id]) => {
        const el = document.querySelector(sel)!.closest('.fc-scroller')!;
        const lane = document.querySelector(`td.fc-timeline-lane[data-resource-id="${id}"]`)!;
        el.scrollTop += lane.getBoundingClientRect().top - el.getBoundingClientRect().top - 200;
      },
      ['.fc-timeline-body', lastMachine] as const,
    );
    await expect.poll(() => drawnIn(page, lastMachine), { timeout: 10_000 }).toBe(1);
    await page.screenshot({ path: 'tests/e2e/artifacts/board-large-scrolled.png' });
    expect(await unevenRows(page)).toEqual([]);
    // Rows kept the height of their bookings: drawing them changed the board's length by less than
    // three rows (a row of wrapped names can stack deeper than the estimate; without the kept heights
    // the 80 new rows alone would shrink it by some 2,000 px).
    expect(Math.abs(Number(await page.evaluate(`${scroller}.scrollHeight`)) - Number(height))).toBeLessThan(150);
    // The rows at the top have let their bookings go.
    expect(await page.locator('.fc-event.wl-booking').count()).toBeLessThan(totalBookings);

    // Scrolled to the foot, the view stays at the foot while the rows near it settle their heights.
    await page.evaluate(`${scroller}.scrollTop = ${scroller}.scrollHeight`);
    await expect
      .poll(
        () =>
          page.evaluate(() => {
            const view = document.querySelector('.fc-timeline-body')!.closest('.fc-scroller')!;
            const lanes = [...document.querySelectorAll('td.fc-timeline-lane[data-resource-id]')];
            return Math.round(
              view.getBoundingClientRect().bottom - lanes[lanes.length - 1]!.getBoundingClientRect().bottom,
            );
          }),
        { timeout: 10_000 },
      )
      .toBeGreaterThanOrEqual(-2);
    expect(await unevenRows(page)).toEqual([]);
    expect(await page.locator(`[data-booking-id="${lastBooking}"]`).getAttribute('title')).toMatch(
      /Tue 2 Jun 09:00–11:00/,
    );
  }, 60_000);

  it('a report’s link to a booking at the foot scrolls to it and outlines it', async () => {
    await page.goto(`${app.url}/board?view=week&date=2026-06-01&groups=open&highlight=${lastBooking}`);
    const outlined = page.locator(`.fc-event.wl-pointed[data-booking-id="${lastBooking}"]`);
    await outlined.waitFor({ timeout: 10_000 });
    await expect
      .poll(async () => {
        const box = await outlined.boundingBox();
        return box !== null && box.y > 0 && box.y + box.height < 800;
      })
      .toBe(true);
  }, 60_000);
});
