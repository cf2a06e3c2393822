import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account, idOf, TEST_TODAY } from '../helpers/server.ts';
import { ROLES, type Role } from '../../shared/permissions.ts';

/*
 * Every page of the app, opened by each role in chromium (office roles at 1280 × 800, crew and the
 * partner's coordinator on a phone), on the demo data at the test scenario's today: nothing may go
 * wrong that the person does not see. No uncaught error, nothing logged as an error or a framework
 * warning, no request answered 5xx, no request the page had no business making (a 4xx: the page
 * asked for something the role may not read, or that is not there), and no "undefined", "NaN",
 * "null", "Invalid Date" or "[object Object]" in what it shows. A page the role may not open is no
 * exception: it says so, quietly.
 */
let app: RunningApp;
let browser: Browser;
let job: string;

beforeAll(async () => {
  app = await startServer();
  job = await idOf(app.ctx.knex, 'jobs', { reference: 'TW-2402' });
  browser = await launchBrowser();
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

/** Every path of the router, with the demo's job TW-2402 where a page takes a job. */
const pages = () => [
  '/',
  '/board',
  '/jobs',
  '/jobs/new',
  `/jobs/${job}`,
  `/jobs/${job}/edit`,
  `/jobs/${job}/survey`,
  `/jobs/${job}/commission`,
  `/jobs/${job}/handover`,
  '/resources',
  '/firm',
  '/templates',
  '/my-work',
  '/slots',
  '/slots/day-sheets',
  '/day-sheets',
  '/reports',
  '/no-such-page',
];

/**
 * Listens to a page for as long as it lives: what went wrong (taken by `take`) and the requests
 * under way (the board's live stream never ends, so it is not counted).
 */
function watch(page: Page): { take(): string[]; pending: Set<unknown> } {
  let trouble: string[] = [];
  const pending = new Set<unknown>();
  page.on('pageerror', (e) => trouble.push(`uncaught: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error' || (m.type() === 'warning' && m.text().includes('[Vue warn]')))
      trouble.push(`${m.type()}: ${m.text().slice(0, 300)}`);
  });
  page.on('response', (r) => {
    if (r.status() >= 400) trouble.push(`${r.request().method()} ${new URL(r.url()).pathname} → ${r.status()}`);
  });
  page.on('request', (r) => {
    if (!r.url().includes('/api/board/stream')) pending.add(r);
  });
  page.on('requestfinished', (r) => pending.delete(r));
  page.on('requestfailed', (r) => pending.delete(r));
  return {
    pending,
    take() {
      const found = trouble;
      trouble = [];
      return found;
    },
  };
}

/** What went wrong on a page while it loaded and settled, in words (empty: nothing). */
async function troubleOn(page: Page, watched: ReturnType<typeof watch>, url: string): Promise<string[]> {
  watched.take();
  await page.goto(url);
  await page.getByRole('heading', { level: 1 }).first().waitFor();
  // Settled: no request under way for a little while (what the page asks for after it draws).
  let quiet = 0;
  for (const started = Date.now(); quiet < 5 && Date.now() - started < 10_000;) {
    quiet = watched.pending.size === 0 ? quiet + 1 : 0;
    await page.waitForTimeout(40);
  }
  const trouble = watched.take();
  // Nothing on the page reads as a value that went missing on the way.
  const shown = await page.evaluate(() => document.body.innerText);
  for (const slip of shown.match(/\b(undefined|NaN|null)\b|Invalid Date|\[object \w+\]/g) ?? [])
    trouble.push(`shows "${slip}"`);
  return trouble;
}

describe('every page, as each role', () => {
  it.each(ROLES.map((r) => [r]))(
    'as %s: no uncaught error, no error logged, no request refused',
    async (role) => {
      const page =
        role === 'crew' || role === 'partner'
          ? await phonePage(browser)
          : await browser.newPage({ viewport: { width: 1280, height: 800 } });
      await page.context().clock.setFixedTime(TEST_TODAY);
      const demo = role === 'partner' ? account('partner', 'Brightspark Electrical') : account(role as Role);
      await signInThroughPage(page, app.url, demo.email);
      const watched = watch(page);
      const found: string[] = [];
      for (const path of pages())
        for (const t of await troubleOn(page, watched, `${app.url}${path}`)) found.push(`${path}: ${t}`);
      await page.context().close();
      expect(found).toEqual([]);
    },
    120_000,
  );
});

describe('an address naming a day that is not one, or one out of the years work is planned in', () => {
  it('opens the board and the day sheets on today, with nothing going wrong', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    await page.context().clock.setFixedTime(TEST_TODAY);
    await signInThroughPage(page, app.url, account('scheduler').email);
    const watched = watch(page);
    const found: string[] = [];
    // A day that does not exist, year 0 and year 9999 (the API plans in 2000–2100).
    for (const date of ['2026-02-30', '0000-01-01', '9999-12-31']) {
      for (const t of await troubleOn(page, watched, `${app.url}/board?date=${date}`))
        found.push(`board ${date}: ${t}`);
      // The week of the test's today, Monday 1 June 2026.
      expect(await page.getByText('Mon 1 – Sun 7 Jun 2026').count(), date).toBe(1);
      for (const t of await troubleOn(page, watched, `${app.url}/day-sheets?date=${date}`))
        found.push(`day sheets ${date}: ${t}`);
      expect(await page.locator('input[type="date"]').inputValue(), date).toBe('2026-06-01');
    }
    await page.context().close();
    expect(found).toEqual([]);
  }, 60_000);
});
