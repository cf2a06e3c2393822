/**
 * Registers the service worker (src/service-worker/sw.ts) in a built app, so the app opens without
 * a signal. Not in development: Vite serves files that change on every save.
 */
export function registerServiceWorker(): void {
  if (!import.meta.env.PROD || !('serviceWorker' in navigator)) return;
  window.addEventListener('load', () => {
    // A browser that refuses (private windows of some, a policy) works as before, online only.
    navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => undefined);
  });
}
