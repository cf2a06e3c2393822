import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { pencilIn } from '../helpers/mail.ts';

/*
 * Our slots on a phone (390 × 844 CSS pixels, a common handset size: common practice, no source),
 * as Priya Nair of Brightspark Electrical: the connection slots of TW-2417 and TW-2416 (demo
 * scenario) asked of her, answered from the page.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let first: { id: string; version: number };
let second: { id: string; version: number };
let third: { id: string; version: number };
let overnight: { id: string; version: number };

beforeAll(async () => {
  app = await startServer();
  await unbookJobs(app.ctx.knex, 'TW-2415', 'TW-2416', 'TW-2417');
  const ask = (job: string, startsAt: string, endsAt: string) =>
    pencilIn(app.ctx.knex, {
      job,
      stage: 'electrical_connect',
      resource: 'Priya Nair',
      startsAt,
      endsAt,
      state: 'sent',
    });
  // Tue 3 Aug 2027 and Thu 12 Aug 2027, 09:00–13:00 BST.
  first = await ask('TW-2417', '2027-08-03T08:00:00Z', '2027-08-03T12:00:00Z');
  second = await ask('TW-2416', '2027-08-12T08:00:00Z', '2027-08-12T12:00:00Z');
  third = await ask('TW-2415', '2027-08-17T08:00:00Z', '2027-08-17T12:00:00Z');
  // A first fix run over two days: Mon 9 Aug 2027 16:00 to Tue 10 Aug 10:00 BST.
  overnight = await pencilIn(app.ctx.knex, {
    job: 'TW-2417',
    stage: 'electrical_first_fix',
    resource: 'Priya Nair',
    startsAt: '2027-08-09T15:00:00Z',
    endsAt: '2027-08-10T09:00:00Z',
    state: 'sent',
  });
  browser = await launchBrowser();
  page = await phonePage(browser);
  await signInThroughPage(page, app.url, account('partner', 'Brightspark Electrical').email);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

const card = (id: string) => page.locator(`[data-slot-id="${id}"]`);

describe('our slots on a phone', () => {
  it('jumps from the top to each list, the keyboard with it', async () => {
    await page.goto(`${app.url}/slots`);
    const jump = page.getByRole('navigation', { name: 'Slots by state' });
    await jump.waitFor();
    const links = await jump.getByRole('link').allTextContents();
    const headings = await page.getByRole('heading', { level: 2 }).allTextContents();
    // One link a list, worded as its heading, with its count.
    expect(links).toEqual(headings.map((h) => h.replace(/\s+/g, ' ').trim()));
    expect(links.length).toBeGreaterThan(1);
    const last = jump.getByRole('link').last();
    await last.click();
    const heading = page.getByRole('heading', { level: 2 }).last();
    await expect.poll(() => heading.evaluate((el) => el === document.activeElement)).toBe(true);
    // Its heading is at the top of the screen, far down the page.
    const box = await heading.boundingBox();
    expect(Math.abs(box!.y)).toBeLessThan(5);
    expect(await page.evaluate(() => scrollY)).toBeGreaterThan(844);
    expect(new URL(page.url()).hash).toBe('');
  });

  it('confirms a slot from its card', async () => {
    await page.goto(`${app.url}/slots`);
    await card(first.id).waitFor();
    expect(await card(first.id).textContent()).toContain('Tuesday 3 August 2027, 09:00–13:00 (Europe/London, BST)');
    // Whose work and which job, as the e-mail says it: a firm working for several installers can tell.
    expect(await card(first.id).locator('dt:has-text("Work") + dd').textContent()).toBe(
      'Connect and certify for Tideway Hot Tubs (job TW-2417)',
    );
    // A slot that runs over a night says both days, as its e-mail does.
    expect(await card(overnight.id).textContent()).toContain(
      'Monday 9 August 2027 to Tuesday 10 August 2027, 16:00 on the first day to 10:00 on the last (Europe/London, BST)',
    );
    // Each fact sits under its name, so the value has the card's whole width.
    const name = (await card(first.id).locator('dt', { hasText: 'When' }).boundingBox())!;
    const value = (await card(first.id).locator('dt:has-text("When") + dd').boundingBox())!;
    expect(value.y).toBeGreaterThanOrEqual(name.y + name.height - 1);
    expect(Math.abs(value.x - name.x)).toBeLessThan(1);
    // The cautions end with the one note, said once.
    const safety = card(first.id).locator('details');
    await safety.locator('summary').click();
    expect((await safety.textContent())?.split('Follow local codes and licensed practice.')).toHaveLength(2);
    expect(await safety.locator('li').first().textContent()).toBe(
      'Electrical work is for a registered (licensed) electrician only.',
    );
    await card(first.id).getByRole('button', { name: 'Confirm', exact: true }).click();
    await page.getByText('Slot confirmed').waitFor();
    await expect.poll(() => card(first.id).textContent()).toContain('Confirmed');
    expect((await app.ctx.knex('bookings').where('id', first.id).first('state')).state).toBe('confirmed');
  });

  it('never confirms a slot the installer moved since the page loaded: it says so and shows the new time', async () => {
    await page.goto(`${app.url}/slots`);
    await card(second.id).waitFor();
    expect(await card(second.id).textContent()).toContain('Thursday 12 August 2027, 09:00–13:00');
    // The installer moves it to Friday meanwhile (a new version of the booking).
    await app.ctx
      .knex('bookings')
      .where('id', second.id)
      .increment('version', 1)
      .update({ starts_at: '2027-08-13T08:00:00Z', ends_at: '2027-08-13T12:00:00Z' });
    await card(second.id).getByRole('button', { name: 'Confirm', exact: true }).click();
    await page.getByText('This slot was changed since you loaded it').waitFor();
    await expect.poll(() => card(second.id).textContent()).toContain('Friday 13 August 2027, 09:00–13:00');
    expect((await app.ctx.knex('bookings').where('id', second.id).first('state')).state).toBe('sent');
    await page.screenshot({ path: 'tests/e2e/artifacts/slots-phone.png' });
  });

  it('closes the decline dialog when the slot changed meanwhile, so the new time is seen before any answer', async () => {
    await page.goto(`${app.url}/slots`);
    await card(third.id).waitFor();
    await card(third.id).getByRole('button', { name: 'Decline…' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    // A quick choice and 500 characters of one's own are more than the installer can be sent: the box says so.
    await dialog.getByRole('radio').first().check();
    const own = dialog.getByLabel('In your own words');
    await own.fill('x'.repeat(500));
    const problemId = await own.getAttribute('aria-describedby');
    expect(problemId).toBe('decline-reason-problem');
    expect(await dialog.locator(`[id="${problemId}"]`).textContent()).toBe('Keep it to 500 characters.');
    expect(await own.getAttribute('aria-invalid')).toBe('true');
    expect(await dialog.getByRole('button', { name: 'Decline the slot' }).isDisabled()).toBe(true);
    await own.fill('Van off the road');
    expect(await own.getAttribute('aria-describedby')).toBeNull();
    await app.ctx
      .knex('bookings')
      .where('id', third.id)
      .increment('version', 1)
      .update({ starts_at: '2027-08-18T08:00:00Z', ends_at: '2027-08-18T12:00:00Z' });
    await dialog.getByRole('button', { name: 'Decline the slot' }).click();
    await page.getByText('This slot was changed since you loaded it').waitFor();
    await dialog.waitFor({ state: 'hidden' });
    await expect.poll(() => card(third.id).textContent()).toContain('Wednesday 18 August 2027, 09:00–13:00');
    expect((await app.ctx.knex('bookings').where('id', third.id).first('state')).state).toBe('sent');
  });
  it('keeps the slots on screen without a signal, dated, on coming back to them', async () => {
    await page.goto(`${app.url}/slots`);
    await card(first.id).waitFor();
    await page.getByRole('button', { name: 'Menu' }).click();
    await page.getByRole('link', { name: 'Day sheets' }).click();
    await page.waitForURL(/\/slots\/day-sheets/);
    await page.context().setOffline(true);
    try {
      await page.goBack();
      await page.getByTestId('kept-answer').waitFor();
      expect(await card(first.id).textContent()).toContain('Tuesday 3 August 2027, 09:00–13:00');
    } finally {
      await page.context().setOffline(false);
    }
    // The signal back: the slots load again by themselves.
    await page.getByTestId('kept-answer').waitFor({ state: 'detached' });
    await card(first.id).waitFor();
  });
});
