import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Locator, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, TEST_TODAY } from '../helpers/server.ts';

/*
 * The Firm page on a phone (390 × 844), as the demo installer's owner: a slip in any of its forms is
 * named under the box it is in (the box says it is wrong and points at that sentence with
 * aria-describedby) and nothing is saved until it is put right; invitations and where each stands;
 * each person's role, and taking out someone who has left. Also a job's price and payment amounts.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;

beforeAll(async () => {
  app = await startServer();
  browser = await launchBrowser();
  page = await phonePage(browser);
  // The browser's today is the app's (the test scenario's): an invitation runs out by that clock.
  await page.context().clock.setFixedTime(TEST_TODAY);
  await signInThroughPage(page, app.url, account('owner').email);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** The sentence a box points at, or null when it points at none. */
async function problemOf(box: Locator): Promise<string | null> {
  const id = await box.getAttribute('aria-describedby');
  if (id === null) return null;
  expect(await box.getAttribute('aria-invalid')).toBe('true');
  return page.locator(`[id="${id}"]`).textContent();
}

/** A person's role in the demo installer, as stored (null when not in it). */
const roleOf = (email: string) =>
  app.ctx
    .knex('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where('u.email', email)
    .first('m.role')
    .then((r) => r?.role ?? null);

const settings = () => app.ctx.knex('firm_settings').select('deposit_percent', 'water_targets', 'service_plan');

describe('the working week', () => {
  /** Tideway's standard week as stored: weekday (0 = Sunday) → minutes of the local day. */
  const storedWeek = async () =>
    (
      await app.ctx
        .knex('calendars as c')
        .join('firms as f', 'f.id', 'c.firm_id')
        .where('f.name', 'Tideway Hot Tubs')
        .orderBy('c.id')
        .first('c.weekly_hours')
    ).weeklyHours as Record<string, [number, number][]>;

  it('names a finish before the start under its box and saves nothing; shorter Fridays name the bookings left outside them', async () => {
    await page.goto(`${app.url}/firm`);
    const monday = page.getByLabel("Monday's finish");
    await monday.fill('07:00');
    await page.getByRole('button', { name: 'Save hours' }).click();
    expect(await problemOf(monday)).toBe("Monday's finish must be after the start");
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).toBe("Monday's finish");
    expect((await storedWeek())['1']).toEqual([[480, 1020]]);

    await monday.fill('17:00');
    await page.getByLabel("Friday's finish").fill('13:00');
    await page.getByRole('button', { name: 'Save hours' }).click();
    const told = page.getByRole('status').filter({ hasText: 'outside these hours' });
    await told.waitFor();
    expect(await told.locator('p').first().innerText()).toMatch(
      /^\d+ bookings? now falls? outside these hours and (is|are) flagged on the board: move (it|them), or put the hours back\.$/,
    );
    // Each named by its job and stage, starting on a Friday (the scenario's today is Mon 1 Jun 2026).
    const named = await told.locator('li').allInnerTexts();
    expect(named.length).toBeGreaterThan(0);
    for (const line of named.filter((l) => !l.startsWith('and ')))
      expect(line).toMatch(/^[A-Z]{2}-\d{4} · .+ · Fri \d+ /);
    expect((await storedWeek())['5']).toEqual([[480, 780]]);

    // Put back as it was: widening leaves nothing outside.
    await page.getByLabel("Friday's finish").fill('17:00');
    await page.getByRole('button', { name: 'Save hours' }).click();
    await page.getByText('Every booking from now on still lies within these hours.').waitFor();
    expect((await storedWeek())['5']).toEqual([[480, 1020]]);
  }, 60_000);

  it('names a week with every day unticked under Monday, saves nothing, and discards it', async () => {
    await page.goto(`${app.url}/firm`);
    const form = page.getByRole('form', { name: 'Working hours: Standard week' });
    for (const day of ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday']) {
      const worked = form.getByRole('group', { name: day }).getByRole('checkbox');
      await worked.uncheck();
    }
    await form.getByRole('button', { name: 'Save hours' }).click();
    const monday = form.getByRole('group', { name: 'Monday' }).getByRole('checkbox');
    expect(await problemOf(monday)).toBe(
      'The week needs at least one working day: nothing can be booked on a week without working hours',
    );
    expect(await page.evaluate(() => document.activeElement?.id)).toBe(await monday.getAttribute('id'));
    expect((await storedWeek())['1']).toEqual([[480, 1020]]);
    await form.getByRole('button', { name: 'Discard changes' }).click();
    expect(await monday.isChecked()).toBe(true);
  }, 60_000);

  it("moves to Scotland's bank holidays and back", async () => {
    await page.goto(`${app.url}/firm`);
    const region = page.getByLabel('Bank holidays of');
    const save = page.locator('form', { has: region }).getByRole('button', { name: 'Save' });
    expect(await save.isDisabled()).toBe(true);
    await region.selectOption({ label: 'Scotland' });
    await save.click();
    await page
      .getByRole('status')
      .filter({ hasText: /bank holiday/ })
      .waitFor();
    const stored = () =>
      app.ctx
        .knex('firms')
        .where('name', 'Tideway Hot Tubs')
        .first('holiday_region')
        .then((f) => f.holidayRegion);
    expect(await stored()).toBe('GB-SCT');
    await region.selectOption({ label: 'England and Wales' });
    await save.click();
    await expect.poll(stored).toBe('GB-ENG');
  }, 60_000);

  it('adds a late shift, moves a crew onto it and back, renames it, and takes it away after asking', async () => {
    const calendarOf = (name: string) =>
      app.ctx
        .knex('resources')
        .where('name', name)
        .first('calendar_id')
        .then((r) => (r.calendarId === null ? null : String(r.calendarId)));
    await page.goto(`${app.url}/firm`);
    const name = page.getByLabel('Another working week, named');
    await page.getByRole('button', { name: 'Add week' }).click();
    expect(await problemOf(name)).toBe('The name is required');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('new-calendar-name');

    await name.fill('Late shift');
    await name.press('Enter');
    const late = page.getByRole('region', { name: 'Late shift' });
    await late.waitFor();
    // The new week's heading takes the focus; it starts with the standard week's hours and no one on it.
    expect(await page.evaluate(() => document.activeElement?.textContent?.trim())).toBe('Late shift');
    expect(await late.getByLabel("Monday's start").inputValue()).toBe('08:00');
    await late.getByText('Nothing works to it yet.').waitFor();
    const id = String((await app.ctx.knex('calendars').where('name', 'Late shift').first('id')).id);

    // A Friday worked up to midnight: the time box shows 00:00, said to be midnight, and 24:00 is stored.
    await late.getByLabel("Friday's start").fill('16:00');
    await late.getByLabel("Friday's finish").fill('00:00');
    await late.getByText('midnight').waitFor();
    await late.getByRole('button', { name: 'Save hours' }).click();
    await late.getByText('Every booking from now on still lies within these hours.').waitFor();
    const stored = await app.ctx.knex('calendars').where('name', 'Late shift').first('weekly_hours');
    expect(stored.weeklyHours['5']).toEqual([[960, 1440]]);
    expect(await late.getByLabel("Friday's finish").inputValue()).toBe('00:00');
    await late.getByLabel('Move onto Late shift').selectOption({ label: 'Crew Otter' });
    await late.getByRole('button', { name: 'Move' }).click();
    await late.getByText('Worked to by Crew Otter.').waitFor();
    await expect.poll(() => calendarOf('Crew Otter')).toBe(id);
    // Otter's Friday bookings are all in working hours of the standard week; any before 16:00 is named now.
    await late.getByRole('status').filter({ hasText: 'Crew Otter' }).first().waitFor();
    // Worked to: it cannot be taken away.
    expect(await late.getByRole('button', { name: 'Take away Late shift' }).count()).toBe(0);

    // Undone from the move's own message: back onto the standard week.
    await late.getByRole('button', { name: 'Undo: move Crew Otter back onto Standard week' }).click();
    await expect.poll(() => calendarOf('Crew Otter')).toBe(null);
    await late.getByText('Nothing works to it yet.').waitFor();
    // And moved again, then back from the standard week's own list.
    await late.getByLabel('Move onto Late shift').selectOption({ label: 'Crew Otter' });
    await late.getByRole('button', { name: 'Move' }).click();
    await expect.poll(() => calendarOf('Crew Otter')).toBe(id);
    const standard = page.getByRole('region', { name: /^Standard week/ });
    await standard.getByLabel('Move onto Standard week').selectOption({ label: 'Crew Otter' });
    await standard.getByRole('button', { name: 'Move' }).click();
    await expect.poll(() => calendarOf('Crew Otter')).toBe(null);
    // Renamed in place; the heading takes the focus back.
    await late.getByRole('button', { name: 'Rename Late shift' }).click();
    const newName = late.getByLabel('New name');
    expect(await newName.inputValue()).toBe('Late shift');
    await newName.fill('Evening shift');
    await newName.press('Enter');
    const evening = page.getByRole('region', { name: 'Evening shift' });
    await evening.getByRole('heading', { name: 'Evening shift' }).waitFor();
    expect(await page.evaluate(() => document.activeElement?.textContent?.trim())).toBe('Evening shift');
    expect((await app.ctx.knex('calendars').where('id', id).first('name')).name).toBe('Evening shift');

    await evening.getByRole('button', { name: 'Take away Evening shift' }).click();
    const ask = page.getByRole('dialog', { name: 'Take away Evening shift?' });
    await ask.getByRole('button', { name: 'Keep' }).click();
    await ask.waitFor({ state: 'detached' });
    expect(await app.ctx.knex('calendars').where('id', id).count('* as n').first()).toEqual({ n: '1' });
    await evening.getByRole('button', { name: 'Take away Evening shift' }).click();
    await ask.getByRole('button', { name: 'Take away', exact: true }).click();
    await evening.waitFor({ state: 'detached' });
    expect(await app.ctx.knex('calendars').where('id', id).count('* as n').first()).toEqual({ n: '0' });
  }, 60_000);
});

