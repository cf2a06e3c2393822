import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf, signIn, type Agent } from '../helpers/server.ts';
import { DIG, makeJob, type FixtureStage } from '../helpers/flows.ts';
import {
  apiBookings,
  dragBooking,
  dragBookingToTray,
  dragTrayStage,
  openBoard,
  storedBookings,
} from './helpers-board.ts';

/*
 * A scheduler's day on the board, in chromium at 1280 × 800. Each test makes a job of its own
 * (tests/helpers/flows.ts, or the job API and the job page for the last) and works in November and
 * December 2026, which no demo job reaches (the demo's work ends in the summer), on rows no other
 * test books on those days, so the tests never depend on each other or on the demo's plan. Both
 * months are GMT: local times are UTC. WATERLINE_SCREENSHOTS=1 writes the docs/ screenshots.
 */
let app: RunningApp;
let browser: Browser;
let page: Page;
let office: Agent;
const shots = process.env.WATERLINE_SCREENSHOTS === '1';

/** "Crane lift into pit" as the in-ground template has it: a crane, a crew, two pallet trucks and rollers for four hours. */
const LIFT: FixtureStage = {
  kind: 'lift',
  name: 'Crane lift into pit',
  minutes: 240,
  needs: { crane: 1, install_crew: 1, pallet_truck: 2, rollers: 1 },
};
const FILL: FixtureStage = { kind: 'fill', name: 'Fill', minutes: 180, needs: { install_crew: 1 } };
const HANDOVER: FixtureStage = { kind: 'handover', name: 'Handover', minutes: 60, needs: { install_crew: 1 } };
const CONNECT: FixtureStage = {
  kind: 'electrical_connect',
  name: 'Connect and certify',
  minutes: 240,
  needs: { electrician: 1 },
};

beforeAll(async () => {
  app = await startServer();
  browser = await launchBrowser();
  page = await (
    await browser.newContext({ viewport: { width: 1280, height: 800 }, timezoneId: 'Europe/London' })
  ).newPage();
  await signInThroughPage(page, app.url, account('scheduler').email);
  office = await signIn(app.ctx, account('scheduler').email);
}, 120_000);
// A failed test leaves a picture of the page it failed on.
afterEach(async (ctx) => {
  if (ctx.task.result?.state === 'fail')
    await page?.screenshot({
      path: `tests/e2e/artifacts/scheduler-day-failed-${ctx.task.name.slice(0, 40).replace(/\W+/g, '-')}.png`,
    });
});
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** Waits for the board and the server (a loaded machine may take seconds to save and reload). */
const poll = <T>(read: () => T | Promise<T>) => expect.poll(read, { timeout: 15_000 });

const resource = (name: string) => idOf(app.ctx.knex, 'resources', { name });

/** Books through the API, as another office session would (the same guarded write path). */
async function bookThroughApi(
  stageId: string,
  resourceName: string,
  startsAt: string,
): Promise<{ id: string; version: number }> {
  const res = await office
    .post('/api/bookings')
    .set('X-CSRF-Token', office.csrf)
    .send({ stageId, resourceId: await resource(resourceName), startsAt })
    .expect(201);
  const b = (res.body.bookings as { id: string; version: number; resourceId: string }[])[0]!;
  return { id: String(b.id), version: b.version };
}

/** The words of the board's own messages (naive-ui toasts), newest last. */
const toasts = () => page.locator('.n-message').allInnerTexts();

