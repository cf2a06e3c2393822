// Temporary profiling script (deleted after use).
import http from 'node:http';
import { performance } from 'node:perf_hooks';
import { createKnex } from '../server/db.ts';
import { loadConfig } from '../server/config.ts';
import { createApp } from '../server/app.ts';
import { launchBrowser } from '../tests/helpers/browser.ts';
import { signInCookie, START, DAY } from './board-data.ts';

const db = new URL(process.env.DATABASE_URL ?? ''); db.pathname = '/waterline_bench_browser';
const redis = new URL(process.env.REDIS_URL ?? ''); redis.pathname = '/6';
const config = loadConfig({ ...process.env, DATABASE_URL: db.toString(), REDIS_URL: redis.toString(), LOG_LEVEL: 'silent', SIGN_IN_RATE_LIMIT: '100000' });
const knex = createKnex(config.DATABASE_URL);
const server = await new Promise<http.Server>((r) => { const s = http.createServer().listen(0, '127.0.0.1', () => r(s)); });
const base = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
const app = createApp({ config: { ...config, PUBLIC_URL: base }, knex, now: () => START - 7 * DAY });
server.on('request', app.app);
const { cookie } = await signInCookie(app.app, 'bench.scheduler@bench.example');
const browser = await launchBrowser();
const context = await browser.newContext({ viewport: { width: 1440, height: 900 }, timezoneId: 'Europe/London' });
await context.addCookies([{ name: cookie.split('=')[0]!, value: cookie.split('=')[1]!, domain: '127.0.0.1', path: '/', httpOnly: true, sameSite: 'Lax' }]);
const page = await context.newPage();
const url = `${base}/board?view=month&date=2027-02-01${process.argv[2] === 'open' ? '&groups=open' : ''}`;
const ready = () => document.querySelectorAll('.fc-resource-group').length > 5 && document.querySelectorAll('.fc-timeline-lane').length > 5 && document.querySelectorAll('.tray-stage, .tray p').length > 0;
await page.goto(url); await page.waitForFunction(ready, undefined, { timeout: 120_000 });
const cdp = await context.newCDPSession(page);
await cdp.send('Profiler.enable');
await cdp.send('Profiler.setSamplingInterval', { interval: 500 });
await cdp.send('Profiler.start');
const t = performance.now();
await page.goto(url);
await page.waitForFunction(ready, undefined, { timeout: 120_000 });
await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => setTimeout(r, 0))));
console.log('diag', JSON.stringify(await page.evaluate(() => { const sc = document.querySelector('.fc-timeline-body')?.closest('.fc-scroller') as HTMLElement; const root = document.querySelector('.board-timeline') as HTMLElement; return { ch: sc?.clientHeight, sh: sc?.scrollHeight, st: sc?.scrollTop, pad: root?.style.cssText, cs: sc ? getComputedStyle(sc).paddingTop : null, lanes: document.querySelectorAll('.fc-timeline-lane.fc-resource').length, parentCls: document.querySelector('.fc-timeline-body')?.parentElement?.className }; })));
const m = await cdp.send('Performance.getMetrics').catch(() => null); void m;
console.log('load', Math.round(performance.now() - t), 'ms; rows', await page.evaluate(() => document.querySelectorAll('.fc-timeline-lane.fc-resource').length), 'events', await page.evaluate(() => document.querySelectorAll('.fc-event').length));
const { profile } = await cdp.send('Profiler.stop') as { profile: { nodes: { id: number; callFrame: { functionName: string; url: string; lineNumber: number }; children?: number[] }[]; samples: number[]; timeDeltas: number[] } };
const self = new Map<number, number>();
profile.samples.forEach((id, i) => self.set(id, (self.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0)));
const byId = new Map(profile.nodes.map((n) => [n.id, n]));
const parent = new Map<number, number>();
for (const n of profile.nodes) for (const c of n.children ?? []) parent.set(c, n.id);
const fnSelf = new Map<string, number>();
const fnTotal = new Map<string, number>();
for (const [id, us] of self) {
  const n = byId.get(id)!;
  const key = `${n.callFrame.functionName || '(anon)'} ${n.callFrame.url.split('/').pop()}:${n.callFrame.lineNumber}`;
  fnSelf.set(key, (fnSelf.get(key) ?? 0) + us);
  const seen = new Set<string>();
  for (let cur: number | undefined = id; cur !== undefined; cur = parent.get(cur)) {
    const m = byId.get(cur)!;
    const k = `${m.callFrame.functionName || '(anon)'} ${m.callFrame.url.split('/').pop()}:${m.callFrame.lineNumber}`;
    if (seen.has(k)) continue; seen.add(k);
    fnTotal.set(k, (fnTotal.get(k) ?? 0) + us);
  }
}
console.log('SELF'); for (const [k, v] of [...fnSelf].sort((a, b) => b[1] - a[1]).slice(0, 25)) console.log(`  ${(v / 1000).toFixed(0)} ms ${k}`);
console.log('TOTAL'); for (const [k, v] of [...fnTotal].sort((a, b) => b[1] - a[1]).slice(0, 45)) console.log(`  ${(v / 1000).toFixed(0)} ms ${k}`);
await browser.close(); server.close(); await app.close(); await knex.destroy();