describe('problems named under their boxes', () => {
  it('the deposit, the water targets and the service plan each name their slip under the box, and save nothing', async () => {
    await page.goto(`${app.url}/firm`);
    const before = await settings();

    const deposit = page.getByLabel('Deposit (% of the price)');
    // Typed and sent with Enter, as on a phone's keyboard.
    await deposit.fill('250');
    await deposit.press('Enter');
    expect(await problemOf(deposit)).toBe('The deposit must be a whole percentage from 1 to 100');

    // pH from 8.2 to 7: the highest below the lowest (the pH row's own boxes, by their ids).
    const phFrom = page.locator('#water-ph-min');
    const phTo = page.locator('#water-ph-max');
    await phFrom.fill('8.2');
    await phTo.fill('7');
    await page.getByRole('button', { name: 'Save targets' }).click();
    expect(await problemOf(phTo)).toBe('The highest pH must not be below the lowest value');
    expect(await problemOf(phFrom)).toBeNull();

    const every = page.getByLabel('Then every (months)');
    await every.fill('0');
    await every.press('Tab');
    await page.locator('form', { has: every }).getByRole('button', { name: 'Save' }).click();
    expect(await problemOf(every)).toBe('The time between visits must be at least 1 month');
    await page.screenshot({ path: 'tests/e2e/artifacts/firm-field-problems.png', fullPage: true });

    expect(await settings()).toEqual(before);

    // Put right, the deposit saves and its sentence goes.
    await deposit.fill('30');
    await page.locator('form', { has: deposit }).getByRole('button', { name: 'Save' }).click();
    await page.getByText('Deposits are now asked for at 30 % of the price').waitFor();
    expect(await problemOf(deposit)).toBeNull();
    expect((await settings())[0]).toMatchObject({ depositPercent: 30 });
  });

  it('an invitation to something that is not an e-mail address is named under the address, and not sent', async () => {
    await page.goto(`${app.url}/firm`);
    const invite = page.getByRole('form', { name: 'Invite a person' });
    await invite.getByLabel('Role').waitFor();
    // The installer's own roles, in words (a partner firm's coordinator role is not one of them).
    expect(await invite.getByLabel('Role').locator('option').allTextContents()).toEqual([
      'Owner',
      'Scheduler',
      'Installation manager',
      'Crew',
      'Viewer',
    ]);
    const address = invite.getByLabel('E-mail');
    await address.fill('dana at tideway');
    await invite.getByRole('button', { name: 'Invite' }).click();
    expect(await problemOf(address)).toBe('The address must be an e-mail address');
    expect(await app.ctx.knex('invitations').where('email', 'like', 'dana%').count({ n: '*' }).first()).toEqual({
      n: '0',
    });
  });
});

