import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { launchBrowser, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf } from '../helpers/server.ts';
import { unbookJobs } from '../helpers/demo.ts';
import { pencilIn } from '../helpers/mail.ts';
import { accessibilityViolations as violations, type Finding } from '../helpers/a11y.ts';
import type { Role } from '../../shared/permissions.ts';

/*
 * Every page each person opens, checked in chromium by axe-core (tests/helpers/a11y.ts: WCAG
 * 2.0–2.2 A and AA, and best practices) on the demo data: at 1280 × 800, and on a phone (390 × 844,
 * touch) for the pages people open on site, at the test scenario's "today", Monday 1 June 2026. A
 * page passes with no violation at all, and no box shows the UI library's stock "Please Input".
 * The browser contexts bypass the app's content security policy to load the rule engine.
 */
let app: RunningApp;
let browser: Browser;
let job: string;

beforeAll(async () => {
  app = await startServer();
  job = await idOf(app.ctx.knex, 'jobs', { reference: 'TW-2402' });
  // A request waiting for Brightspark's answer (Tue 17 Aug 2027, 09:00–13:00 BST), to decline.
  await unbookJobs(app.ctx.knex, 'TW-2415');
  await pencilIn(app.ctx.knex, {
    job: 'TW-2415',
    stage: 'electrical_connect',
    resource: 'Priya Nair',
    startsAt: '2027-08-17T08:00:00Z',
    endsAt: '2027-08-17T12:00:00Z',
    state: 'sent',
  });
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

async function signedIn(role: Role, phone: boolean): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({
    viewport: phone ? { width: 390, height: 844 } : { width: 1280, height: 800 },
    isMobile: phone,
    hasTouch: phone,
    timezoneId: 'Europe/London',
    bypassCSP: true,
  });
  // The browser's today is the test scenario's, so every page shows the seeded plan (reports, slots).
  await context.clock.setFixedTime(new Date('2026-06-01T08:00:00+01:00'));
  const page = await context.newPage();
  const demo = role === 'partner' ? account('partner', 'Brightspark Electrical') : account(role);
  await signInThroughPage(page, app.url, demo.email);
  return { context, page };
}

/** Opens a page and waits until its data is drawn (and, on the board, its bookings labelled). */
async function open(page: Page, path: string): Promise<void> {
  await page.goto(`${app.url}${path}`);
  // Under the whole suite's load on two cores a page has been seen to take over 30 s to settle.
  await page.waitForLoadState('networkidle', { timeout: 60_000 });
  if (path.startsWith('/board') && !(await page.locator('.day-list').count()))
    await page.waitForSelector('.fc-event.wl-booking[aria-label]');
  await page.evaluate(() => document.fonts.ready);
}

const DESK: [Role, string[]][] = [
  [
    'scheduler',
    [
      '/board?view=week&date=2026-06-01',
      '/board?view=day&date=2026-06-02',
      '/board?view=month&date=2026-06-01',
      '/jobs',
      '/resources',
      '/day-sheets',
      '/templates',
    ],
  ],
  ['owner', ['/firm', '/jobs/:job', '/jobs/:job/survey', '/jobs/:job/commission', '/jobs/:job/handover', '/jobs/new']],
  ['manager', ['/reports', '/jobs/:job/commission']],
  ['viewer', ['/board?view=week&date=2026-06-01', '/jobs/:job', '/no-such-page']],
  ['crew', ['/my-work', '/board?view=week&date=2026-06-01']],
  ['partner', ['/slots', '/slots/day-sheets']],
];
const PHONE: [Role, string[]][] = [
  ['crew', ['/my-work', '/jobs/:job/commission', '/jobs/:job/handover', '/jobs/:job/survey']],
  ['partner', ['/slots']],
  ['scheduler', ['/board?view=week&date=2026-06-01', '/jobs']],
];

describe.each([
  ['at 1280 × 800', false, DESK],
  ['on a phone', true, PHONE],
] as const)('every page %s', (_label, phone, pages) => {
  it.each(pages)(
    'passes axe-core for the %s',
    async (role, paths) => {
      const { context, page } = await signedIn(role, phone);
      try {
        const found: Record<string, Finding[]> = {};
        for (const path of paths) {
          await open(page, path.replace(':job', job));
          const v = await violations(page);
          // The UI library's stock placeholder tells nobody what goes in a box.
          const stock = await page.$$eval('[placeholder]', (els) =>
            els.map((e) => e.getAttribute('placeholder') ?? '').filter((p) => /^Please (Input|Select)$/.test(p)),
          );
          if (stock.length > 0) v.push({ rule: 'stock placeholder', impact: null, where: stock });
          if (v.length > 0) found[path] = v;
        }
        expect(found).toEqual({});
      } finally {
        await context.close();
      }
    },
    120_000,
  );
});

describe('dialogs and panels', () => {
  /** Waits for the dialog (or drawer) with this name and returns axe-core's violations with it open. */
  async function withDialog(page: Page, name: string | RegExp): Promise<Finding[]> {
    await page.getByRole('dialog', { name }).waitFor();
    // Let the opening transitions finish, so the rules see the dialog as people do: the dialog's
    // own, its content's, and the fade of the layers it sits in (a half-faded text fails contrast).
    await page.waitForFunction(() =>
      [...document.querySelectorAll('[role="dialog"]')].every((d) => {
        if (d.getAnimations({ subtree: true }).length > 0) return false;
        for (let up = d.parentElement; up; up = up.parentElement) if (up.getAnimations().length > 0) return false;
        return true;
      }),
    );
    return violations(page);
  }

  it("pass axe-core on the scheduler's board: a job's panel and moving a booking to a chosen time", async () => {
    const { context, page } = await signedIn('scheduler', false);
    try {
      await open(page, '/board?view=week&date=2026-06-01');
      const booking = page.locator('.fc-event.wl-booking.wl-state-confirmed').first();
      const jobRef = (await booking.getAttribute('aria-label'))!.slice(0, 7);
      await booking.click();
      expect(await withDialog(page, new RegExp(`^${jobRef} · `))).toEqual([]);
      await page.keyboard.press('Escape');
      await booking.focus();
      await page.keyboard.press('m');
      expect(await withDialog(page, /^Move .* to…$/)).toEqual([]);
    } finally {
      await context.close();
    }
  }, 60_000);

  it("pass axe-core on the manager's fix preview and a hire's dates", async () => {
    const { context, page } = await signedIn('manager', false);
    try {
      await open(page, '/reports');
      await page
        .getByRole('button', { name: /^Preview: / })
        .first()
        .click();
      expect(await withDialog(page, 'Preview the fix')).toEqual([]);
      // Its dates read as the rest of the page's do ("Mon 8 Jun"), not as stored.
      expect(await page.getByRole('dialog', { name: 'Preview the fix' }).innerText()).not.toMatch(/\d{4}-\d\d-\d\d/);
      await page.keyboard.press('Escape');
      await page.getByRole('dialog', { name: 'Preview the fix' }).waitFor({ state: 'detached' });
      await page
        .getByRole('button', { name: /^Change the dates of the hire of / })
        .first()
        .click();
      expect(await withDialog(page, /^Change the hire of /)).toEqual([]);
    } finally {
      await context.close();
    }
  }, 60_000);

  it("pass axe-core on a phone: a partner's decline, the menu, a crew member's on-site question and its answer's message", async () => {
    const partner = await signedIn('partner', true);
    const crew = await signedIn('crew', true);
    try {
      await open(partner.page, '/slots');
      await partner.page.getByRole('button', { name: 'Decline…' }).first().click();
      expect(await withDialog(partner.page, /^Decline: /)).toEqual([]);
      await partner.page.keyboard.press('Escape');
      await partner.page.getByRole('dialog').waitFor({ state: 'detached' });
      await partner.page.getByRole('button', { name: 'Menu' }).click();
      expect(await withDialog(partner.page, 'Menu')).toEqual([]);

      await open(crew.page, '/my-work');
      await crew.page
        .getByRole('button', { name: /On site/ })
        .first()
        .click();
      expect(await withDialog(crew.page, /.+/)).toEqual([]);
      // The answer's message (with its Undo) is read out where it appears: inside the page's
      // named live region, not loose at the end of the body.
      await crew.page.getByRole('dialog').getByRole('button', { name: 'Yes, on site' }).click();
      const said = crew.page.getByRole('region', { name: 'Messages' });
      await said.getByText(/marked on site/i).waitFor();
      expect(await said.getAttribute('aria-live')).toBe('polite');
      await crew.page.getByRole('dialog').waitFor({ state: 'detached' });
      await crew.page.waitForFunction(() => document.getAnimations().length === 0);
      expect(await violations(crew.page)).toEqual([]);
    } finally {
      await partner.context.close();
      await crew.context.close();
    }
  }, 60_000);
});

describe('the board read aloud', () => {
  it("makes each booking a button named by its summary, and another installer's time words out of the Tab order", async () => {
    const { context, page } = await signedIn('scheduler', false);
    try {
      // The week Moorview Spas has Brightspark's Priya Nair: busy elsewhere on Tideway's board.
      await open(page, '/board?view=week&date=2026-06-08');
      const mine = page.locator('.fc-event.wl-booking:not(.wl-elsewhere)').first();
      expect(await mine.getAttribute('role')).toBe('button');
      expect(await mine.getAttribute('aria-label')).toMatch(/^[A-Z]{2}-\d{4} · .*Press Enter for the job/);
      const elsewhere = page.locator('.fc-event.wl-elsewhere').first();
      expect(await elsewhere.getAttribute('role')).toBe('img');
      expect(await elsewhere.getAttribute('tabindex')).toBe('-1');
      expect(await elsewhere.getAttribute('aria-label')).toMatch(/^Busy elsewhere/);
      // Neither sits in a part of the page hidden from screen readers.
      expect(await mine.evaluate((el) => el.closest('[aria-hidden="true"]') === null)).toBe(true);
    } finally {
      await context.close();
    }
  }, 60_000);
});

describe('pages for people without an account', () => {
  it('pass axe-core: sign-in, and the pages behind a link from an e-mail that no longer works', async () => {
    for (const phone of [false, true]) {
      const context = await browser.newContext({
        viewport: phone ? { width: 390, height: 844 } : { width: 1280, height: 800 },
        isMobile: phone,
        hasTouch: phone,
        bypassCSP: true,
      });
      const page = await context.newPage();
      try {
        const found: Record<string, Finding[]> = {};
        for (const path of [
          '/sign-in',
          '/answer/not-a-token',
          '/invite/not-a-token',
          '/answer/certificate/not-a-token',
        ]) {
          await page.goto(`${app.url}${path}`);
          await page.waitForLoadState('networkidle');
          const v = await violations(page);
          if (v.length > 0) found[path] = v;
        }
        expect(found).toEqual({});
      } finally {
        await context.close();
      }
    }
  }, 60_000);
});
