import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';

/*
 * Marking a crew away from the Resources page on a phone (390 × 844), as the demo installer's
 * scheduler: Crew Heron on Thu 4 Jun 2026, where the demo books TW-2418's survey and TW-2402's
 * commissioning and handover on it (the test scenario's today is Mon 1 Jun 2026).
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let heron: string;

beforeAll(async () => {
  app = await startServer();
  heron = await idOf(app.ctx.knex, 'resources', { name: 'Crew Heron' });
  browser = await launchBrowser();
  page = await phonePage(browser);
  await signInThroughPage(page, app.url, account('scheduler').email);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

const awayRows = () => app.ctx.knex('calendar_exceptions').where('resource_id', heron).select('reason');

describe('time away on the Resources page', () => {
  it('marks a crew away for a day, names the bookings left in it, and takes it off again after asking', async () => {
    await page.goto(`${app.url}/resources`);
    await page.getByRole('button', { name: 'Edit Crew Heron' }).click();
    const panel = page.getByRole('group', { name: 'Time away: Crew Heron' });
    await panel.getByText('No time away marked.').waitFor();

    // A reason left out is named under the form, and nothing is sent.
    await panel.getByLabel('First day away').fill('2026-06-04');
    await panel.getByLabel('Last day away').fill('2026-06-04');
    await panel.getByRole('button', { name: 'Mark away' }).click();
    expect(await panel.getByRole('alert').textContent()).toBe('Why is required: say why, in a few words');
    // The box points at it and is where the cursor goes.
    const why = panel.getByLabel('Why');
    expect(await why.getAttribute('aria-describedby')).toBe(await panel.getByRole('alert').getAttribute('id'));
    await expect.poll(() => why.evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await awayRows()).toEqual([]);

    await panel.getByLabel('Why').fill('Training');
    await panel.getByRole('button', { name: 'Mark away' }).click();
    const status = panel.getByRole('status');
    await status.waitFor();
    expect(await status.locator('strong').textContent()).toBe('3 bookings fall in that time');
    const listed = await status.locator('li').allTextContents();
    expect(listed.map((l) => l.replace(/, \d\d:\d\d$/, ''))).toEqual([
      'TW-2418 · Site survey · Thu 4 Jun',
      'TW-2402 · Commission · Thu 4 Jun',
      'TW-2402 · Handover · Thu 4 Jun',
    ]);
    expect(await awayRows()).toEqual([{ reason: 'Training' }]);
    await page.screenshot({ path: 'tests/e2e/artifacts/resources-time-away.png', fullPage: true });

    await panel.getByRole('button', { name: 'Take off…' }).click();
    await page.getByRole('button', { name: 'Take it off' }).click();
    await panel.getByText('No time away marked.').waitFor();
    expect(await awayRows()).toEqual([]);

    // Part of a day: from 14:00 on Thu 4 Jun (BST), to the day's end.
    await panel.getByLabel('Part of a day').check();
    await panel.getByLabel(/Away from/).fill('14:00');
    await panel.getByLabel('Why').fill('Dentist');
    await panel.getByRole('button', { name: 'Mark away' }).click();
    await panel.getByText('Thu 4 Jun from 14:00').waitFor();
    expect(await panel.locator('li', { hasText: 'Dentist' }).first().textContent()).toContain('Thu 4 Jun from 14:00');
    const row = await app.ctx.knex('calendar_exceptions').where('resource_id', heron).first('starts_at', 'ends_at');
    expect([row.startsAt.toISOString(), row.endsAt.toISOString()]).toEqual([
      '2026-06-04T13:00:00.000Z',
      '2026-06-04T23:00:00.000Z',
    ]);
    // The whole of that day again: it overlaps the afternoon marked, so it is named and not kept.
    await panel.getByLabel('Part of a day').uncheck();
    await panel.getByLabel('Why').fill('Holiday');
    await panel.getByRole('button', { name: 'Mark away' }).click();
    const overlap = panel.getByRole('alert');
    await overlap.waitFor();
    expect(await overlap.textContent()).toBe('First day away must not overlap days already marked');
    expect(await panel.getByLabel('First day away').getAttribute('aria-describedby')).toBe(
      await overlap.getAttribute('id'),
    );
    expect(await awayRows()).toEqual([{ reason: 'Dentist' }]);
    // The message names what is marked; the box's problem is said under it, not again by its code.
    await page.getByText(/^Conflict\. Crew Heron is already marked away Thu 4 Jun from 14:00 \(Dentist\)\./).waitFor();
    expect(await page.getByText('From must not overlap').count()).toBe(0);
    await panel.getByRole('button', { name: 'Take off…' }).click();
    await page.getByRole('button', { name: 'Take it off' }).click();
    await panel.getByText('No time away marked.').waitFor();
  });

  it('closes the whole firm for a day, on every one of its calendars, and opens it again', async () => {
    const closedRows = () =>
      app.ctx
        .knex('calendar_exceptions as e')
        .join('calendars as c', 'c.id', 'e.calendar_id')
        .join('firms as f', 'f.id', 'c.firm_id')
        .where('f.name', 'Tideway Hot Tubs')
        .where('e.reason', 'Training day')
        .count('* as n')
        .first();
    const calendars = await app.ctx
      .knex('calendars as c')
      .join('firms as f', 'f.id', 'c.firm_id')
      .where('f.name', 'Tideway Hot Tubs')
      .count('* as n')
      .first();
    await page.goto(`${app.url}/resources`);
    const panel = page.getByRole('group', { name: 'Days the firm is closed' });
    await panel.getByText(/No closed days marked/).waitFor();
    await panel.getByLabel('First day closed').fill('2026-06-04');
    await panel.getByLabel('Last day closed').fill('2026-06-04');
    await panel.getByLabel('Why').fill('Training day');
    await panel.getByRole('button', { name: 'Close those days' }).click();
    const status = panel.getByRole('status');
    await status.waitFor();
    // Crew Heron's three bookings that day are among them (see the test above).
    expect(Number((await status.locator('strong').textContent())!.split(' ')[0])).toBeGreaterThanOrEqual(3);
    expect(await closedRows()).toEqual(calendars);

    await panel.getByRole('button', { name: 'Take off…' }).click();
    await page.getByRole('button', { name: 'Take it off' }).click();
    await panel.getByText(/No closed days marked/).waitFor();
    expect(await closedRows()).toEqual({ n: '0' });
  });
  it("adds a crew to the firm's books, and takes it off again after asking", async () => {
    await page.goto(`${app.url}/resources`);
    await page.getByRole('button', { name: 'Add a crew, person or machine' }).click();
    const form = page.getByRole('form', { name: 'Add a crew, person or machine' });
    // The kinds offered are the words a person types, not stored codes.
    expect(
      await form.locator('datalist option').evaluateAll((os) => os.map((o) => (o as HTMLOptionElement).value)),
    ).toEqual(expect.arrayContaining(['install crew']));
    expect(await form.getByLabel('Kind').getAttribute('placeholder')).toBe('install crew');
    // Slips are named under the form, each box pointing at its own, the first one focused; nothing is added.
    const before = await app.ctx.knex('resources').count({ n: '*' }).first();
    await form.getByLabel('Kind').fill('install crew!');
    await form.getByRole('button', { name: 'Add', exact: true }).click();
    const problemOf = async (label: string) => {
      const id = await form.getByLabel(label).getAttribute('aria-describedby');
      return id === null ? null : form.locator(`[id="${id}"]`).textContent();
    };
    await expect.poll(() => problemOf('Name')).toBe('Name is required');
    expect(await problemOf('Kind')).toBe(
      'Kind must start with a letter and hold only letters, digits and spaces, e.g. excavator or install crew',
    );
    expect(await problemOf('What it is')).toBeNull();
    expect(await form.getByLabel('Name').evaluate((el) => el === document.activeElement)).toBe(true);
    expect(await app.ctx.knex('resources').count({ n: '*' }).first()).toEqual(before);
    await form.getByLabel('Name').fill('Crew Wren');
    await form.getByLabel('Kind').fill('install crew');
    await form.getByRole('button', { name: 'Add', exact: true }).click();
    await page.getByRole('button', { name: 'Edit Crew Wren' }).click();
    const row = await app.ctx.knex('resources').where('name', 'Crew Wren').first('kind', 'active');
    expect(row).toEqual({ kind: 'install_crew', active: true });

    // A slip in the name is put right where it was made; the open row stays open under its new name.
    const rename = page.getByRole('form', { name: 'Rename Crew Wren' });
    await rename.getByLabel('New name').fill('Crew Heron');
    await rename.getByRole('button', { name: 'Rename' }).click();
    expect(await rename.getByRole('alert').textContent()).toBe('New name is already used by another resource');
    const problemId = await rename.getByLabel('New name').getAttribute('aria-describedby');
    expect(await rename.getByRole('alert').getAttribute('id')).toBe(problemId);
    expect(await rename.getByLabel('New name').evaluate((el) => el === document.activeElement)).toBe(true);
    await rename.getByLabel('New name').fill('Crew Wrenn');
    await rename.getByRole('button', { name: 'Rename' }).click();
    await page.getByRole('button', { name: 'Edit Crew Wrenn' }).waitFor();
    expect(await page.getByRole('form', { name: 'Rename Crew Wrenn' }).getByLabel('New name').inputValue()).toBe(
      'Crew Wrenn',
    );

    const takeOff = async () => {
      await page.getByRole('button', { name: 'Take Crew Wrenn off the books…' }).click();
      await page.getByRole('button', { name: 'Take it off' }).click();
      await expect.poll(() => page.getByRole('button', { name: 'Edit Crew Wrenn' }).count()).toBe(0);
    };
    // Taken off by a slip: the message's Undo puts it back.
    await takeOff();
    await page.getByRole('button', { name: 'Undo' }).click();
    // Back where it was, its panel still open.
    expect(await page.getByRole('button', { name: 'Edit Crew Wrenn' }).getAttribute('aria-expanded')).toBe('true');
    // Taken off again, it is listed under "Taken off the books", from where it can be put back too.
    await takeOff();
    await page.getByText(/^Taken off the books/).click();
    const gone = page.locator('details li', { hasText: 'Crew Wrenn' });
    await gone.getByRole('button', { name: 'Put back' }).click();
    await page.getByRole('button', { name: 'Edit Crew Wrenn' }).waitFor();
    await expect.poll(() => gone.count()).toBe(0);
    await takeOff();
    expect((await app.ctx.knex('resources').where('name', 'Crew Wrenn').first('active')).active).toBe(false);
  });

  it('puts a person in a crew, and refuses one who would be in two places, naming the bookings', async () => {
    await page.goto(`${app.url}/resources`);
    await page.getByRole('button', { name: 'Add a crew, person or machine' }).click();
    const form = page.getByRole('form', { name: 'Add a crew, person or machine' });
    await form.getByLabel('Name').fill('Ola Quist');
    await form.getByLabel('What it is').selectOption('person');
    await form.getByLabel('Kind').fill('installer');
    await form.getByRole('button', { name: 'Add', exact: true }).click();
    await page.getByRole('button', { name: 'Edit Ola Quist' }).waitFor();

    await page.getByRole('button', { name: 'Edit Crew Otter' }).click();
    const crew = page.getByRole('form', { name: 'People in Crew Otter' });
    // Jamie is in Crew Kestrel, booked at the same times as Crew Otter this month.
    await crew.getByLabel(/Jamie Whitlow/).check();
    await crew.getByRole('button', { name: 'Save the crew' }).click();
    await crew.getByRole('status').waitFor();
    expect(await crew.getByRole('status').locator('li').first().textContent()).toMatch(
      /^Jamie Whitlow: with Crew Otter on .*; elsewhere on /,
    );
    await crew.getByLabel(/Jamie Whitlow/).uncheck();
    await crew.getByLabel(/Ola Quist/).check();
    await crew.getByRole('button', { name: 'Save the crew' }).click();
    const otter = await idOf(app.ctx.knex, 'resources', { name: 'Crew Otter' });
    const ola = await idOf(app.ctx.knex, 'resources', { name: 'Ola Quist' });
    await expect
      .poll(async () => (await app.ctx.knex('crew_members').where('crew_id', otter).pluck('person_id')).map(String))
      .toContain(ola);
    await crew.getByLabel(/Ola Quist/).uncheck();
    await crew.getByRole('button', { name: 'Save the crew' }).click();
    await expect
      .poll(async () => (await app.ctx.knex('crew_members').where('crew_id', otter).pluck('person_id')).map(String))
      .not.toContain(ola);
  });
});
