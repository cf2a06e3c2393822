import { chromium, type Browser, type BrowserContextOptions, type Page } from 'playwright-core';
import net from 'node:net';
import type { Server } from 'node:http';
import { existsSync } from 'node:fs';
import { startTestApp, type TestContext } from './server.ts';

/** Debian's chromium, as the machine provides it (never a downloaded browser). */
export async function launchBrowser(): Promise<Browser> {
  const executablePath = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
  if (!existsSync(executablePath))
    throw new Error(`No chromium at ${executablePath}: npm test installs it as root, or run apt-get install chromium`);
  const browser = await chromium.launch({
    executablePath,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--disable-dev-shm-usage',
    ],
  });
  // The app's service worker fetches the whole app ahead in every new context: tests that are not
  // about it go without (tests/e2e/offline-app.test.ts asks for it with serviceWorkers: 'allow').
  const newContext = browser.newContext.bind(browser);
  browser.newContext = (options = {}) => newContext({ serviceWorkers: 'block', ...options });
  return browser;
}

/**
 * A page on a phone: 390 × 844 CSS pixels at twice the density, touch, in London (a common handset
 * size: common practice, no source).
 */
export async function phonePage(browser: Browser, options: BrowserContextOptions = {}): Promise<Page> {
  const context = await browser.newContext({
    viewport: { width: 390, height: 844 },
    deviceScaleFactor: 2,
    isMobile: true,
    hasTouch: true,
    timezoneId: 'Europe/London',
    ...options,
  });
  return context.newPage();
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

export interface RunningApp {
  ctx: TestContext;
  url: string;
  stop(): Promise<void>;
}

/** The real app over the seeded test database, listening on a free loopback port (it serves dist/). */
export async function startServer(): Promise<RunningApp> {
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const ctx = await startTestApp({ PUBLIC_URL: url });
  const server: Server = await new Promise((resolve) => {
    const s = ctx.waterline.listen(port, '127.0.0.1', () => resolve(s));
  });
  return {
    ctx,
    url,
    async stop() {
      server.closeAllConnections();
      await new Promise((r) => server.close(r));
      await ctx.close();
    },
  };
}

/** Signs in the way a person does: the sign-in page's button, then the provider's account list. */
export async function signInThroughPage(page: Page, baseUrl: string, email: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByRole('link', { name: /sign in with google/i }).click();
  await page.getByText(email).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in') && u.origin === baseUrl);
}
