import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

/**
 * axe-core (Deque's accessibility rule engine) run in the page as it stands, with its default
 * rules: WCAG 2.0–2.2 A and AA, and its best practices. The app's content security policy allows
 * no injected script, so the page's browser context must be made with `bypassCSP: true` (tests only).
 */
const axeSource = createRequire(import.meta.url).resolve('axe-core/axe.min.js');

/** One rule the page breaks, with up to three places. */
export interface Finding {
  rule: string;
  impact: string | null;
  where: string[];
}

/**
 * The page's accessibility violations, each rule once (empty when it passes).
 *
 * @example
 * expect(await accessibilityViolations(page)).toEqual([])
 */
export async function accessibilityViolations(page: Page): Promise<Finding[]> {
  await page.addScriptTag({ path: axeSource });
  return page.evaluate(async () => {
    // In the page: its globals, typed here without the DOM's types (this file is also server-side code).
    const page = globalThis as unknown as {
      axe: { run(context: unknown): Promise<{ violations: unknown[] }> };
      document: unknown;
    };
    const result = await page.axe.run(page.document);
    return (result.violations as { id: string; impact: string | null; nodes: { target: string[] }[] }[]).map((v) => ({
      rule: v.id,
      impact: v.impact,
      where: v.nodes.slice(0, 3).map((n) => n.target.join(' ')),
    }));
  });
}
