import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';
import sharp from 'sharp';
import { S3ObjectStore } from '../../server/storage/object-store.ts';

/*
 * My work on a phone (390 × 844 CSS pixels, a common handset size: common practice, no source).
 * The demo's today is Mon 1 Jun 2026; Connor Reid (the demo crew member) is booked here on his own
 * row today 08:00–12:00 BST for TW-8811's dig, and on Thu 4 Jun for its fill.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let today: string;
let jobId: string;

beforeAll(async () => {
  app = await startServer();
  const knex = app.ctx.knex;
  const tideway = await idOf(knex, 'firms', { name: 'Tideway Hot Tubs' });
  const [job] = await knex('jobs')
    .insert({
      firm_id: tideway,
      reference: 'TW-8811',
      customer_name: 'Mina Holt',
      customer_phone: '07700 900811',
      customer_email: 'mina@home.example',
      site_address: '9 Weir Street',
      site_town: 'Headingley',
      site_postcode: 'LS6 2AB',
      access_notes: 'Side gate 900 mm wide; park on the drive',
      installation_type: 'in_ground',
      status: 'planned',
      unit_id: await idOf(knex, 'units', { model: 'Brook 4' }),
    })
    .returning('id');
  jobId = String(job.id);
  const stage = async (kind: string, name: string, sequence: number) =>
    String(
      (
        await knex('stages')
          .insert({
            job_id: job.id,
            kind,
            name,
            sequence,
            duration_minutes: 240,
            requirements: JSON.stringify([{ kind: 'installer', count: 1 }]),
          })
          .returning('id')
      )[0].id,
    );
  const connor = await idOf(knex, 'resources', { name: 'Connor Reid' });
  const [b] = await knex('bookings')
    .insert({
      stage_id: await stage('excavation', 'Excavate pit', 1),
      resource_id: connor,
      starts_at: '2026-06-01T07:00:00Z',
      ends_at: '2026-06-01T11:00:00Z',
      state: 'confirmed',
    })
    .returning('id');
  today = String(b.id);
  await knex('bookings').insert({
    stage_id: await stage('fill', 'Fill', 2),
    resource_id: connor,
    starts_at: '2026-06-04T07:00:00Z',
    ends_at: '2026-06-04T09:00:00Z',
    state: 'confirmed',
  });
  browser = await launchBrowser();
  page = await phonePage(browser);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

describe('a crew member on a phone', () => {
  it("sees today's work first, with the site, whom to call and the cautions, and marks it on site with an Undo", async () => {
    await signInThroughPage(page, app.url, account('crew').email);
    await page.waitForURL(/\/my-work/);
    const card = page.locator('article.visit', { hasText: 'TW-8811' }).filter({ hasText: 'Excavate pit' });
    await card.waitFor({ timeout: 15_000 });
    expect(await page.locator('h2').first().textContent()).toBe('Today');
    // The hours he and his crew work to, above the day list (the demo's standard week).
    expect((await page.getByTestId('my-hours').textContent())?.trim()).toBe(
      'Your hours: Mon–Fri 08:00–17:00 (Standard week).',
    );
    await expect.poll(() => card.textContent()).toContain('LS6 2AB');
    const text = (await card.textContent()) ?? '';
    expect(text).toContain('9 Weir Street');
    expect(text).toContain('Site contact: Mina Holt');
    expect(text).toContain('0113 496 0001'); // the office's phone
    expect(text).toContain('Cautions');
    // Thursday's fill can't be marked yet: no "On site" on it.
    const thursday = page.locator('article.visit', { hasText: 'TW-8811' }).filter({ hasText: 'Fill' });
    expect(await thursday.getByRole('button', { name: 'On site' }).count()).toBe(0);
    await page.screenshot({ path: 'docs/crew-phone.png' });

    await card.getByRole('button', { name: 'On site' }).click();
    await page.getByRole('button', { name: 'Yes, on site' }).click();
    await page.getByText('Excavate pit: marked on site').waitFor();
    await expect
      .poll(async () => (await app.ctx.knex('bookings').where('id', today).first('state')).state)
      .toBe('on_site');
    await card.getByRole('button', { name: 'Done' }).waitFor();
    await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-on-site.png' });

    await page.getByRole('button', { name: 'Undo' }).click();
    await expect
      .poll(async () => (await app.ctx.knex('bookings').where('id', today).first('state')).state)
      .toBe('confirmed');
    await card.getByRole('button', { name: 'On site' }).waitFor();
  }, 90_000);
  it('keeps the work and the job on screen without a signal, dated, and keeps a step marked meanwhile until it is back', async () => {
    await page.goto(`${app.url}/my-work`);
    const card = page.locator('article.visit', { hasText: 'TW-8811' }).filter({ hasText: 'Excavate pit' });
    await card.waitFor({ timeout: 15_000 });
    await card.getByRole('link', { name: 'The job' }).click();
    await page.getByRole('heading', { name: /TW-8811/ }).waitFor();

    // In the garden behind the house: no signal. Back to the list, and to the job again.
    await page.context().setOffline(true);
    try {
      await page.goBack();
      const notice = page.getByTestId('kept-answer');
      await notice.waitFor();
      expect(await notice.textContent()).toMatch(
        /could not reach the server.*Below is what was loaded at \d\d:\d\d: it may have changed since/,
      );
      expect(await card.textContent()).toContain('9 Weir Street');
      await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-no-signal.png' });
      await page.goForward();
      await page.getByRole('heading', { name: /TW-8811/ }).waitFor();
      await page.getByTestId('kept-answer').waitFor();
      expect(await page.getByText('Excavate pit').count()).toBeGreaterThan(0);
      await page.goBack();
      await card.waitFor();
      // A step marked without the server is kept on the phone, shown marked, with when.
      await card.getByRole('button', { name: 'On site' }).click();
      await page.getByRole('button', { name: 'Yes, on site' }).click();
      await page
        .getByText('No signal: Excavate pit marked on site on this phone, sent when there is a signal')
        .waitFor();
      await card.getByRole('button', { name: 'Done' }).waitFor();
      expect(await card.getByTestId('kept-step').textContent()).toMatch(
        /Marked at \d\d:\d\d on this phone, not sent yet: no signal\./,
      );
      expect(await page.getByTestId('kept-steps').textContent()).toContain('1 step marked on this phone');
      expect((await app.ctx.knex('bookings').where('id', today).first('state')).state).toBe('confirmed');
      // Kept in the phone's storage (a closed tab keeps it too), and nothing of the householder's with it.
      const stored = await page.evaluate(() =>
        Object.keys(localStorage)
          .filter((k) => k.startsWith('waterline:kept-steps:'))
          .map((k) => localStorage.getItem(k))
          .join(),
      );
      expect(stored).toContain('"action":"arrive"');
      expect(stored).not.toMatch(/Weir Street|Mina Holt|LS6|07700/);
      await page.getByRole('dialog').waitFor({ state: 'detached' });
      await page.waitForFunction(() => document.getAnimations().length === 0);
      await page.getByTestId('kept-steps').scrollIntoViewIfNeeded();
      await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-kept-step.png' });
      // Another page says the step waits, and that it goes by itself.
      await card.getByRole('link', { name: 'The job' }).click();
      const elsewhere = page.getByTestId('kept-elsewhere');
      await elsewhere.waitFor();
      expect(await elsewhere.textContent()).toMatch(
        /1 step marked without a signal is waiting on this\s+phone: sent by itself once there is a signal \(see it on My work\)\.\s*Send now/,
      );
      // The job page says the step waits on its booking, beside the state the server has.
      await page.locator('.stage__title', { hasText: 'Excavate pit' }).click();
      expect(await page.locator('.stage__bookings li').first().textContent()).toMatch(
        /Confirmed · on this phone, not sent yet: marked on site at \d\d:\d\d/,
      );
      await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-kept-elsewhere.png' });
      // Send now with still no signal says so, and keeps the step.
      await elsewhere.getByRole('button', { name: 'Send now' }).click();
      await page.locator('#messages').getByText('Waterline could not reach the server').waitFor();
      expect(await elsewhere.count()).toBe(1);
    } finally {
      await page.context().setOffline(false);
    }
    // The signal back while the job page is open: the kept step goes from there, with the time it
    // was marked, and the job page stays where it was.
    await page.getByText('Sent 1 step kept on this phone').waitFor({ timeout: 15_000 });
    await page.getByTestId('kept-elsewhere').waitFor({ state: 'detached' });
    await page.getByTestId('kept-answer').waitFor({ state: 'detached' });
    expect(new URL(page.url()).pathname).toBe(`/jobs/${jobId}`);
    // Loaded again by itself: the booking as it now stands, nothing said to wait.
    await expect
      .poll(() => page.locator('.stage__bookings li').first().textContent())
      .toMatch(/On site · since (07:59|08:00)$/);
    expect((await app.ctx.knex('bookings').where('id', today).first('state')).state).toBe('on_site');
    const audit = await app.ctx
      .knex('audit_log')
      .where({ entity: 'booking', entity_id: today })
      .orderBy('id', 'desc')
      .first('after');
    expect(audit.after).toMatchObject({ action: 'arrive', markedAt: expect.stringMatching(/^2026-06-01T/) });
    // Back on My work: nothing waits, and the card shows the booking as it now stands.
    await page.goBack();
    await card.getByRole('button', { name: 'Done' }).waitFor();
    expect(await page.getByTestId('kept-steps').count()).toBe(0);
    expect(await card.getByTestId('kept-step').count()).toBe(0);
    // The job page says when the crew were on site: the time the step was marked, a moment before
    // it was sent (the server's test clock is Mon 1 Jun 08:00 BST).
    await card.getByRole('link', { name: 'The job' }).click();
    await page.locator('.stage__title', { hasText: 'Excavate pit' }).click();
    await expect
      .poll(() => page.locator('.stage__bookings li').first().textContent())
      .toMatch(/On site · since (07:59|08:00)/);
    await page.waitForFunction(() => document.getAnimations().length === 0);
    await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-job-on-site.png' });
  }, 60_000);
  it("shows the scheduler on the board's job panel when the crew were on site", async () => {
    const office = await browser.newContext({ viewport: { width: 1280, height: 800 }, timezoneId: 'Europe/London' });
    try {
      const desk = await office.newPage();
      await signInThroughPage(desk, app.url, account('scheduler').email);
      await desk.goto(`${app.url}/board?view=day&date=2026-06-01`);
      await desk.locator(`.fc-event[data-booking-id="${today}"]`).click();
      const drawer = desk.locator('.n-drawer');
      await drawer.getByText('TW-8811 · Headingley').waitFor();
      // The step marked on the phone above (kept, then sent): its time, as the job page says it.
      await expect
        .poll(() => drawer.locator('.bookings__item--on_site').textContent())
        .toMatch(/Connor Reid · On site · since (07:59|08:00)/);
    } finally {
      await office.close();
    }
  }, 60_000);

  it('asks before signing out while a step marked without a signal has not gone', async () => {
    const key = await page.evaluate(async () => {
      const s = await (await fetch('/api/session')).json();
      return `waterline:kept-steps:${s.firm.id}:${s.user.id}`;
    });
    const waiting = [
      {
        bookingId: today,
        action: 'finish',
        version: 1,
        markedAt: new Date().toISOString(),
        label: 'Excavate pit · TW-8811',
      },
    ];
    await page.goto(`${app.url}/jobs/${jobId}`);
    await page.getByRole('heading', { name: /TW-8811/ }).waitFor();
    // Kept while there is no signal, so no page sends it (kept steps go from any page once there is one).
    await page.context().setOffline(true);
    try {
      await page.evaluate(([k, v]) => localStorage.setItem(k!, v!), [key, JSON.stringify(waiting)]);
      await page.getByRole('button', { name: 'Menu' }).click();
      await page.getByRole('button', { name: 'Sign out' }).last().click();
      const ask = page.getByRole('dialog', { name: 'Sign out with steps not sent?' });
      await ask.waitFor();
      expect(await ask.textContent()).toContain(
        '1 step marked without a signal has not gone yet. It stays on this phone and goes once you sign in again with a signal, within 48 hours.',
      );
      await ask.getByRole('button', { name: 'Stay signed in' }).click();
      await ask.waitFor({ state: 'detached' });
      expect(new URL(page.url()).pathname).toBe(`/jobs/${jobId}`);
      await page.evaluate((k) => localStorage.removeItem(k), key);
    } finally {
      await page.context().setOffline(false);
    }
    expect(await page.evaluate(async () => (await fetch('/api/session')).status)).toBe(200);
  }, 60_000);
  it('names each slip in the survey under its box, keeps what was typed, saves nothing, then saves it put right', async () => {
    await page.goto(`${app.url}/jobs/${jobId}/survey`);
    const width = page.getByLabel('Narrowest width (mm)');
    await width.waitFor();
    const steps = page.getByLabel('Steps', { exact: true });
    const fuse = page.getByLabel('Main fuse (A)');
    await width.fill('900');
    await page.getByLabel('Ground type').selectOption({ label: 'Clay' });
    // Out of range: a box with a lowest value would quietly have made these 0 and 1 (or 400).
    await steps.fill('-2');
    await fuse.fill('1000');
    await page.getByRole('button', { name: 'Save survey' }).click();

    /** The sentence a box points at (it is marked invalid), or null when it points at none. */
    const problemOf = async (box: typeof steps) => {
      const id = await box.getAttribute('aria-describedby');
      if (id === null) return null;
      expect(await box.getAttribute('aria-invalid')).toBe('true');
      return page.locator(`[id="${id}"]`).textContent();
    };
    await expect.poll(() => problemOf(steps)).toBe('Steps cannot be negative');
    // The first box with a problem is brought into view and focused: on a phone it is far above the button.
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe('survey-steps');
    expect(await problemOf(fuse)).toBe('The main fuse must be at most 400 A');
    expect(await problemOf(width)).toBeNull();
    expect(await steps.inputValue()).toBe('-2');
    expect(await fuse.inputValue()).toBe('1000');
    expect(await app.ctx.knex('surveys').where('job_id', jobId).first()).toBeUndefined();
    await page.screenshot({ path: 'tests/e2e/artifacts/crew-phone-survey-problems.png' });

    await steps.fill('2');
    await fuse.fill('100');
    await page.getByRole('button', { name: 'Save survey' }).click();
    await page.getByText('Survey saved').waitFor();
    expect(
      await app.ctx.knex('surveys').where('job_id', jobId).first('steps', 'main_fuse_amps', 'access_width_mm'),
    ).toEqual({
      steps: 2,
      mainFuseAmps: 100,
      accessWidthMm: 900,
    });
  }, 60_000);
  it("makes a camera's large photo small on the phone before sending it, upright, its location the firm's choice", async () => {
    // A 12-megapixel photo held on its side (EXIF orientation 6) from an invented camera, with a
    // position near Otley; noise makes it as large as a camera's (several MB).
    const taken = await sharp({
      create: {
        width: 4000,
        height: 3000,
        channels: 3,
        background: { r: 0, g: 0, b: 0 },
        noise: { type: 'gaussian', mean: 128, sigma: 40 },
      },
    })
      .jpeg({ quality: 92 })
      .withExif({
        IFD0: { Make: 'Otterbrook', Model: 'Field Camera 2' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '53/1 54/1 3/1', GPSLongitudeRef: 'W', GPSLongitude: '1/1 41/1 2/1' },
      })
      .withMetadata({ orientation: 6 })
      .toBuffer();
    expect(taken.length).toBeGreaterThan(2 * 1024 * 1024);
    const store = new S3ObjectStore(app.ctx.config);
    const firm = await idOf(app.ctx.knex, 'firms', { name: 'Tideway Hot Tubs' });
    const stored = async (name: string) => {
      const row = await app.ctx.knex('job_files').where({ job_id: jobId, name }).first('object_key', 'size_bytes');
      const body = await store.get(row.objectKey);
      return { size: Number(row.sizeBytes), body, meta: await sharp(body).metadata() };
    };
    try {
      for (const [name, keep] of [
        ['pit-north.jpg', false],
        ['pit-south.jpg', true],
      ] as const) {
        await app.ctx
          .knex('firm_settings')
          .insert({ firm_id: firm, keep_photo_location: keep })
          .onConflict('firm_id')
          .merge(['keep_photo_location']);
        await page.goto(`${app.url}/jobs/${jobId}/survey`);
        await page.locator('input[type=file]').first().setInputFiles({ name, mimeType: 'image/jpeg', buffer: taken });
        await page.getByText(`${name} saved`).waitFor({ timeout: 30_000 });
        const { size, body, meta } = await stored(name);
        // Sent at most 2,560 px on its long side, drawn upright (portrait), and a fraction of the size.
        expect({ width: meta.width, height: meta.height, orientation: meta.orientation ?? 1 }).toEqual({
          width: 1920,
          height: 2560,
          orientation: 1,
        });
        expect(size).toBe(body.length);
        expect(size).toBeLessThan(taken.length / 2);
        // The camera and place went with it; the server kept them only where the firm keeps locations.
        expect(body.includes(Buffer.from('Otterbrook'))).toBe(keep);
      }
    } finally {
      await app.ctx.knex('firm_settings').where('firm_id', firm).update({ keep_photo_location: false });
      store.close();
    }
  }, 90_000);
});
