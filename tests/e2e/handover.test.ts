import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import pino from 'pino';
import sharp from 'sharp';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account } from '../helpers/server.ts';
import { Inbox } from '../helpers/mail.ts';
import { makeHandoverJob, type HandoverFixture } from '../helpers/handover.ts';
import { startMailPipeline, type MailPipeline } from '../../workers/pipeline.ts';
import { S3ObjectStore } from '../../server/storage/object-store.ts';
import { HANDOVER_CHECKLIST } from '../../shared/handover.ts';
import { COMMISSIONING_CHECKS } from '../../shared/water-balance.ts';

/*
 * Connor Reid (the demo's crew member) on a 390 × 844 phone (a common handset size: common
 * practice, no source) commissions a hot tub and hands it over on the demo's today, Mon 1 Jun
 * 2026: the commissioning 09:00–12:00 BST, the handover 12:00–13:00 BST, on his own row. The
 * electrician's certificate is on file. The app's mail goes through the real outbox relay, BullMQ
 * worker and the fake SMTP inbox, so the pack is the e-mail the householder would get.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let pipeline: MailPipeline;
let inbox: Inbox;
let store: S3ObjectStore;
let job: HandoverFixture;

beforeAll(async () => {
  app = await startServer();
  await app.ctx.knex.raw('TRUNCATE outbox, link_uses, link_attempts RESTART IDENTITY');
  store = new S3ObjectStore(app.ctx.config);
  job = await makeHandoverJob(app.ctx.knex, {
    reference: 'HE-501',
    startsAt: '2026-06-01T11:00:00Z',
    store,
    commissionDone: false,
    record: false,
  });
  inbox = new Inbox();
  await inbox.clear();
  const config = { ...app.ctx.config, MAIL_QUEUE: `mail-handover-${process.pid}-${Date.now()}` };
  pipeline = startMailPipeline({
    knex: app.ctx.knex,
    config,
    logger: pino({ level: 'silent' }),
    relay: { idleMs: 50, maxBackoffMs: 1000, scanEveryMs: 3_600_000 },
  });
  browser = await launchBrowser();
  page = await phonePage(browser);
}, 120_000);
afterEach(async (ctx) => {
  if (ctx.task.result?.state === 'fail')
    await page.screenshot({ path: 'tests/e2e/artifacts/handover-failed.png', fullPage: true }).catch(() => undefined);
});
afterAll(async () => {
  await browser?.close();
  await pipeline?.close();
  store?.close();
  await app?.stop();
});

const stateOf = async (stageId: string) =>
  (await app.ctx.knex('bookings').where('stage_id', stageId).first('state'))?.state;

/** Marks a My work card's step, answering the question the page asks first. */
async function mark(card: ReturnType<Page['locator']>, button: string, yes: string): Promise<void> {
  await card.getByRole('button', { name: button, exact: true }).click();
  await page.getByRole('button', { name: yes }).click();
}

/** The householder signs on the pad with the mouse. */
async function drawSignature(): Promise<void> {
  const pad = page.getByTestId('signature-pad');
  await pad.scrollIntoViewIfNeeded();
  const box = (await pad.boundingBox())!;
  await page.mouse.move(box.x + 30, box.y + 120);
  await page.mouse.down();
  for (const [dx, dy] of [
    [80, 40],
    [130, 110],
    [190, 50],
    [260, 100],
    [320, 60],
  ] as const)
    await page.mouse.move(box.x + dx, box.y + dy, { steps: 6 });
  await page.mouse.up();
}