describe("the firm's invitations", () => {
  it('lists one just sent as not accepted yet, and withdraws it after asking', async () => {
    await page.goto(`${app.url}/firm`);
    const invite = page.getByRole('form', { name: 'Invite a person' });
    await invite.getByLabel('E-mail').fill('rory.fitter@tideway.example');
    await invite.getByLabel('Role').selectOption({ label: 'Crew' });
    await invite.getByRole('button', { name: 'Invite' }).click();
    const list = page.getByRole('region', { name: 'Invitations' });
    const row = list.locator('li', { hasText: 'rory.fitter@tideway.example' });
    await row.waitFor();
    // Sent on the app's today; the link lasts fourteen days.
    expect(await row.textContent()).toMatch(
      /rory\.fitter@tideway\.example · Crew.*Not accepted yet: the link works until /,
    );

    await row.getByRole('button', { name: 'Withdraw the invitation to rory.fitter@tideway.example' }).click();
    await page.getByRole('button', { name: 'Withdraw', exact: true }).click();
    await row.getByText(/^Withdrawn /).waitFor();
    expect(await row.getByRole('button').count()).toBe(0);
    const stored = await app.ctx
      .knex('invitations')
      .where('email', 'rory.fitter@tideway.example')
      .first('withdrawn_at', 'role');
    expect(stored.role).toBe('crew');
    expect(stored.withdrawnAt).toBeInstanceOf(Date);
    await page.screenshot({ path: 'tests/e2e/artifacts/firm-invitations.png' });
  });

  it('sends again to an address invited before, saying the earlier link stops; someone already in the firm is named under the box', async () => {
    await page.goto(`${app.url}/firm`);
    const invite = page.getByRole('form', { name: 'Invite a person' });
    const address = invite.getByLabel('E-mail');
    const list = page.getByRole('region', { name: 'Invitations' });
    for (const text of ['Invitation sent to', 'Invitation sent again to']) {
      await address.fill('nell.lost@tideway.example');
      await invite.getByRole('button', { name: 'Invite' }).click();
      await page.getByText(new RegExp(`^${text} nell\\.lost@tideway\\.example`)).waitFor();
    }
    await page
      .getByText('Invitation sent again to nell.lost@tideway.example: the link sent before no longer works')
      .waitFor();
    const rows = list.locator('li', { hasText: 'nell.lost@tideway.example' });
    await rows.getByText(/^Sent again Mon 1 Jun: this link no longer works$/).waitFor();
    expect(await rows.getByText(/^Not accepted yet/).count()).toBe(1);

    await address.fill(account('scheduler').email);
    await invite.getByRole('button', { name: 'Invite' }).click();
    // Under the box, and the box points at it.
    const problem = page.locator('#invite-email-problem');
    await problem.waitFor();
    expect(await problem.textContent()).toMatch(/is already in your firm/);
    expect(await address.getAttribute('aria-describedby')).toContain('invite-email-problem');
    await page.screenshot({ path: 'tests/e2e/artifacts/firm-invite-again.png' });
    expect(
      await app.ctx.knex('invitations').where('email', account('scheduler').email).count({ n: '*' }).first(),
    ).toEqual({ n: '0' });
  });
});

