/**
 * Paths the server answers itself (server/app.ts `ownedByServer`): never served from the device.
 * e-mail answer links, invitations, calendar feeds, payment pages, problem pages, sign-in, the API
 * and the font of the server's pages.
 */
export const SERVER_OWNED_PAGES: RegExp[] = [/^\/(api|auth|fonts|answer|invite|feeds|pay|problems)(\/|$)/];

/**
 * The app's own built files (hashed under /assets/), which the service worker keeps once used.
 *
 * @example
 * isAppFile('/assets/index-B3iyHAGJ.js') // true
 * isAppFile('/api/board') // false
 */
export function isAppFile(pathname: string): boolean {
  return pathname.startsWith('/assets/');
}
