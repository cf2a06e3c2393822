/**
 * A phone number as a tel: link, for tapping on a phone (spaces and punctuation dropped, a leading
 * + kept). The app's pages and the server's link pages use this one.
 *
 * @example telHref('0113 496 0001') // 'tel:01134960001'
 */
export function telHref(phone: string): string {
  return `tel:${phone.replace(/[^\d+]/g, '')}`;
}