describe("a job's price and payment amounts", () => {
  it('names a price or amount that is not more than nothing under its box, saves nothing, then saves the price put right', async () => {
    const job = await app.ctx
      .knex('jobs as j')
      .join('firms as f', 'f.id', 'j.firm_id')
      .where('f.name', 'Tideway Hot Tubs')
      .whereNull('j.price_pence')
      .orderBy('j.reference')
      .first('j.id', 'j.reference');
    await page.goto(`${app.url}/jobs/${job.id}`);
    const card = page.locator('section', { has: page.getByRole('heading', { name: 'Payments' }) });
    await card.getByRole('button', { name: 'Record the price' }).click();
    const price = card.getByLabel('Price (£)');
    await price.fill('-5');
    await price.press('Enter');
    expect(await problemOf(price)).toBe('The price must be more than 0');
    expect(await app.ctx.knex('jobs').where('id', job.id).first('price_pence')).toEqual({ pricePence: null });

    // The amount asked for: zero is refused under its own box, and nothing is asked of the householder.
    const amount = card.getByLabel('Amount (£)').first();
    await amount.fill('0');
    await amount.press('Enter');
    expect(await problemOf(amount)).toBe('The amount must be more than 0');
    expect(await app.ctx.knex('job_payments').where('job_id', job.id).count({ n: '*' }).first()).toEqual({ n: '0' });

    await price.fill('9500');
    await price.press('Enter');
    await page.getByText('Price saved').waitFor();
    expect(await app.ctx.knex('jobs').where('id', job.id).first('price_pence')).toEqual({ pricePence: 950_000 });
    expect(await card.textContent()).toContain('Price: £9,500.00');
  });
});

