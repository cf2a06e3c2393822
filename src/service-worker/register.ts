/**
 * Registers the service worker (src/service-worker/sw.ts) in a built app, so the app opens without
 * a signal. Not in development: Vite serves files that change on every save.
 */
export function registerServiceWorker(): void {
  if (!import.meta.env.PROD || !('serviceWorker' in navigator)) return;
  // A browser that refuses (private windows of some, a policy) works as before, online only.
  const register = () => void navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => undefined);
  // After the page's own load, so fetching the app ahead never slows the first page.
  if (document.readyState === 'complete') register();
  else window.addEventListener('load', register, { once: true });
}
