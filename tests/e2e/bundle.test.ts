import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The built client (`dist/`, which `npm test` builds before the end-to-end tests) carries no
 * holiday tables: the server lists each calendar's holidays (server/services/holiday-days.ts).
 * date-holidays brought the whole world's holidays into the engine's chunk (1.46 MB, 253 KB gzipped).
 */
const assets = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'dist', 'assets');
const chunks = readdirSync(assets)
  .filter((f) => f.endsWith('.js'))
  .map((f) => ({ name: f, text: readFileSync(path.join(assets, f), 'utf8') }));

describe('the built client', () => {
  it('holds none of the date-holidays tables', () => {
    expect(chunks.length).toBeGreaterThan(5);
    // Names from date-holidays' German and Spanish tables: no text of our own uses them.
    for (const marker of ['Fronleichnam', 'Tag der Deutschen Einheit', 'Día de la Hispanidad']) {
      expect(
        chunks.filter((c) => c.text.includes(marker)).map((c) => c.name),
        marker,
      ).toEqual([]);
    }
  });

  it("keeps the engine's chunk small", () => {
    // The chunk with the engine's calendar arithmetic (its out-of-range message is unique to it).
    const engine = chunks.filter((c) => c.text.includes('across more than ten years'));
    expect(engine).toHaveLength(1);
    expect(statSync(path.join(assets, engine[0]!.name)).size).toBeLessThan(400_000);
  });

  it("loads the reports page's charts library on its own, after the page", () => {
    // ECharts' own marker for the instances it draws: in the charts' chunk only. The reports
    // page's chunk held it once (573 KB, 191 KB gzipped), so its tables waited for the charts.
    const charts = chunks.filter((c) => c.text.includes('__ec_'));
    expect(charts.map((c) => c.name.replace(/-[\w-]+\.js$/, ''))).toEqual(['ReportCharts']);
    const page = chunks.filter((c) => c.name.startsWith('ReportsView-'));
    expect(page).toHaveLength(1);
    expect(statSync(path.join(assets, page[0]!.name)).size).toBeLessThan(100_000);
  });
});