describe("the firm's people", () => {
  it("changes a person's role from the list, and takes out someone who has left after asking", async () => {
    await page.goto(`${app.url}/firm`);
    const vicRole = page.getByLabel('Role of Vic Amos');
    await vicRole.waitFor();
    expect(await vicRole.locator('option').allTextContents()).toEqual([
      'Owner',
      'Scheduler',
      'Installation manager',
      'Crew',
      'Viewer',
    ]);
    await vicRole.selectOption({ label: 'Scheduler' });
    await page.getByText('Vic Amos is now scheduler').waitFor();
    expect(await roleOf('vic.amos@tideway.example')).toBe('scheduler');

    await page.getByRole('button', { name: 'Take Connor Reid out of the firm' }).click();
    await page.getByText('Connor Reid can no longer sign in to Tideway Hot Tubs').waitFor();
    await page.getByRole('button', { name: 'Take out', exact: true }).click();
    await page.getByText('Connor Reid is no longer in Tideway Hot Tubs').waitFor();
    await page.getByRole('cell', { name: /Connor Reid/ }).waitFor({ state: 'detached' });
    expect(await roleOf('connor.reid@tideway.example')).toBeNull();
    await page.screenshot({ path: 'tests/e2e/artifacts/firm-people.png' });
  });

  it('asks before an owner gives up their own owner’s role, keeps it on Keep, and follows the new role on yes', async () => {
    await page.goto(`${app.url}/firm`);
    await page.getByLabel('Role of Sam Okafor').selectOption({ label: 'Owner' });
    await page.getByText('Sam Okafor is now owner').waitFor();

    const mine = page.getByLabel('Role of Olivia Hart');
    await mine.selectOption({ label: 'Scheduler' });
    const ask = page.getByRole('dialog', { name: 'Stop being an owner of Tideway Hot Tubs?' });
    await ask.getByRole('button', { name: 'Keep' }).click();
    await ask.waitFor({ state: 'detached' });
    expect(await mine.inputValue()).toBe('owner');
    expect(await roleOf('olivia.hart@tideway.example')).toBe('owner');

    await mine.selectOption({ label: 'Scheduler' });
    await ask.getByRole('button', { name: 'Change my role' }).click();
    await page.waitForURL((u) => u.pathname !== '/firm');
    expect(await roleOf('olivia.hart@tideway.example')).toBe('scheduler');
  });
});
