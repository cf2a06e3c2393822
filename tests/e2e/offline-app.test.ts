import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { launchBrowser, phonePage, signInThroughPage, startServer, type RunningApp } from '../helpers/browser.ts';
import { account } from '../helpers/server.ts';

/*
 * The app on a phone with no signal: its service worker (src/service-worker/sw.ts) keeps the app's
 * own files, so a page reloaded on site opens Waterline and says the server can't be reached, rather
 * than the browser's error page; and it keeps nothing the server answered.
 */
let app: RunningApp;
let browser: Browser;
let context: BrowserContext;
let page: Page;

beforeAll(async () => {
  app = await startServer();
  browser = await launchBrowser();
  page = await phonePage(browser, { serviceWorkers: 'allow' });
  context = page.context();
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
});

describe('the app without a signal', () => {
  it('opens from the phone, says the server cannot be reached, and carries on by itself when the signal is back', async () => {
    await signInThroughPage(page, app.url, account('crew').email);
    await page.waitForURL(/\/my-work/);
    // The service worker has taken the page over once it has kept the app's files (its install).
    await page.evaluate(() =>
      Promise.race([
        navigator.serviceWorker.ready.then(() => undefined),
        new Promise((_, reject) => setTimeout(() => reject(new Error('no service worker got ready in 20 s')), 20_000)),
      ]),
    );
    await expect.poll(() => page.evaluate(() => navigator.serviceWorker.controller !== null)).toBe(true);

    // A step marked earlier with no signal is still waiting on the phone (kept-marks.ts).
    const keptKey = 'waterline:kept-steps:1:5';
    await page.evaluate(
      ([k, v]) => localStorage.setItem(k!, v!),
      [
        keptKey,
        JSON.stringify([
          { bookingId: '1', action: 'arrive', version: 1, markedAt: new Date().toISOString(), label: 'Survey · TW-1' },
        ]),
      ],
    );
    await context.setOffline(true);
    await page.reload();
    const notice = page.getByRole('alert').filter({ hasText: 'Waterline could not reach its server' });
    await notice.waitFor({ timeout: 15_000 });
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    expect(new URL(page.url()).searchParams.get('next')).toBe('/my-work');
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toBe('Waiting for a connection');
    expect(await page.title()).toBe('Waiting for a connection · Waterline');
    expect(await page.getByTestId('kept-waiting').textContent()).toMatch(
      /^\s*1 step marked on this phone without a signal\s+is kept here, and sent once the connection is back\.\s*$/,
    );
    await page.evaluate((k) => localStorage.removeItem(k), keptKey);
    await expect.poll(() => notice.getByRole('button', { name: 'Try again now' }).isVisible()).toBe(true);
    await page.screenshot({ path: 'tests/e2e/artifacts/offline-app-phone.png' });
    // Tried again with still no signal: the same page, still waiting for the page asked for.
    await notice.getByRole('button', { name: 'Try again now' }).click();
    await expect.poll(() => notice.getByRole('button', { name: 'Try again now' }).isEnabled()).toBe(true);
    expect(new URL(page.url()).searchParams.get('next')).toBe('/my-work');

    // Any of the app's addresses opens the same way, one never visited too.
    await page.goto(`${app.url}/jobs/12345`);
    await notice.waitFor({ timeout: 15_000 });
    // Nothing the server answered is kept on the phone: only the app's own files.
    const kept = await page.evaluate(async () => {
      const urls: string[] = [];
      for (const name of await caches.keys())
        for (const request of await (await caches.open(name)).keys()) urls.push(new URL(request.url).pathname);
      return urls;
    });
    expect(kept.length).toBeGreaterThan(10);
    expect(kept.filter((p) => !/^\/(assets\/[\w.-]+\.(js|css|woff2)|index\.html|favicon\.svg)$/.test(p))).toEqual([]);

    // The server's own pages (links from e-mails, sign-in, feeds) are never answered from the phone.
    await expect(page.goto(`${app.url}/answer/abc`)).rejects.toThrow(/ERR_INTERNET_DISCONNECTED/);
    await expect(page.goto(`${app.url}/auth/google`)).rejects.toThrow(/ERR_INTERNET_DISCONNECTED/);

    // The signal comes back (on a page of its own: the one above is on the browser's error page).
    const again = await context.newPage();
    await again.goto(`${app.url}/my-work`);
    const noticeAgain = again.getByRole('alert').filter({ hasText: 'Waterline could not reach its server' });
    await noticeAgain.waitFor({ timeout: 15_000 });
    await context.setOffline(false);
    // The page asked for opens without a touch.
    await again.waitForURL((u) => u.pathname === '/my-work', { timeout: 15_000 });
    await again.getByRole('heading', { name: 'My work' }).waitFor();
  }, 90_000);

  it('waits out a server restart (no signal lost, so no online event) and opens the page by itself', async () => {
    const waiting = await context.newPage();
    // The server answers 503 while it restarts.
    await waiting.route('**/api/session', (route) => route.fulfill({ status: 503, body: 'restarting' }));
    await waiting.goto(`${app.url}/my-work`);
    await waiting.getByRole('heading', { name: 'Waiting for a connection' }).waitFor({ timeout: 15_000 });
    await waiting.unroute('**/api/session');
    // Asked again every 10 s.
    await waiting.waitForURL((u) => u.pathname === '/my-work', { timeout: 25_000 });
    await waiting.getByRole('heading', { name: 'My work' }).waitFor();
  }, 60_000);
});
