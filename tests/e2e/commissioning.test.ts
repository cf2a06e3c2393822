import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import sharp from 'sharp';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';

/*
 * The commissioning record on a phone (390 × 844 CSS pixels, a common handset size: common
 * practice, no source). Connor Reid's crew commissions the demo's TW-2402.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let jobId: string;

beforeAll(async () => {
  app = await startServer();
  jobId = await idOf(app.ctx.knex, 'jobs', { reference: 'TW-2402' });
  browser = await launchBrowser();
  page = await phonePage(browser);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

const status = () => page.locator('.commissioning__status').textContent();
const stillNeeded = () => page.locator('.commissioning__gaps').textContent();

describe('a crew member commissioning on a phone', () => {
  it('ticks the checks, types the readings on a number pad, sees each against the range, adds a photo, and it saves as he goes', async () => {
    await signInThroughPage(page, app.url, account('crew').email);
    await page.waitForURL(/\/my-work/);
    await page
      .locator('article.visit', { hasText: 'TW-2402' })
      .getByRole('link', { name: 'Commissioning record' })
      .first()
      .click();
    await page.waitForURL(new RegExp(`/jobs/${jobId}/commission$`));
    await page.getByRole('heading', { name: 'Commissioning · TW-2402' }).waitFor({ timeout: 15_000 });
    expect(await page.locator('.commissioning__cautions').textContent()).toContain(
      'Never run the pumps or the heater dry',
    );

    for (const label of ['Pumps primed', 'Pumps tested', 'Heater working', 'Lights working', 'No leaks'])
      await page.locator('.commissioning__checks').getByText(label).click();
    await page.getByText('Chlorine', { exact: true }).click();
    expect(await page.locator('#reading-ph').getAttribute('inputmode')).toBe('decimal');
    await page.locator('#reading-ph').fill('7,9');
    await page.locator('#reading-ta').fill('100');
    await page.locator('#reading-sanitiser').fill('4');
    await expect.poll(() => page.locator('.reading', { hasText: 'pH' }).textContent()).toContain('Above range');
    expect(await page.locator('.reading', { hasText: 'pH' }).textContent()).toContain(
      "Firm's range 7.2–7.8 · common practice, no source",
    );
    expect(await page.locator('.reading', { hasText: 'Total alkalinity' }).textContent()).toContain('In range');
    await expect.poll(status, { timeout: 10_000 }).toBe('Saved');
    expect(await stillNeeded()).toContain('pH 7.9 is above');
    expect(await stillNeeded()).toContain('No photo');

    const photo = await sharp({
      create: { width: 800, height: 600, channels: 3, background: { r: 20, g: 120, b: 160 } },
    })
      .jpeg()
      .toBuffer();
    await page
      .locator('.photos input[type=file]')
      .setInputFiles({ name: 'running.jpg', mimeType: 'image/jpeg', buffer: photo });
    await page.locator('.photos__thumb').waitFor({ timeout: 15_000 });
    await page.locator('#commissioning-notes').fill('pH high after the fill: dosed, householder re-tests tomorrow.');
    await expect.poll(() => page.locator('.commissioning__gaps').count(), { timeout: 10_000 }).toBe(0);
    expect(await page.getByText('commissioning can be marked done from').count()).toBe(1);
    await expect.poll(status, { timeout: 10_000 }).toBe('Saved');
    // Nothing runs off the side of the phone.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await page.screenshot({ path: 'tests/e2e/artifacts/commissioning-phone.png', fullPage: true });

    const saved = await app.ctx.knex('commissioning_records').where('job_id', jobId).first();
    expect({
      ph: Number(saved.ph),
      ta: Number(saved.totalAlkalinityPpm),
      s: Number(saved.sanitiserPpm),
      kind: saved.sanitiserKind,
      done: saved.completedAt !== null,
    }).toEqual({ ph: 7.9, ta: 100, s: 4, kind: 'chlorine', done: true });
  }, 90_000);
});