describe("the scheduler's day on the board", () => {
  it('books a crane lift by one drop on the crane, and the rest of its resources in one click', async () => {
    const job = await makeJob(app.ctx.knex, {
      reference: 'SD-101',
      town: 'Kirkby Malzeard',
      postcode: 'HG4 3RS',
      stages: [LIFT],
      links: [],
    });
    const lift = job.stage.lift!;
    const crane = await resource('25 t city crane');
    await openBoard(page, app.url, 'view=week&date=2026-11-02', crane);

    // Monday 2 November, a third into the morning: 08:00.
    const said = await dragTrayStage(page, 'SD-101 · Crane lift into pit', crane, '2026-11-02T06:00:00', 1 / 3);
    expect(said).toContain('what else the stage needs is proposed next');
    const panel = page.getByRole('dialog', { name: "The rest of 'Crane lift into pit' (SD-101)" });
    await panel.waitFor({ timeout: 10_000 });
    // Only the crane is booked so far: the stage is still in the tray, saying what it lacks.
    await poll(() => page.locator(`.tray-stage[data-stage-id="${lift}"] .tray-stage__needs`).innerText()).toBe(
      'needs 1 install crew, 2 pallet trucks, 1 set of rollers · 1 booking made',
    );
    const picked = await panel
      .locator('select')
      .evaluateAll((els) => els.map((el) => (el as HTMLSelectElement).selectedOptions[0]?.textContent?.trim()));
    expect(picked).toEqual(['Crew Heron', 'Pallet truck 1', 'Pallet truck 2', 'Roller set']);
    if (shots) await page.screenshot({ path: 'docs/board-multi-resource-drop.png' });

    await panel.getByRole('button', { name: 'Book these 4' }).click();
    await panel.waitFor({ state: 'detached', timeout: 10_000 });

    // Stored: the crane and the four proposed, all at 08:00–12:00 on Monday.
    const expected = ['25 t city crane', 'Crew Heron', 'Pallet truck 1', 'Pallet truck 2', 'Roller set'];
    await poll(async () => (await storedBookings(app.ctx.knex, lift)).map((b) => b.resource)).toEqual(expected);
    const stored = await storedBookings(app.ctx.knex, lift);
    for (const b of stored)
      expect([b.startsAt, b.endsAt, b.state]).toEqual([
        '2026-11-02T08:00:00.000Z',
        '2026-11-02T12:00:00.000Z',
        'pencilled',
      ]);
    // The API lists the same five to the office.
    const listed = await apiBookings(office, lift, '2026-11-02T00:00:00Z', '2026-11-03T00:00:00Z');
    expect(listed.map((b) => b.id).sort()).toEqual(stored.map((b) => b.id).sort());
    // The board shows each of them, and the stage has left the tray (no "needs …" left on it).
    for (const b of stored) await page.locator(`.fc-event[data-booking-id="${b.id}"]`).waitFor({ timeout: 10_000 });
    await poll(() => page.locator(`.tray-stage[data-stage-id="${lift}"]`).count()).toBe(0);
    expect(await page.locator('.tray').innerText()).not.toContain('SD-101');
  }, 90_000);

  it('refuses a lift dropped before its unbooked base could be poured and cured, naming the base', async () => {
    const job = await makeJob(app.ctx.knex, {
      reference: 'SD-201',
      town: 'Kirkby Malzeard',
      postcode: 'HG4 3RS',
      stages: [
        DIG,
        { kind: 'base_pour', name: 'Pour reinforced base', minutes: 300, needs: { groundworks_crew: 1 } },
        LIFT,
      ],
      links: [
        ['excavation', 'base_pour'],
        ['base_pour', 'lift'],
      ],
    });
    // The base cures to 70 % strength before anything is lifted onto it, as the template says.
    await app.ctx
      .knex('stages')
      .where('id', job.stage.base_pour)
      .update({ cure: JSON.stringify({ targetFraction: 0.7 }) });
    await app.ctx
      .knex('dependencies')
      .where({ from_stage_id: job.stage.base_pour, to_stage_id: job.stage.lift })
      .update({ waits_for_cure: true });
    // The dig is booked for Monday 9 November; the base is not booked at all.
    for (const name of ['Millstone gang', '1.5 t excavator', 'Tracked dumper'])
      await bookThroughApi(job.stage.excavation!, name, '2026-11-09T08:00:00Z');
    const crane = await resource('25 t city crane');
    await openBoard(page, app.url, 'view=week&date=2026-11-09', crane);

    // Wednesday 11 November 08:00: the base could be poured on Monday afternoon at the earliest, then needs about a week to cure.
    const said = await dragTrayStage(page, 'SD-201 · Crane lift into pit', crane, '2026-11-11T06:00:00', 1 / 3);
    expect(said).toContain("Can’t go here: 'Crane lift into pit' can't start before about");
    expect(said).toMatch(/'Pour reinforced base' \(not booked yet\) needs 5 h and \d+\.\d days to cure first/);
    await poll(toasts).toContainEqual(
      expect.stringMatching(
        /^Not booked: 'Crane lift into pit' can't start before about .+: 'Pour reinforced base' \(not booked yet\) needs 5 h and \d+\.\d days to cure first/,
      ),
    );
    expect(await storedBookings(app.ctx.knex, job.stage.lift!)).toEqual([]);
    expect(await apiBookings(office, job.stage.lift!, '2026-11-01T00:00:00Z', '2026-12-01T00:00:00Z')).toEqual([]);
    // The lift is still whole in the tray.
    expect(await page.locator(`.tray-stage[data-stage-id="${job.stage.lift}"] .tray-stage__needs`).innerText()).toBe(
      'needs 1 crane, 1 install crew, 2 pallet trucks, 1 set of rollers',
    );
  }, 90_000);

  it('takes a booking off by dragging it to the tray, and Undo puts it back to stay', async () => {
    const job = await makeJob(app.ctx.knex, {
      reference: 'SD-301',
      town: 'Kirkby Malzeard',
      postcode: 'HG4 3RS',
      stages: [FILL],
      links: [],
    });
    const fill = job.stage.fill!;
    const kestrel = await resource('Crew Kestrel');
    const booked = await bookThroughApi(fill, 'Crew Kestrel', '2026-11-16T08:00:00Z');
    await openBoard(page, app.url, 'view=week&date=2026-11-16', kestrel);
    await page.locator(`.fc-event[data-booking-id="${booked.id}"]`).waitFor();
    expect(await page.locator(`.tray-stage[data-stage-id="${fill}"]`).count()).toBe(0);

    await dragBookingToTray(page, booked.id);
    await poll(toasts).toContainEqual(expect.stringContaining("Saved: take off 'Fill' (Crew Kestrel)."));
    await poll(() => storedBookings(app.ctx.knex, fill)).toEqual([]);
    await office.get(`/api/bookings/${booked.id}`).expect(404);
    await poll(() => page.locator(`.fc-event[data-booking-id="${booked.id}"]`).count()).toBe(0);
    await page.locator(`.tray-stage[data-stage-id="${fill}"]`).waitFor();

    await page.getByRole('button', { name: 'Undo', exact: true }).click();
    await poll(toasts).toContainEqual(expect.stringContaining("Undone: take off 'Fill' on SD-301"));
    const back = () =>
      storedBookings(app.ctx.knex, fill).then((rows) =>
        rows.map(({ resource: r, startsAt, endsAt, state }) => ({ r, startsAt, endsAt, state })),
      );
    await poll(back).toEqual([
      {
        r: 'Crew Kestrel',
        startsAt: '2026-11-16T08:00:00.000Z',
        endsAt: '2026-11-16T11:00:00.000Z',
        state: 'pencilled',
      },
    ]);
    const [again] = await storedBookings(app.ctx.knex, fill);
    expect((await apiBookings(office, fill, '2026-11-16T00:00:00Z', '2026-11-17T00:00:00Z')).map((b) => b.id)).toEqual([
      again!.id,
    ]);
    await page.locator(`.fc-event[data-booking-id="${again!.id}"]`).waitFor({ timeout: 10_000 });
    await poll(() => page.locator(`.tray-stage[data-stage-id="${fill}"]`).count()).toBe(0);

    await page.reload();
    await page.locator(`.fc-event[data-booking-id="${again!.id}"]`).waitFor({ timeout: 10_000 });
    expect(await page.locator(`.tray-stage[data-stage-id="${fill}"]`).count()).toBe(0);
  }, 90_000);

  it('finds the jobs of one town: the board and the tray show only them', async () => {
    const here = await makeJob(app.ctx.knex, {
      reference: 'SD-401',
      town: 'Kirkby Overblow',
      postcode: 'HG3 1HD',
      stages: [FILL, HANDOVER],
      links: [['fill', 'handover']],
    });
    const there = await makeJob(app.ctx.knex, {
      reference: 'SD-402',
      town: 'Sicklinghall',
      postcode: 'LS22 4BD',
      stages: [FILL, HANDOVER],
      links: [['fill', 'handover']],
    });
    const otter = await resource('Crew Otter');
    const mine = await bookThroughApi(here.stage.fill!, 'Crew Otter', '2026-11-23T08:00:00Z');
    const theirs = await bookThroughApi(there.stage.fill!, 'Crew Otter', '2026-11-24T08:00:00Z');
    await openBoard(page, app.url, 'view=week&date=2026-11-23', otter);
    await page.locator(`.fc-event[data-booking-id="${theirs.id}"]`).waitFor();
    const trayJobs = () => page.locator('.tray__job-link').allInnerTexts();
    expect(await trayJobs()).toEqual(expect.arrayContaining(['SD-401', 'SD-402']));

    await page.getByLabel('Search').fill('Kirkby Overblow');
    await poll(trayJobs).toEqual(['SD-401']);
    expect(await page.locator('.tray__job-head').innerText()).toContain('Kirkby Overblow');
    expect(
      await page.locator('.tray-stage').evaluateAll((els) => els.map((el) => el.getAttribute('data-title'))),
    ).toEqual(['SD-401 · Handover']);
    // Every booking the board shows is the town's one job's: Otter's other work is gone, and so are the other rows.
    const shown = () =>
      page.locator('.fc-event.wl-booking').evaluateAll((els) => els.map((el) => (el as HTMLElement).dataset.bookingId));
    await poll(shown).toEqual([mine.id]);
    expect(
      await page
        .locator('td.fc-timeline-lane[data-resource-id]')
        .evaluateAll((els) => els.map((el) => el.getAttribute('data-resource-id'))),
    ).toEqual([otter]);
    if (shots) await page.screenshot({ path: 'docs/board-search-town.png' });

    await page.getByLabel('Search').fill('');
    await page.locator(`.fc-event[data-booking-id="${theirs.id}"]`).waitFor();
    expect(await trayJobs()).toEqual(expect.arrayContaining(['SD-401', 'SD-402']));
  }, 90_000);

  it("shows a partner's decline on the board and the job page, and books it again on another electrician", async () => {
    const job = await makeJob(app.ctx.knex, {
      reference: 'SD-501',
      town: 'Kirkby Malzeard',
      postcode: 'HG4 3RS',
      stages: [CONNECT],
      links: [],
    });
    const connect = job.stage.electrical_connect!;
    const priya = await resource('Priya Nair');
    const tom = await resource('Tom Ashworth');
    const asked = await bookThroughApi(connect, 'Priya Nair', '2026-11-30T09:00:00Z');
    const published = await office
      .post(`/api/bookings/${asked.id}/publish`)
      .set('X-CSRF-Token', office.csrf)
      .send({ version: asked.version })
      .expect(200);
    await openBoard(page, app.url, 'view=week&date=2026-11-30', priya);
    const event = page.locator(`.fc-event[data-booking-id="${asked.id}"]`);
    await poll(() => event.getAttribute('class')).toContain('wl-state-sent');

    // Priya, for Brightspark, says no on her own page while the board is open, and why (markup stays text).
    const partner = await signIn(app.ctx, 'priya.nair@brightspark.example');
    const reason = 'Not free that day — <b>wedding</b>';
    const answer = await partner
      .post(`/api/partner/slots/${asked.id}/answer`)
      .set('X-CSRF-Token', partner.csrf)
      .send({ version: published.body.version as number, action: 'decline', reason })
      .expect(200);
    expect(answer.body.result).toBe('declined');

    // The board hears of it: a notice, the booking marked declined (still on the board), the list of declines to book again.
    await page.getByText("Brightspark Electrical declined 'Connect and certify'").waitFor({ timeout: 15_000 });
    expect(await page.locator('.n-notification').innerText()).toContain("Priya Nair can't do SD-501 then.");
    await poll(() => event.getAttribute('class')).toContain('wl-state-declined');
    expect(await event.getAttribute('title')).toContain('Declined');
    const notice = page.locator('section.declined');
    expect((await notice.innerText()).replace(/\s+/g, ' ')).toContain(
      "✖ 1 declined booking to book again Brightspark Electrical declined Priya Nair for 'Connect and certify' on SD-501, Mon 30 Nov 09:00 (said no on their page,",
    );
    expect(await notice.locator('.declined__reason').innerText()).toBe(reason);
    expect(await notice.locator('b').count()).toBe(0);
    await poll(() => page.locator(`.tray-stage[data-stage-id="${connect}"] .tray-stage__declined`).innerText()).toBe(
      '✖ Declined by Brightspark Electrical',
    );
    await event.scrollIntoViewIfNeeded();
    if (shots) await page.screenshot({ path: 'docs/board-declined.png' });

    // The job page says so too.
    await page.goto(`${app.url}/jobs/${job.jobId}`);
    await page.getByText('1. Connect and certify').click();
    await page
      .getByText(/^Priya Nair · Mon 30 Nov 2026, 09:00–13:00 · Declined · Not free that day — <b>wedding<\/b>$/)
      .waitFor({ timeout: 10_000 });

    // Booked again: the declined booking dragged onto Tom's row.
    await openBoard(page, app.url, 'view=week&date=2026-11-30', tom);
    await dragBooking(page, asked.id, tom, '2026-11-30T06:00:00', 0.5);
    await poll(toasts).toContainEqual(expect.stringContaining("Saved: rebook 'Connect and certify'."));
    // The same booking, now Tom's, pencilled on that Monday (where in the morning is the drop's: a mouse is not exact).
    await poll(async () =>
      (await storedBookings(app.ctx.knex, connect)).map(({ id, resource: r, startsAt, state }) => ({
        id,
        r,
        day: startsAt.slice(0, 10),
        state,
      })),
    ).toEqual([{ id: asked.id, r: 'Tom Ashworth', day: '2026-11-30', state: 'pencilled' }]);
    await poll(() => notice.count()).toBe(0);
    await poll(() => page.locator(`.tray-stage[data-stage-id="${connect}"]`).count()).toBe(0);
  }, 90_000);

  it('puts a new in-ground job on the board from survey to handover with the mouse, every stage whole and no warning left', async () => {
    // The office takes the enquiry (the API, as the job form sends it), then plans it from the in-ground template on the job page.
    const created = await office
      .post('/api/jobs')
      .set('X-CSRF-Token', office.csrf)
      .send({
        reference: 'SD-601',
        customerName: 'Wynn Carrick',
        siteAddress: '2 Fold Lane',
        siteTown: 'Kirkby Fleetham',
        sitePostcode: 'DL7 0SA',
        installationType: 'in_ground',
      })
      .expect(201);
    const jobId = String(created.body.id);
    await page.goto(`${app.url}/jobs/${jobId}`);
    await page.getByRole('button', { name: 'Plan stages', exact: true }).click();
    await page.getByText('1. Site survey').waitFor({ timeout: 10_000 });
    const stages = await app.ctx
      .knex('stages')
      .where('job_id', jobId)
      .orderBy('sequence')
      .select('id', 'name', 'requirements');
    expect(stages.map((x: { name: string }) => x.name)).toEqual([
      'Site survey',
      'Excavate pit',
      'Spoil away (skips or grab lorry)',
      'Pour reinforced base',
      'Block retaining walls',
      'Supply cable first fix',
      'Delivery',
      'Lift plan received',
      'Crane lift into pit',
      'Fill',
      'Connect and certify',
      'Commission',
      'Handover',
    ]);

    // Rows the earlier tests leave free on these days.
    const rows = {
      crew: await resource('Crew Kestrel'),
      gang: await resource('Millstone second gang'),
      sparks: await resource('Gareth Pryce'),
      lorry: await resource('18 t lorry with loader crane'),
      planner: await resource('Fellside lift planner'),
      crane: await resource('60 t mobile crane'),
      grab: await resource('Grab lorry'),
    };
    await openBoard(page, app.url, 'view=week&date=2026-11-02', rows.crew);
    const said: string[] = [];
    // Any refusal from the server, to tell in a failure.
    const refused: string[] = [];
    page.on('response', (r) => {
      if (r.url().includes('/api/') && r.status() >= 400)
        void r.text().then((t) => refused.push(`${r.status()} ${r.url()} ${t}`));
    });
    /** One stage from the tray onto a row; the rest of what it needs accepted as proposed, in one click. */
    const place = async (stage: string, row: string, slotDate: string, proposed: number, into = 1 / 3) => {
      const title = `SD-601 · ${stage}`;
      await page.getByText('Loading…').waitFor({ state: 'hidden' });
      // A third into a morning slot (06:00–12:00) is 08:00, two thirds 10:00.
      said.push(`${stage}: ${await dragTrayStage(page, title, row, slotDate, into)}`);
      if (proposed) {
        const panel = page.getByRole('dialog', { name: `The rest of '${stage}' (SD-601)` });
        await panel.getByRole('button', { name: `Book these ${proposed}` }).click();
        await panel.waitFor({ state: 'detached', timeout: 10_000 });
      }
      await expect
        .poll(() => page.locator(`.tray-stage[data-title="${title}"]`).count(), { timeout: 15_000 })
        .toBe(0)
        .catch(async (e: Error) => {
          throw new Error(
            `'${stage}' stayed in the tray (${said.at(-1)}); the board said ${JSON.stringify(await toasts())}; ${refused.join('; ')}`,
            { cause: e },
          );
        });
    };
    // A drag begun while the next week's bookings are still arriving is lost when the timeline redraws: wait for them.
    const nextWeek = async (monday: string) => {
      const loaded = page.waitForResponse((r) => r.url().includes('/api/board?'));
      await page.getByRole('button', { name: 'Next week' }).click();
      await loaded;
      await page.locator(`td.fc-timeline-slot-lane[data-date="${monday}T06:00:00"]`).waitFor();
      await page.getByText('Loading…').waitFor({ state: 'hidden' });
    };
    // November and December are GMT: local times are UTC.
    await place('Site survey', rows.crew, '2026-11-03T06:00:00', 0);
    await place('Excavate pit', rows.gang, '2026-11-04T06:00:00', 2);
    // The dig (12 h without quantities) ends on Thursday morning; the grab lorry takes the spoil that afternoon, 14:00.
    await place('Spoil away (skips or grab lorry)', rows.grab, '2026-11-05T12:00:00', 0);
    await place('Supply cable first fix', rows.sparks, '2026-11-05T06:00:00', 0);
    await place('Lift plan received', rows.planner, '2026-11-05T06:00:00', 0);
    await place('Pour reinforced base', rows.gang, '2026-11-06T06:00:00', 0);
    await nextWeek('2026-11-09');
    // The walls wait a day after the pour.
    await place('Block retaining walls', rows.gang, '2026-11-09T06:00:00', 0);
    // The lift waits for the base to cure in the cold months: well into December.
    for (const monday of ['2026-11-16', '2026-11-23', '2026-11-30', '2026-12-07', '2026-12-14']) await nextWeek(monday);
    // Lift at 10:00; the unit comes on the lorry that morning, 08:00, not weeks before (delivery and lift day).
    await place('Crane lift into pit', rows.crane, '2026-12-14T06:00:00', 4, 2 / 3);
    await place('Delivery', rows.lorry, '2026-12-14T06:00:00', 0);
    await place('Fill', rows.crew, '2026-12-15T06:00:00', 0);
    await place('Connect and certify', rows.sparks, '2026-12-15T06:00:00', 0);
    await place('Commission', rows.crew, '2026-12-16T06:00:00', 0);
    await place('Handover', rows.crew, '2026-12-17T06:00:00', 0);
    // No drop was let through with a warning.
    expect(
      said.filter((x) => !x.endsWith('Allowed. Books it on this row; what else the stage needs is proposed next.')),
    ).toEqual([]);

    // Every stage has exactly what it asks for.
    for (const st of stages as { id: string; name: string; requirements: { kind: string; count: number }[] }[]) {
      const kinds = await app.ctx
        .knex('bookings')
        .join('resources', 'resources.id', 'bookings.resource_id')
        .where('bookings.stage_id', st.id)
        .pluck('resources.kind');
      const needed = st.requirements.flatMap((r) => Array.from({ length: r.count }, () => r.kind));
      expect(kinds.sort(), st.name).toEqual(needed.sort());
    }
    // Nothing of the job is left in the tray, and the job panel lists no problem or warning on any stage.
    expect(await page.locator('.tray').innerText()).not.toContain('SD-601');
    const handover = String((await app.ctx.knex('bookings').where('stage_id', String(stages[12].id)).first('id')).id);
    await page.locator(`.fc-event[data-booking-id="${handover}"]`).click();
    const drawer = page.locator('.n-drawer');
    await drawer.getByText('SD-601 · Kirkby Fleetham').waitFor();
    await poll(() => drawer.locator('.chain > li').count()).toBe(13);
    expect(await drawer.locator('.chain .problems li').allInnerTexts()).toEqual([]);
    expect(await drawer.locator('.chain').innerText()).not.toContain('not booked');
  }, 180_000);
});
