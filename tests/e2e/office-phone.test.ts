import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';
import { JOB_SEARCH_MAX } from '../../shared/schemas/jobs.ts';
import { LinkSigner } from '../../server/services/links.ts';

/*
 * The office pages on a phone (390 × 844 CSS pixels, a common handset size: common practice, no
 * source), as the owner of the demo installer: the jobs list, the firm's people and the stage
 * templates read without scrolling sideways. Then the same owner on a tablet (the window resized):
 * the header folds into its Menu, and the templates and reports tables turn into fields and cards.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;

beforeAll(async () => {
  app = await startServer();
  browser = await launchBrowser();
  page = await phonePage(browser);
  await signInThroughPage(page, app.url, account('owner').email);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** How far anything on the page, or any table's own scroller, runs past its width (CSS pixels). */
const overflow = () =>
  page.evaluate(() => {
    const sideways = (el: Element) => el.scrollWidth - el.clientWidth;
    return Math.max(
      sideways(document.documentElement),
      ...[...document.querySelectorAll('table, .n-scrollbar-container, .n-data-table-base-table-body')].map((el) =>
        sideways(el),
      ),
    );
  });

describe('office pages on a phone', () => {
  it('lists the jobs in two stacked columns: job and state, then customer, site, unit and dates', async () => {
    await page.goto(`${app.url}/jobs`);
    const first = page.locator('.n-data-table-tbody .n-data-table-tr').first();
    await first.waitFor();
    expect(await page.locator('.n-data-table-th').allTextContents()).toEqual(['Job', 'Customer and site']);
    expect(await first.textContent()).toMatch(/Promised|Not promised yet/);
    expect(await overflow()).toBeLessThanOrEqual(1);
    await page.screenshot({ path: 'tests/e2e/artifacts/jobs-phone.png' });
    // A pasted paragraph stops at the longest search the list takes, instead of the list failing.
    const box = page.getByLabel('Search jobs');
    await box.fill('Otley '.repeat(30));
    expect((await box.inputValue()).length).toBe(JOB_SEARCH_MAX);
    await page.getByText('No jobs match').waitFor();
    await box.fill('');
    await first.waitFor();
  });

  it("shows each person's name, e-mail and role in view", async () => {
    await page.goto(`${app.url}/firm`);
    const owner = page.locator('.n-data-table-tr', { hasText: account('owner').email });
    await owner.waitFor();
    // The role is the list the owner changes it with, showing the person's own.
    const role = owner.getByLabel(`Role of ${account('owner').name}`);
    expect(await role.isVisible()).toBe(true);
    expect(await role.evaluate((s: HTMLSelectElement) => s.selectedOptions[0]?.textContent)).toBe('Owner');
    expect(await overflow()).toBeLessThanOrEqual(1);
  });

  it('labels every field of the stage templates, the header row being hidden', async () => {
    await page.goto(`${app.url}/templates`);
    await page.locator('table.grid').waitFor();
    const minutes = page.locator('td[data-label="Minutes of work"]').first();
    expect(await minutes.evaluate((td) => getComputedStyle(td, '::before').content)).toBe('"Minutes of work"');
    expect(await page.locator('table.grid thead').isVisible()).toBe(false);
    expect(await overflow()).toBeLessThanOrEqual(1);
    // Whose notice each is: the delivery's, counted from the unit's order, has no party and reads
    // as the whole stage's (the default stores none at all), never as an empty choice.
    const whose = (stage: string) =>
      page
        .getByLabel(`Who needs the notice for ${stage}`)
        .evaluate((s: HTMLSelectElement) => s.selectedOptions[0]?.textContent?.trim() ?? '');
    expect(await whose('Delivery')).toBe('for the whole stage');
    expect(await whose('Crane lift into pit')).toBe('for the crane');
    // And whose notice it is, in the template's own words.
    const deliveryNotice = page.locator('.notice', { has: page.getByLabel('Who needs the notice for Delivery') });
    expect(await deliveryNotice.textContent()).toContain("(the maker's lead time)");
    await page.screenshot({ path: 'tests/e2e/artifacts/templates-phone.png' });
  });

  it("opens an invitation's page with a long address wrapped inside it, nothing off the edge", async () => {
    const email = 'alexandra.montgomerywhitfield.sitescheduling@northernhottubinstallations.example';
    const session = await (await page.request.get(`${app.url}/api/session`)).json();
    const made = await page.request.post(`${app.url}/api/firm/invitations`, {
      headers: { 'X-CSRF-Token': session.csrfToken },
      data: { email, role: 'scheduler' },
    });
    expect(made.status(), await made.text()).toBe(201);
    // The link its e-mail carries, signed as the mail path signs it.
    const token = await new LinkSigner(app.ctx.config.LINK_SECRET).signInvite({
      invitationId: String((await made.json()).id),
      expiresAt: new Date(Date.now() + 86_400_000),
    });
    await page.goto(`${app.url}/invite/${token}`);
    await page.getByRole('heading', { name: 'Join Tideway Hot Tubs on Waterline' }).waitFor();
    expect(await page.getByText(email).isVisible()).toBe(true);
    expect(await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth)).toBe(
      0,
    );
  });

  it("names a template's slips by stage, marks their boxes, brings the first into view, and saves nothing", async () => {
    await page.goto(`${app.url}/templates`);
    await page.locator('table.grid').waitFor();
    const stored = () => app.ctx.knex('stage_templates').count({ n: '*' }).first();
    const before = await stored();
    const fallback = page.getByLabel('Fallback minutes for Excavate pit');
    await fallback.fill('5');
    const gap = page.getByLabel('Gap between Site survey and Excavate pit', { exact: true });
    await gap.fill('-1');
    await page.getByRole('button', { name: 'Save template' }).click();
    const list = page.locator('.problems');
    await list.waitFor();
    expect(await list.locator('li').allTextContents()).toEqual([
      'Excavate pit: the minutes of work must be at least 15 minutes',
      'Excavate pit after Site survey: the gap cannot be negative',
    ]);
    // Each box points at its own line; the first (far above the button on a phone) has the cursor.
    for (const [b, line] of [
      [fallback, 0],
      [gap, 1],
    ] as const) {
      expect(await b.getAttribute('aria-invalid')).toBe('true');
      expect(await b.getAttribute('aria-describedby')).toBe(await list.locator('li').nth(line).getAttribute('id'));
    }
    await expect.poll(() => fallback.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await stored()).toEqual(before);
    // Put right, the marks go with the list.
    await page.getByRole('button', { name: 'Discard changes' }).click();
    expect(await list.count()).toBe(0);
    expect(await fallback.getAttribute('aria-invalid')).toBeNull();
  });

  it('refuses a deposit typed on a page loaded before someone else changed it, and shows theirs', async () => {
    await page.goto(`${app.url}/firm`);
    const box = page.locator('#deposit-percent');
    await box.waitFor();
    expect(await box.inputValue()).toBe('25');
    // Another tab of the same owner saves 30 % meanwhile.
    const other = await page.context().newPage();
    await other.goto(`${app.url}/firm`);
    await other.locator('#deposit-percent').fill('30');
    await other.locator('#deposit-percent').press('Tab');
    await other.locator('form.deposit button[type=submit]').click();
    await other.getByText('Deposits are now asked for at 30 % of the price').waitFor();
    try {
      await box.fill('20');
      await box.press('Tab');
      await page.locator('form.deposit button[type=submit]').click();
      await page.getByText('Someone else set the deposit to 30 % since you loaded it').waitFor();
      // The card now shows theirs, so the next save is made knowing it.
      await expect.poll(() => box.inputValue()).toBe('30');
    } finally {
      await other.locator('#deposit-percent').fill('25');
      await other.locator('#deposit-percent').press('Tab');
      await other.locator('form.deposit button[type=submit]').click();
      await other.getByText('Deposits are now asked for at 25 % of the price').waitFor();
      await other.close();
    }
  });

  it("folds the header into the Menu on a tablet, where the owner's links and account don't fit on one line", async () => {
    const header = page.locator('header.app-header');
    /** The header's visible controls: whether the Menu is one, and the furthest right edge of any. */
    const look = () =>
      header.evaluate((h) => {
        const shown = [...h.querySelectorAll<HTMLElement>('a, button, select, p')].filter((e) => e.offsetWidth > 0);
        return {
          menu: shown.some((e) => e.textContent?.trim() === 'Menu'),
          signOut: shown.some((e) => e.textContent?.trim() === 'Sign out'),
          right: Math.max(...shown.map((e) => e.getBoundingClientRect().right)),
        };
      });
    await page.goto(`${app.url}/jobs`);
    await page.getByRole('heading', { name: 'Jobs', level: 1 }).waitFor();
    try {
      // A tablet upright and on its side (768 and 1024 CSS pixels wide: common practice, no source):
      // before, the links and account ran on past the edge and "Sign out" could not be reached.
      for (const width of [768, 1024]) {
        await page.setViewportSize({ width, height: 1024 });
        await expect.poll(look).toEqual({ menu: true, signOut: false, right: expect.any(Number) });
        expect((await look()).right).toBeLessThanOrEqual(width);
        await header.getByRole('button', { name: 'Menu' }).click();
        const drawer = page.getByRole('dialog', { name: 'Menu' });
        await drawer.getByRole('button', { name: 'Sign out' }).waitFor();
        await page.keyboard.press('Escape');
        await drawer.waitFor({ state: 'hidden' });
      }
      // A desk screen: everything on one line, inside the window.
      await page.setViewportSize({ width: 1280, height: 800 });
      await expect.poll(look).toEqual({ menu: false, signOut: true, right: expect.any(Number) });
      expect((await look()).right).toBeLessThanOrEqual(1280);
      expect(await header.getByRole('link', { name: 'Reports' }).isVisible()).toBe(true);
    } finally {
      await page.setViewportSize({ width: 390, height: 844 });
    }
  });

  it('lays the jobs, the templates and the reports out for a tablet held upright: stacked columns, fields and cards, nothing off the edge', async () => {
    /** Whether the first table of this kind shows its header row (a table) or not (cards and fields). */
    const asTable = (selector: string) =>
      page
        .locator(selector)
        .first()
        .evaluate((t) => (t.querySelector('thead') as HTMLElement).offsetWidth > 1);
    try {
      for (const [width, wide] of [
        [768, false],
        [1280, true],
      ] as const) {
        await page.setViewportSize({ width, height: 1024 });
        await page.goto(`${app.url}/jobs`);
        await page.locator('.n-data-table-tbody .n-data-table-tr').first().waitFor();
        const headings = await page.locator('.n-data-table-th').allTextContents();
        expect(headings.length).toBe(wide ? 6 : 2);
        expect(await overflow()).toBeLessThanOrEqual(1);
        await page.goto(`${app.url}/templates`);
        await page.locator('table.grid').waitFor();
        expect(await asTable('table.grid')).toBe(wide);
        expect(await overflow()).toBeLessThanOrEqual(1);
        await page.goto(`${app.url}/reports`);
        await page.getByRole('heading', { name: 'Hired machines' }).waitFor();
        await page.locator('table.report-table').first().waitFor();
        expect(await asTable('table.report-table')).toBe(wide);
        expect(await overflow()).toBeLessThanOrEqual(1);
      }
    } finally {
      await page.setViewportSize({ width: 390, height: 844 });
    }
  });

  it('saves a quantity setting from the Firm page, and names a setting out of bounds under it without sending it', async () => {
    await page.goto(`${app.url}/firm`);
    const gap = page.getByLabel('Service gap round the unit (mm each side)');
    await gap.waitFor({ timeout: 10_000 });
    const was = await gap.inputValue();
    // The card's button says how many changes it would save ("Save 1 change", "Save changes").
    const save = page.getByRole('button', { name: /^Save (\d+ )?changes?$/ });
    const writes: string[] = [];
    const onRequest = (r: { method(): string; url(): string }) => {
      if (r.method() !== 'GET') writes.push(r.url());
    };
    page.on('request', onRequest);
    try {
      await gap.fill('5000');
      await save.click({ timeout: 10_000 });
      await page
        .getByRole('alert')
        .filter({ hasText: 'Nothing was saved yet: one setting needs putting right' })
        .waitFor({ timeout: 10_000 });
      expect(await gap.getAttribute('aria-invalid')).toBe('true');
      expect(await page.locator(`#${await gap.getAttribute('aria-describedby')}`).innerText()).toBe(
        'Service gap round the unit (mm each side) must be at most 1,000',
      );
      // The cursor goes back to it, far above the button on a phone.
      await expect.poll(() => gap.evaluate((el) => el === document.activeElement)).toBe(true);
      expect(writes).toEqual([]);
      // Within bounds it saves, though the default skip volume (4.587 m³) is off its box's 0.1 step:
      // the browser's own check once refused every save on that.
      await gap.fill('160');
      await save.click({ timeout: 10_000 });
      await page.getByText('Quantity settings saved').waitFor({ timeout: 10_000 });
      expect(writes.filter((u) => u.endsWith('/api/firm/settings'))).toHaveLength(1);
    } finally {
      page.off('request', onRequest);
      await gap.fill(was);
      if (await save.isEnabled({ timeout: 10_000 })) {
        await save.click({ timeout: 10_000 });
        await expect.poll(() => save.isEnabled(), { timeout: 10_000 }).toBe(false);
      }
    }
  }, 60_000);
  it('records a hire from the Reports page, naming a slip under its box and sending nothing until it is put right', async () => {
    await page.goto(`${app.url}/reports`);
    await page.getByRole('button', { name: 'Record a hire…' }).click();
    const form = page.getByRole('form', { name: 'Record a hire' });
    const machine = form.getByLabel('Machine');
    const onHire = form.getByLabel('On hire from');
    const offHire = form.getByLabel('Off hire after');
    const rate = form.getByLabel('Day rate (£)');
    await offHire.fill('2026-09-07');
    await rate.fill('145 a day');
    const writes: string[] = [];
    const onRequest = (r: { method(): string; url(): string }) => {
      if (r.method() !== 'GET') writes.push(r.url());
    };
    page.on('request', onRequest);
    try {
      await form.getByRole('button', { name: 'Record the hire' }).click();
      /** The sentence a box points at (it is marked invalid), or null when it points at none. */
      const problemOf = async (box: typeof rate) => {
        const id = await box.getAttribute('aria-describedby');
        if (id === null) return null;
        expect(await box.getAttribute('aria-invalid')).toBe('true');
        return page.locator(`[id="${id}"]`).textContent();
      };
      // Left out, or not a sum: said in the form's words, not the API's ("numeric id", "pence").
      await expect.poll(() => problemOf(machine)).toBe('Choose the hired machine');
      expect(await problemOf(onHire)).toBe('Give the first day on hire');
      expect(await problemOf(rate)).toBe('The day rate must be a sum in pounds, e.g. 145 or 145.50');
      expect(await problemOf(offHire)).toBeNull();
      expect(await rate.inputValue()).toBe('145 a day');
      // The first box with a problem is the one moved to.
      expect(await machine.evaluate((el) => el === document.activeElement)).toBe(true);

      await machine.selectOption({ index: 1 });
      await form.getByLabel('Supplier').selectOption({ index: 1 });
      await onHire.fill('2026-09-11');
      await rate.fill('-5');
      await form.getByRole('button', { name: 'Record the hire' }).click();
      await expect.poll(() => problemOf(rate)).toBe("The day rate can't be negative");
      expect(await problemOf(offHire)).toBe('The off-hire date must be after the on-hire');
      expect(await problemOf(machine)).toBeNull();
      expect(await rate.inputValue()).toBe('-5');
      expect(writes).toEqual([]);

      await offHire.fill('2026-09-18');
      await rate.fill('145.50');
      await form.getByRole('button', { name: 'Record the hire' }).click();
      await page.getByText('Hire recorded').waitFor({ timeout: 10_000 });
      expect(writes.filter((u) => u.endsWith('/api/hire-periods'))).toHaveLength(1);
      const saved = await app.ctx
        .knex('hire_periods')
        .orderBy('id', 'desc')
        .first('day_rate_pence', 'delivery_pence', 'status');
      expect(saved).toEqual({ dayRatePence: 14550, deliveryPence: 0, status: 'approved' });

      // The same machine again over some of those days: asked first, naming the hire it overlaps.
      const count = async () =>
        Number((await app.ctx.knex('hire_periods').count<{ n: string }[]>('* as n').first())!.n);
      const was = await count();
      await page.getByRole('button', { name: 'Record a hire…' }).click();
      await form.getByLabel('Machine').selectOption({ index: 1 });
      await form.getByLabel('Supplier').selectOption({ index: 1 });
      await form.getByLabel('On hire from').fill('2026-09-16');
      await form.getByLabel('Off hire after').fill('2026-09-23');
      await form.getByLabel('Day rate (£)').fill('145.50');
      await form.getByRole('button', { name: 'Record the hire' }).click();
      const question = page.getByRole('dialog', { name: 'The machine is already on hire then' });
      await question.waitFor();
      expect(await question.textContent()).toMatch(
        /is already on hire Fri 11 Sep – Fri 18 Sep from .+: both hires would be paid for over the days they share\. Record this hire as well\?/,
      );
      await page.screenshot({ path: 'tests/e2e/artifacts/hire-overlap-question.png' });
      await question.getByRole('button', { name: 'Go back' }).click();
      await question.waitFor({ state: 'hidden' });
      expect(await count()).toBe(was);
      await form.getByRole('button', { name: 'Record the hire' }).click();
      await question.getByRole('button', { name: 'Record it as well' }).click();
      await expect.poll(count).toBe(was + 1);
    } finally {
      page.off('request', onRequest);
    }
  });
});