describe('a crew member on a phone', () => {
  it('commissions and hands over on a 390 px page, and the householder gets the pack by e-mail', async () => {
    await signInThroughPage(page, app.url, account('crew').email);
    await page.waitForURL(/\/my-work/);
    const commission = page.locator('article.visit', { hasText: 'HE-501' }).filter({ hasText: 'Commission' });
    await commission.waitFor({ timeout: 15_000 });

    // Before the commissioning, the handover page says it isn't ready, and nobody can sign.
    await page.goto(`${app.url}/jobs/${job.jobId}/handover`);
    await expect
      .poll(() => page.getByTestId('handover-not-ready').textContent())
      .toContain('Commissioning is not marked done yet');
    expect(await page.getByRole('button', { name: 'Sign and hand over' }).isDisabled()).toBe(true);
    await page.goto(`${app.url}/my-work`);
    await commission.waitFor();

    // The commissioning record, filled in on the phone (it saves as it goes).
    await commission.getByRole('link', { name: 'Commissioning record' }).click();
    await page.waitForURL(/\/jobs\/\d+\/commission$/);
    for (const c of COMMISSIONING_CHECKS) await page.getByText(c.label, { exact: true }).click();
    await page.getByText('Chlorine', { exact: true }).click();
    await page.locator('#reading-ph').fill('7.4');
    await page.locator('#reading-ta').fill('100');
    await page.locator('#reading-sanitiser').fill('3.5');
    const photo = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#3a7ca5' } })
      .jpeg()
      .toBuffer();
    await page
      .locator('input[type=file]')
      .setInputFiles({ name: 'running.jpg', mimeType: 'image/jpeg', buffer: photo });
    await page.getByText('commissioning can be marked done from').waitFor({ timeout: 15_000 });
    await expect
      .poll(async () => (await app.ctx.knex('commissioning_records').where('job_id', job.jobId).first('ph'))?.ph, {
        timeout: 10_000,
      })
      .toBe(7.4);
    await page.screenshot({ path: 'tests/e2e/artifacts/handover-commissioning.png', fullPage: true });

    await page.goto(`${app.url}/my-work`);
    await commission.waitFor();
    await mark(commission, 'On site', 'Yes, on site');
    await commission.getByRole('button', { name: 'Done', exact: true }).waitFor();
    await mark(commission, 'Done', 'Yes, done');
    await expect.poll(() => stateOf(job.stage.commission!), { timeout: 10_000 }).toBe('done');
    // The list reloads after a step: its new card offers to take the step back.
    await commission.getByRole('button', { name: 'Not done yet' }).waitFor();

    // The handover with the householder.
    const handover = page.locator('article.visit', { hasText: 'HE-501' }).filter({ hasText: 'Handover' });
    await handover.getByRole('link', { name: 'Hand over' }).click();
    await page.waitForURL(/\/jobs\/\d+\/handover$/);
    const sign = page.getByRole('button', { name: 'Sign and hand over' });
    await sign.waitFor();
    expect(await sign.isDisabled()).toBe(true);
    for (const item of HANDOVER_CHECKLIST) await page.getByText(item.title, { exact: true }).click();
    expect(await page.locator('#handover-name').inputValue()).toBe('Ruth Calder');
    // Crew never see the householder's address itself, only a hint to check it by.
    expect(await page.locator('#handover-email').getAttribute('placeholder')).toBe(
      "The job's address (r…@calder.example)",
    );
    expect(await page.content()).not.toContain('ruth@calder.example');

    // The householder signs with the mouse; "Clear" empties the pad, then they sign again.
    await drawSignature();
    await page.getByRole('button', { name: 'Clear' }).click();
    expect(await sign.isDisabled()).toBe(true);
    await drawSignature();
    await expect.poll(() => sign.isDisabled()).toBe(false);
    await page.screenshot({ path: 'tests/e2e/artifacts/handover-signed-pad.png', fullPage: true });

    await sign.click();
    await page.getByTestId('handover-done').waitFor({ timeout: 20_000 });
    const done = (await page.getByTestId('handover-done').textContent()) ?? '';
    expect(done).toContain('Ruth Calder signed');
    expect(done).toContain('September 2026 (HE-501-S1)');
    await page.screenshot({ path: 'tests/e2e/artifacts/handover-done.png', fullPage: true });
    expect(await stateOf(job.stage.handover!)).toBe('done');
    // Nothing of the page reaches past the phone's width.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);

    const [mail] = await inbox.waitFor(
      (m) => m.to.includes('ruth@calder.example') && m.subject === 'Your hot tub handover pack (HE-501)',
      1,
      30_000,
    );
    expect(mail!.attachments.map((a) => [a.filename, a.contentType])).toEqual([
      ['Handover pack HE-501.pdf', 'application/pdf'],
      ['EIC-7731.pdf', 'application/pdf'],
    ]);
    expect(mail!.text).toContain('Register your warranty'.toUpperCase());
    const [notice] = await inbox.waitFor(
      (m) => m.to.includes('ruth@calder.example') && m.subject === 'Your service visits (HE-501)',
      1,
      30_000,
    );
    expect(notice!.text).toContain('September 2026 (HE-501-S1)');
  }, 180_000);
  it('shows the handover as signed when its answer was lost to a weak signal and Sign is pressed again', async () => {
    const again = await makeHandoverJob(app.ctx.knex, { reference: 'HE-502', startsAt: '2026-06-01T14:00:00Z', store });
    await page.goto(`${app.url}/jobs/${again.jobId}/handover`);
    const sign = page.getByRole('button', { name: 'Sign and hand over' });
    await sign.waitFor();
    for (const item of HANDOVER_CHECKLIST) await page.getByText(item.title, { exact: true }).click();
    await drawSignature();
    await expect.poll(() => sign.isDisabled()).toBe(false);
    // The first Sign reaches the server and is saved; its answer never reaches the phone.
    let lost = 0;
    await page.route(`**/api/jobs/${again.jobId}/handover`, async (route) => {
      if (route.request().method() !== 'POST' || lost > 0) return route.continue();
      lost++;
      await route.fetch();
      await route.abort('connectionreset');
    });
    await sign.click();
    await page.getByText('Waterline could not reach the server').last().waitFor();
    expect(await app.ctx.knex('handovers').where('job_id', again.jobId).first('householder_name')).toEqual({
      householderName: 'Ruth Calder',
    });
    // The form is as it was; pressed again, the server says it is signed, and the page shows it so.
    await sign.click();
    await page.getByTestId('handover-done').waitFor({ timeout: 20_000 });
    expect(await page.getByTestId('handover-done').textContent()).toContain('Ruth Calder signed');
    expect(await app.ctx.knex('handovers').where('job_id', again.jobId)).toHaveLength(1);
    await page.unroute(`**/api/jobs/${again.jobId}/handover`);
  }, 90_000);
});
