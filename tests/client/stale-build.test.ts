import { describe, expect, it } from 'vitest';
import { isCodeLoadError, reloadForPage, RELOAD_GUARD_MS } from '@/router/stale-build';

/** sessionStorage's two calls over a Map. */
function memoryStorage() {
  const m = new Map<string, string>();
  return { getItem: (k: string) => m.get(k) ?? null, setItem: (k: string, v: string) => void m.set(k, v) };
}

describe('a page whose code could not be fetched', () => {
  it("is told by the browsers' words for a failed dynamic import (from memory) and Vite's for its styles", () => {
    expect(
      isCodeLoadError(new TypeError('Failed to fetch dynamically imported module: http://x/assets/JobsView-1a2b.js')),
    ).toBe(true);
    expect(isCodeLoadError(new TypeError('error loading dynamically imported module: http://x/a.js'))).toBe(true);
    expect(isCodeLoadError(new TypeError('Importing a module script failed.'))).toBe(true);
    expect(isCodeLoadError(new Error('Unable to preload CSS for /assets/JobsView-1a2b.css'))).toBe(true);
    // Anything else a page throws is not met with a reload.
    expect(isCodeLoadError(new TypeError("Cannot read properties of undefined (reading 'id')"))).toBe(false);
    expect(isCodeLoadError('ApiError 500')).toBe(false);
  });

  it('is loaded afresh once; failing again within the guard, not loaded for ever', () => {
    const storage = memoryStorage();
    const loads: string[] = [];
    const load = (p: string) => loads.push(p);
    const t0 = 1_780_000_000_000;
    expect(reloadForPage('/jobs?q=Otley', { storage, load, now: t0 })).toBe(true);
    expect(reloadForPage('/jobs?q=Otley', { storage, load, now: t0 + 5_000 })).toBe(false);
    // Another page is its own try; the same page after the guard is tried again.
    expect(reloadForPage('/reports', { storage, load, now: t0 + 6_000 })).toBe(true);
    expect(reloadForPage('/jobs?q=Otley', { storage, load, now: t0 + 6_000 + RELOAD_GUARD_MS })).toBe(true);
    expect(loads).toEqual(['/jobs?q=Otley', '/reports', '/jobs?q=Otley']);
  });

  it('is not loaded afresh when the try cannot be noted (storage refused), so it can never repeat for ever', () => {
    const loads: string[] = [];
    const storage = {
      getItem: () => null,
      setItem: () => {
        throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
      },
    };
    expect(reloadForPage('/jobs', { storage, load: (p) => loads.push(p), now: 1 })).toBe(false);
    expect(loads).toEqual([]);
  });

  it('is loaded afresh when what was kept of the last try is unreadable', () => {
    const storage = memoryStorage();
    storage.setItem('waterline.reloadedFor', '{not json');
    const loads: string[] = [];
    expect(reloadForPage('/jobs', { storage, load: (p) => loads.push(p), now: 1 })).toBe(true);
    expect(loads).toEqual(['/jobs']);
  });
});
