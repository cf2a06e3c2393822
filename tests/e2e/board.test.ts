import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf, signIn } from '../helpers/server.ts';
import { makeJob } from '../helpers/flows.ts';

let app: RunningApp;
let browser: Browser;
let page: Page;

beforeAll(async () => {
  app = await startServer();
  browser = await launchBrowser();
  page = await (
    await browser.newContext({ viewport: { width: 1440, height: 900 }, timezoneId: 'Europe/London' })
  ).newPage();
  // Counts the live stream's booking events as the page receives them (the test's own eyes only).
  await page.addInitScript(() => {
    const Source = window.EventSource;
    window.EventSource = class extends Source {
      constructor(url: string | URL, init?: EventSourceInit) {
        super(url, init);
        this.addEventListener('bookings', () => {
          (window as unknown as { liveEvents: number }).liveEvents =
            ((window as unknown as { liveEvents?: number }).liveEvents ?? 0) + 1;
        });
      }
    };
  });
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** Drags a tray stage onto a resource's row at a local time, as a person would with the mouse. */
async function dragTrayStage(
  stageTitle: string,
  resourceId: string,
  slotDate: string,
  fractionIntoSlot: number,
): Promise<void> {
  const item = page.locator(`.tray-stage[data-title="${stageTitle}"]`);
  await item.scrollIntoViewIfNeeded();
  const from = (await item.boundingBox())!;
  const slot = (await page.locator(`td.fc-timeline-slot-lane[data-date="${slotDate}"]`).first().boundingBox())!;
  const lane = (await page.locator(`td.fc-timeline-lane[data-resource-id="${resourceId}"]`).first().boundingBox())!;
  const to = { x: slot.x + slot.width * fractionIntoSlot + 4, y: lane.y + lane.height / 2 };
  await page.mouse.move(from.x + 20, from.y + 10);
  await page.mouse.down();
  for (let i = 1; i <= 20; i += 1)
    await page.mouse.move(from.x + 20 + ((to.x - from.x - 20) * i) / 20, from.y + 10 + ((to.y - from.y - 10) * i) / 20);
  await page.waitForTimeout(150);
  await page.mouse.up();
}

describe('the scheduler on the board', () => {
  it('books a stage from the tray onto a groundworks crew, and it is still there after a reload', async () => {
    await signInThroughPage(page, app.url, account('scheduler').email);
    await page.waitForURL(/\/board/);
    const gang = await idOf(app.ctx.knex, 'resources', { name: 'Millstone gang' });
    // TW-2423 is an in-ground job waiting in the tray. Week of Monday 14 September 2026, rows filtered to the groundworks firm.
    await page.goto(`${app.url}/board?view=week&date=2026-09-14&q=Millstone`);
    await page.waitForSelector(`td.fc-timeline-lane[data-resource-id="${gang}"]`);
    // The week shows mornings (06:00–12:00) and afternoons; a third of the way into Monday morning is 08:00, when the gang starts work.
    await dragTrayStage('TW-2423 · Pour reinforced base', gang, '2026-09-14T06:00:00', 1 / 3);
    await page.getByText(/Saved/).first().waitFor({ timeout: 10_000 });

    await page.reload();
    const event = page.locator('.fc-event', { hasText: 'TW-2423 · Pour reinforced base' });
    await event.first().waitFor({ timeout: 10_000 });
    const rows = await app.ctx
      .knex('bookings')
      .join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id')
      .where({ 'jobs.reference': 'TW-2423', 'stages.kind': 'base_pour' })
      .select('bookings.*');
    expect(rows).toHaveLength(1);
    // 08:00 BST is 07:00 UTC; the pour lasts its 300 working minutes.
    expect(rows[0].startsAt.toISOString()).toBe('2026-09-14T07:00:00.000Z');
    expect(rows[0].endsAt.toISOString()).toBe('2026-09-14T12:00:00.000Z');
    expect(String(rows[0].resourceId)).toBe(gang);
  }, 90_000);

  it('refuses a lift dropped before the base has cured, and says why', async () => {
    const heron = await idOf(app.ctx.knex, 'resources', { name: 'Crew Heron' });
    await page.goto(`${app.url}/board?view=week&date=2026-09-14&q=Heron`);
    await page.waitForSelector(`td.fc-timeline-lane[data-resource-id="${heron}"]`);
    // Wednesday 16 September 08:00: two days after the pour, far short of 70 % strength.
    await dragTrayStage('TW-2423 · Crane lift into pit', heron, '2026-09-16T06:00:00', 1 / 3);
    const refusal = page.getByText(/Not booked:.*(cure|strength)/i);
    await refusal.first().waitFor({ timeout: 10_000 });
    const rows = await app.ctx
      .knex('bookings')
      .join('stages', 'stages.id', 'bookings.stage_id')
      .join('jobs', 'jobs.id', 'stages.job_id')
      .where({ 'jobs.reference': 'TW-2423', 'stages.kind': 'lift' });
    expect(rows).toEqual([]);
    await page.screenshot({ path: 'tests/e2e/artifacts/board-refused-lift.png' });
  }, 90_000);
  it('holds a live update while a stage is in hand, so the drag is not dropped, and shows it after', async () => {
    const heron = await idOf(app.ctx.knex, 'resources', { name: 'Crew Heron' });
    const priya = await idOf(app.ctx.knex, 'resources', { name: 'Priya Nair' });
    const job = await makeJob(app.ctx.knex, {
      reference: 'LV-201',
      town: 'Pateley Bridge',
      postcode: 'HG3 5AA',
      stages: [{ kind: 'electrical_connect', name: 'Connect and certify', minutes: 240, needs: { electrician: 1 } }],
      links: [],
    });
    const office = await signIn(app.ctx, account('scheduler').email);
    await page.goto(`${app.url}/board?view=week&date=2026-09-14&q=Heron`);
    await page.waitForSelector(`td.fc-timeline-lane[data-resource-id="${heron}"]`);
    await page.getByText('Loading…').waitFor({ state: 'hidden' });
    const seen = () => page.evaluate(() => (window as unknown as { liveEvents?: number }).liveEvents ?? 0);
    const seenBefore = await seen();

    // The scheduler picks the lift up from the tray and is still moving it…
    const item = page.locator('.tray-stage[data-title="TW-2423 · Crane lift into pit"]');
    await item.scrollIntoViewIfNeeded();
    const box = (await item.boundingBox())!;
    const from = { x: box.x + 20, y: box.y + 10 };
    await page.mouse.move(from.x, from.y);
    await page.mouse.down();
    for (let i = 1; i <= 5; i += 1) await page.mouse.move(from.x + i * 4, from.y + i * 2);
    // …when someone else books Priya for another job: the board hears of it at once.
    const made = await office
      .post('/api/bookings')
      .set('X-CSRF-Token', office.csrf)
      .send({ stageId: job.stage.electrical_connect, resourceId: priya, startsAt: '2026-09-17T07:00:00Z' })
      .expect(201);
    await expect.poll(seen, { timeout: 10_000 }).toBeGreaterThan(seenBefore);
    // The board would reload 250 ms after the event: held while the stage is in hand. (An absence
    // can only be waited for: 2 s, eight times the delay.)
    const reloaded = page
      .waitForRequest((r) => r.url().includes('/api/board?'), { timeout: 2_000 })
      .then(
        () => 'reloaded under the drag',
        () => 'held',
      );
    expect(await reloaded).toBe('held');

    // The drag is still alive: over Heron's row on Wednesday 16 September, the engine's verdict shows.
    const slot = (await page
      .locator('td.fc-timeline-slot-lane[data-date="2026-09-16T06:00:00"]')
      .first()
      .boundingBox())!;
    const lane = (await page.locator(`td.fc-timeline-lane[data-resource-id="${heron}"]`).first().boundingBox())!;
    const to = { x: slot.x + slot.width / 3 + 4, y: lane.y + lane.height / 2 };
    const at = from.x + 20;
    for (let i = 1; i <= 20; i += 1)
      await page.mouse.move(at + ((to.x - at) * i) / 20, from.y + 10 + ((to.y - from.y - 10) * i) / 20);
    await page.locator('.drag-reason').waitFor({ timeout: 10_000 });
    // Let go: the held reload runs now, and brings the other booking in.
    const afterDrop = page.waitForResponse((r) => r.url().includes('/api/board?'), { timeout: 10_000 });
    await page.mouse.up();
    const board = (await (await afterDrop).json()) as { bookings: { id: string }[] };
    expect(board.bookings.map((b) => String(b.id))).toContain(String(made.body.bookings[0].id));
  }, 60_000);

  it("opens another page after a new release, though the tab still holds the old one's (its code gone from the server)", async () => {
    await page.goto(`${app.url}/board?view=week&date=2026-09-14`);
    await page.locator('.fc-timeline-lane').first().waitFor();
    // The Jobs page's code, as the tab knows it, is no longer on the server (as after a release):
    // refused until the page is loaded afresh, which brings the release's own files.
    let documents = 0;
    const onRequest = (r: { resourceType: () => string }) => {
      if (r.resourceType() === 'document') documents++;
    };
    page.on('request', onRequest);
    let refused = 0;
    await page.route('**/assets/JobsView-*.js', (route) => {
      if (documents > 0) return route.fallback();
      refused++;
      return route.fulfill({ status: 404, body: 'Not found' });
    });
    try {
      await page.getByRole('navigation').getByRole('link', { name: 'Jobs' }).click();
      await page.getByRole('heading', { name: 'Jobs', level: 1 }).waitFor({ timeout: 15_000 });
      expect(new URL(page.url()).pathname).toBe('/jobs');
      // It took a fresh load of the page, once.
      expect(refused).toBeGreaterThan(0);
      expect(documents).toBe(1);
    } finally {
      page.off('request', onRequest);
      await page.unroute('**/assets/JobsView-*.js');
    }
  }, 60_000);

  it('says when the board is not live (the stream answered 502 while the server restarts), and is live again by itself', async () => {
    await page.goto(`${app.url}/board?view=week&date=2026-09-14`);
    await page.locator('.fc-timeline-lane').first().waitFor();
    // Streams opened from now on get a proxy's 502: the browser gives up on them, the board opens them again.
    let refused = 0;
    await page.route('**/api/board/stream', (route) => {
      refused++;
      return route.fulfill({ status: 502, body: 'Bad gateway' });
    });
    try {
      // The page's own stream is open already: a reload of the page opens a new one, into the 502s.
      await page.reload();
      const notice = page.getByTestId('not-live');
      await notice.waitFor({ timeout: 20_000 });
      expect(await notice.textContent()).toContain('Changes others make may not show until the connection is back');
      expect(refused).toBeGreaterThan(1);
      await page.screenshot({ path: 'tests/e2e/artifacts/board-not-live.png' });
    } finally {
      await page.unroute('**/api/board/stream');
    }
    await page.getByTestId('not-live').waitFor({ state: 'detached', timeout: 30_000 });
  }, 60_000);
});
