/**
 * A page's code that could not be fetched. After a new release, a tab left open asks for the old
 * release's files, which the server no longer has; on site the signal can drop mid-load. The
 * router then loads the page afresh, once (see reloadForPage).
 */

/**
 * True for the error a browser gives when a page's code (a dynamic import, or the styles Vite
 * preloads for it) could not be fetched. The messages are Chromium's, Firefox's and Safari's (from
 * memory) and Vite's own.
 *
 * @example
 * isCodeLoadError(new TypeError('Failed to fetch dynamically imported module: /assets/JobsView-1a2b.js')) // true
 */
export function isCodeLoadError(error: unknown): boolean {
  const message = error instanceof Error ? error.message : String(error);
  return /Failed to fetch dynamically imported module|error loading dynamically imported module|Importing a module script failed|Unable to preload CSS/i.test(
    message,
  );
}

/** Within this long, a second failure for the same page is not met with another load. */
export const RELOAD_GUARD_MS = 30_000;

const KEY = 'waterline.reloadedFor';

/** The page last loaded afresh and when, as kept in the tab's storage (null: none, or unreadable). */
function lastTry(storage: Pick<Storage, 'getItem'>): { path?: unknown; at?: unknown } | null {
  try {
    const kept: unknown = JSON.parse(storage.getItem(KEY) ?? 'null');
    return typeof kept === 'object' ? (kept as { path?: unknown; at?: unknown } | null) : null;
  } catch {
    return null;
  }
}

interface Loader {
  storage: Pick<Storage, 'getItem' | 'setItem'>;
  /** A full page load of an address (location.assign). */
  load: (path: string) => void;
  now: number;
}

/**
 * Loads the page afresh (index.html and the current release's files) unless it was just tried for
 * the same page: returns false then, and the caller says the server can't be reached instead of
 * loading for ever.
 *
 * @example
 * reloadForPage('/jobs', { storage: sessionStorage, load: (p) => location.assign(p), now: Date.now() }) // true
 */
export function reloadForPage(path: string, loader: Loader): boolean {
  const last = lastTry(loader.storage);
  if (last?.path === path && typeof last.at === 'number' && loader.now - last.at < RELOAD_GUARD_MS) return false;
  try {
    loader.storage.setItem(KEY, JSON.stringify({ path, at: loader.now }));
  } catch {
    // Nowhere to note the try (storage full or refused): a load could then repeat for ever.
    return false;
  }
  loader.load(path);
  return true;
}