describe("a hire's dates, changed on a phone and put back", () => {
  /** A phone signed in as the manager on the scenario's Monday 1 June 2026 (the reports page spans the weeks from the browser's today). */
  async function managerPhone() {
    const context = await browser.newContext({
      viewport: { width: 390, height: 844 },
      isMobile: true,
      hasTouch: true,
      timezoneId: 'Europe/London',
    });
    await context.clock.setFixedTime(new Date('2026-06-01T08:00:00+01:00'));
    const phone = await context.newPage();
    await signInThroughPage(phone, app.url, account('manager').email);
    return { context, phone };
  }
  const machineId = async () =>
    String((await app.ctx.knex('resources').where({ name: '3 t excavator (hired)' }).first('id')).id);

  it('goes from the top of Reports to each table, the keyboard with it', async () => {
    const { context, phone } = await managerPhone();
    try {
      await phone.goto(`${app.url}/reports`);
      const parts = phone.getByRole('navigation', { name: 'Parts of this page' });
      await parts.waitFor();
      expect(await parts.getByRole('link').allTextContents()).toEqual([
        'Clashes',
        'Hired machines',
        'Jobs at risk',
        'Utilisation',
      ]);
      for (const name of ['Utilisation', 'Clashes']) {
        const heading = phone.getByRole('heading', { level: 2, name, exact: true });
        await heading.waitFor();
        await parts.getByRole('link', { name, exact: true }).click();
        await expect.poll(() => heading.evaluate((el) => el === document.activeElement)).toBe(true);
        await expect.poll(async () => Math.round((await heading.boundingBox())!.y)).toBeLessThan(5);
      }
    } finally {
      await context.close();
    }
  });

  it('keeps the part jumped to at the top while the tables are still arriving', async () => {
    const { context, phone } = await managerPhone();
    try {
      // A weak signal: the tables come 2 s late. Utilisation is the last part: until its table is
      // in, the page is too short to bring its heading to the top.
      let late = 0;
      await phone.route(/\/api\/reports\/(clashes|hire|utilisation)\?/, async (route) => {
        const answer = await route.fetch();
        await new Promise((r) => setTimeout(r, 2_000));
        late++;
        await route.fulfill({ response: answer });
      });
      await phone.goto(`${app.url}/reports`);
      const heading = phone.getByRole('heading', { level: 2, name: 'Utilisation', exact: true });
      await heading.waitFor();
      expect(late).toBe(0);
      await phone
        .getByRole('navigation', { name: 'Parts of this page' })
        .getByRole('link', { name: 'Utilisation', exact: true })
        .click();
      await expect.poll(() => late, { timeout: 15_000 }).toBe(3);
      // The tables are drawn, the page hundreds of pixels longer, and the part is at the top.
      await phone.getByRole('link', { name: 'Download the totals (CSV)' }).waitFor();
      await phone.waitForFunction(() => document.getAnimations().length === 0);
      await expect.poll(async () => Math.round((await heading.boundingBox())!.y)).toBeLessThan(5);
      expect(await heading.evaluate((el) => el === document.activeElement)).toBe(true);
    } finally {
      await context.close();
    }
  });

  it('names the booking an earlier off-hire leaves off hire, and Undo puts the exact times back', async () => {
    const { context, phone } = await managerPhone();
    try {
      const machine = { id: await machineId() };
      const stored = () =>
        app.ctx
          .knex('hire_periods')
          .where({ resource_id: machine.id })
          .orderBy('id') // the demo's hire (a test above records another)
          .first('on_hire_at', 'off_hire_at', 'version')
          .then((h) => ({ on: h.onHireAt.toISOString(), off: h.offHireAt.toISOString(), version: h.version }));
      const before = await stored();
      await phone.goto(`${app.url}/reports`);
      await phone.getByRole('button', { name: /^Change the dates of the hire of 3 t excavator \(hired\)/ }).click();
      const dialog = phone.getByRole('dialog', { name: 'Change the hire of 3 t excavator (hired)' });
      const onHire = await dialog.getByLabel('On hire from').inputValue();
      // Off hire after its first day: the demo's dig on that machine later in the hire is left off hire.
      await dialog.getByLabel('Off hire after').fill(onHire);
      await dialog.getByRole('button', { name: 'Save the dates' }).click();
      const status = phone.locator('.hire-changed');
      await expect
        .poll(() => status.textContent(), { timeout: 10_000 })
        .toMatch(
          /^\d+ bookings? of 3 t excavator \(hired\) now falls? outside its hire and (is|are) flagged on the board/,
        );
      expect(await status.getByRole('listitem').first().textContent()).toMatch(/^TW-\d{4} · Excavate pit · /);
      // Only the off-hire was sent: the on-hire keeps its exact time; the off-hire is 23:59 BST that day.
      expect(await stored()).toEqual({ on: before.on, off: `${onHire}T22:59:00.000Z`, version: before.version + 1 });
      expect(await dialog.count()).toBe(0);
      // It has started (before Mon 1 Jun): it can be changed, not cancelled.
      expect(await phone.getByRole('button', { name: 'Cancel the hire…' }).count()).toBe(0);
      await phone.screenshot({ path: 'tests/e2e/artifacts/hire-dates-phone.png' });

      await status.getByRole('button', { name: /^Undo: put back / }).click();
      await expect.poll(() => status.count(), { timeout: 10_000 }).toBe(0);
      expect(await stored()).toEqual({ ...before, version: before.version + 2 });
    } finally {
      await context.close();
    }
  }, 60_000);

  it('asks before new days run into another hire of the machine, and saves them only when told to', async () => {
    const { context, phone } = await managerPhone();
    const machine = await machineId();
    const demo = await app.ctx
      .knex('hire_periods')
      .where({ resource_id: machine })
      .orderBy('id')
      .first('id', 'supplier_firm_id', 'off_hire_at', 'version');
    // A second hire of the machine, from the Monday after the demo's hire ends, for a week.
    const startsAt = new Date(demo.offHireAt.getTime() + 7 * 86_400_000);
    const [next] = await app.ctx
      .knex('hire_periods')
      .insert({
        resource_id: machine,
        hirer_firm_id: (await app.ctx.knex('resources').where({ id: machine }).first('firm_id')).firmId,
        supplier_firm_id: demo.supplierFirmId,
        on_hire_at: startsAt,
        off_hire_at: new Date(startsAt.getTime() + 4 * 86_400_000),
        day_rate_pence: 14500,
        status: 'approved',
      })
      .returning('id');
    try {
      await phone.goto(`${app.url}/reports`);
      await phone
        .getByRole('button', { name: /^Change the dates of the hire of 3 t excavator \(hired\)/ })
        .first()
        .click();
      const dialog = phone.getByRole('dialog', { name: 'Change the hire of 3 t excavator (hired)' });
      // Kept on hire into the second hire's days.
      const into = new Date(startsAt.getTime() + 86_400_000).toISOString().slice(0, 10);
      await dialog.getByLabel('Off hire after').fill(into);
      await dialog.getByRole('button', { name: 'Save the dates' }).click();
      const question = phone.getByRole('dialog', { name: 'The machine is already on hire then' });
      await question.waitFor();
      expect(await question.textContent()).toMatch(/Save these days as well\?/);
      await question.getByRole('button', { name: 'Go back' }).click();
      await question.waitFor({ state: 'hidden' });
      const version = async () => (await app.ctx.knex('hire_periods').where({ id: demo.id }).first('version')).version;
      expect(await version()).toBe(demo.version);
      await dialog.getByRole('button', { name: 'Save the dates' }).click();
      await question.getByRole('button', { name: 'Save them as well' }).click();
      await expect.poll(version, { timeout: 10_000 }).toBe(demo.version + 1);
    } finally {
      await app.ctx.knex('hire_periods').where({ id: next.id }).del();
      await app.ctx
        .knex('hire_periods')
        .where({ id: demo.id })
        .update({ off_hire_at: demo.offHireAt, version: demo.version });
      await context.close();
    }
  }, 60_000);

  it('ends a started hire now after asking, names what it leaves off hire, and Undo reopens it', async () => {
    const { context, phone } = await managerPhone();
    try {
      const machine = await machineId();
      const stored = () =>
        app.ctx
          .knex('hire_periods')
          .where({ resource_id: machine })
          .orderBy('id') // the demo's hire
          .first('off_hire_at', 'status', 'version')
          .then((h) => ({ off: h.offHireAt.toISOString(), status: h.status, version: h.version }));
      const before = await stored();
      await phone.goto(`${app.url}/reports`);
      await phone.getByRole('button', { name: /^Change the dates of the hire of 3 t excavator \(hired\)/ }).click();
      // The dialog done moving in before its button is pressed (a press mid-way once never opened the question).
      await phone.getByRole('dialog', { name: 'Change the hire of 3 t excavator (hired)' }).waitFor();
      await phone.waitForFunction(() => document.getAnimations().length === 0);
      await phone.getByRole('button', { name: 'End the hire now…' }).click();
      const asked = phone.getByRole('dialog', { name: 'End the hire of 3 t excavator (hired) now?' });
      await asked.getByRole('button', { name: 'Keep it' }).click();
      await asked.waitFor({ state: 'detached' });
      expect(await stored()).toEqual(before);
      await phone.getByRole('button', { name: 'End the hire now…' }).click();
      await asked.getByRole('button', { name: 'End the hire', exact: true }).click();
      const status = phone.locator('.hire-changed');
      await expect
        .poll(() => status.textContent(), { timeout: 10_000 })
        .toMatch(/^\d+ bookings? of 3 t excavator \(hired\) now falls? outside its hire/);
      expect(await status.getByRole('listitem').first().textContent()).toMatch(/^TW-\d{4} · Excavate pit · /);
      // Off hire from the server's now (Mon 1 Jun, 08:00 BST), ended.
      expect(await stored()).toEqual({ off: '2026-06-01T07:00:00.000Z', status: 'ended', version: before.version + 1 });
      // Ended, the table offers no more changes to it.
      await expect
        .poll(() => phone.getByRole('button', { name: /^Change the dates of the hire of 3 t excavator/ }).count())
        .toBe(0);
      await asked.waitFor({ state: 'detached' });
      await status.scrollIntoViewIfNeeded();
      await phone.screenshot({ path: 'tests/e2e/artifacts/hire-ended-phone.png' });
      await status.getByRole('button', { name: /^Undo: reopen the hire, / }).click();
      await expect.poll(() => status.count(), { timeout: 10_000 }).toBe(0);
      expect(await stored()).toEqual({ ...before, version: before.version + 2 });
    } finally {
      await context.close();
    }
  }, 60_000);

  it("keeps the hire on to take in the booking made after it, from the clash report's button, and Undo puts it back", async () => {
    const { context, phone } = await managerPhone();
    try {
      const machine = await machineId();
      const offHires = () =>
        app.ctx
          .knex('hire_periods')
          .where({ resource_id: machine })
          .orderBy('id')
          .select('off_hire_at')
          .then((all: { offHireAt: Date }[]) => all.map((h) => h.offHireAt.toISOString()));
      const before = await offHires();
      await phone.goto(`${app.url}/reports`);
      // The demo's TW-2410 digs on the 3 t excavator after its hire has gone back.
      const keep = phone.getByRole('button', { name: /^Keep it on hire to / });
      await keep.first().waitFor({ timeout: 10_000 });
      expect(await keep.count()).toBe(1);
      await keep.click();
      const dialog = phone.getByRole('dialog', { name: 'Change the hire of 3 t excavator (hired)' });
      await dialog.getByText('Filled in to take in the booking outside the hire').waitFor();
      const lastDay = await dialog.getByLabel('Off hire after').inputValue();
      expect(lastDay).toMatch(/^2026-\d\d-\d\d$/);
      await dialog.getByRole('button', { name: 'Save the dates' }).click();
      const status = phone.locator('.hire-changed');
      await expect
        .poll(async () => (await status.textContent())?.trim(), { timeout: 10_000 })
        .toMatch(
          /^The hire of 3 t excavator \(hired\) now runs .*: every booking of it from now on that was on hire still is\./,
        );
      // The clash is gone with it; the hire runs to 23:59 (BST) of the dig's last day.
      await expect.poll(() => keep.count(), { timeout: 10_000 }).toBe(0);
      expect(await offHires()).toEqual(before.map((off, i) => (i === 0 ? `${lastDay}T22:59:00.000Z` : off)));
      await status.getByRole('button', { name: /^Undo: put back / }).click();
      await expect.poll(() => status.count(), { timeout: 10_000 }).toBe(0);
      await keep.waitFor({ timeout: 10_000 });
      expect(await offHires()).toEqual(before);
    } finally {
      await context.close();
    }
  }, 60_000);

  it('cancels a hire not yet started after asking, and Undo records it again', async () => {
    // Mon 15 – Wed 17 Jun, not started on Mon 1 Jun.
    const [{ id }] = await app.ctx
      .knex('hire_periods')
      .insert({
        resource_id: await machineId(),
        hirer_firm_id: await idOf(app.ctx.knex, 'firms', { name: 'Tideway Hot Tubs' }),
        supplier_firm_id: await idOf(app.ctx.knex, 'firms', { name: 'Ridgeway Plant Hire' }),
        on_hire_at: '2026-06-14T23:00:00Z',
        off_hire_at: '2026-06-17T22:59:00Z',
        day_rate_pence: 9000,
        status: 'approved',
      })
      .returning('id');
    const { context, phone } = await managerPhone();
    try {
      await phone.goto(`${app.url}/reports`);
      await phone
        .getByRole('button', { name: 'Change the dates of the hire of 3 t excavator (hired) from Mon 15 Jun' })
        .click();
      await phone.getByRole('button', { name: 'Cancel the hire…' }).click();
      const asked = phone.getByRole('dialog', { name: 'Cancel the hire of 3 t excavator (hired)?' });
      // Kept: nothing changes.
      await asked.getByRole('button', { name: 'Keep it' }).click();
      await asked.waitFor({ state: 'detached' });
      expect(await app.ctx.knex('hire_periods').where({ id }).count('* as n').first()).toEqual({ n: '1' });
      await phone.getByRole('button', { name: 'Cancel the hire…' }).click();
      await asked.getByRole('button', { name: 'Cancel the hire', exact: true }).click();
      const undo = phone.getByRole('button', { name: 'Undo: record the hire Mon 15 Jun – Wed 17 Jun again' });
      await undo.waitFor({ timeout: 10_000 });
      expect(await app.ctx.knex('hire_periods').where({ id }).count('* as n').first()).toEqual({ n: '0' });
      await asked.waitFor({ state: 'detached' });
      await phone.screenshot({ path: 'tests/e2e/artifacts/hire-cancelled-phone.png' });
      await undo.click();
      await undo.waitFor({ state: 'detached', timeout: 10_000 });
      expect(
        await app.ctx
          .knex('hire_periods')
          .where({ on_hire_at: '2026-06-14T23:00:00Z', off_hire_at: '2026-06-17T22:59:00Z' })
          .select('day_rate_pence', 'status'),
      ).toEqual([{ dayRatePence: 9000, status: 'approved' }]);
    } finally {
      await context.close();
    }
  }, 60_000);
});
