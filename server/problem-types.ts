/**
 * Every problem type Waterline answers with (RFC 9457 `type`), with a short explanation. Each type
 * is an absolute URI under the installation's PUBLIC_URL (`<PUBLIC_URL>/problems/<code>`) that
 * resolves to a page saying what it means and what to do. A code not listed here is a defect:
 * tests/server/problem-types.test.ts checks every code the server can send is listed.
 */
export const PROBLEM_TYPES: Record<string, { title: string; explanation: string }> = {
  'bad-request': {
    title: 'The request is not valid',
    explanation:
      'A field is missing or has the wrong form. The answer lists each field with the reason; correct them and send again.',
  },
  'malformed-body': {
    title: 'The request body could not be read',
    explanation: 'The body is not valid JSON (or not the declared content type). Send well-formed JSON.',
  },
  'body-too-large': {
    title: 'The request body is too large',
    explanation: 'The body is larger than this installation accepts. Send less at once.',
  },
  'headers-too-large': {
    title: 'The address or its headers are too long',
    explanation:
      'The address and headers together are longer than this installation reads (a very long search, or a link pasted twice). Search with fewer words, or ask for less at once.',
  },
  'unreadable-request': {
    title: 'The request could not be read',
    explanation: 'The request is not well-formed HTTP. Send it again from the app.',
  },
  unauthorized: {
    title: 'Sign in to continue',
    explanation: 'The request needs a signed-in session. Sign in and try again.',
  },
  forbidden: {
    title: 'Not allowed',
    explanation: "Your role, or your firm's part in the job, does not allow this. Ask the firm's owner if you need it.",
  },
  csrf: {
    title: 'Missing or wrong CSRF token',
    explanation:
      "A change was sent without the session's token (an old tab, or a request from another site). Reload the page and try again.",
  },
  'not-found': {
    title: 'Not found',
    explanation: 'There is no such thing, or it belongs to a firm whose data you cannot see.',
  },
  conflict: {
    title: 'Conflict',
    explanation:
      'The change clashes with what is recorded now: someone else changed it first, a resource is already held, or the booking is not in a state that allows this. The answer says which; reload and try again.',
  },
  'rule-violation': {
    title: 'The change breaks a scheduling rule',
    explanation:
      'The scheduling engine refused the change: an order of stages, a cure, a notice period, a working calendar or a clash. The answer names the rule and the earliest time that would pass.',
  },
  'no-unit': {
    title: 'The job has no unit',
    explanation: 'Choose the hot tub or swim spa for the job first; its size and weight drive the plan.',
  },
  reference: {
    title: 'The job reference cannot be used',
    explanation: "Job references must be unique within the firm and in the firm's pattern.",
  },
  'rate-limited': {
    title: 'Too many attempts',
    explanation:
      'Too many requests of this kind came from one place in a short time. Wait for the time given in Retry-After and try again.',
  },
  'bad-file-name': {
    title: 'The file name cannot be used',
    explanation:
      'The file name is empty, too long or has characters that cannot be stored. Rename the file and upload it again.',
  },
  'empty-file': { title: 'The file is empty', explanation: 'The upload had no content. Choose the file again.' },
  'unreadable-image': {
    title: 'The image cannot be read',
    explanation: 'The file says it is a photo but could not be decoded. Take or export the photo again.',
  },
  'file-too-large': {
    title: 'The file is too large',
    explanation: 'Uploads have a size limit; make the photo or document smaller.',
  },
  'file-type-mismatch': {
    title: 'The file is not what its name says',
    explanation: "The file's content does not match its type. Export it again in the stated format.",
  },
  'unsupported-file-type': {
    title: 'This type of file is not accepted',
    explanation: 'Upload photos (JPEG, PNG, WebP) or PDF documents.',
  },
  'storage-unavailable': {
    title: 'File storage is not answering',
    explanation: 'The file store is away for a moment. Nothing was lost; try again shortly.',
  },
  unavailable: {
    title: 'A service Waterline needs is not answering',
    explanation: 'The database is away for a moment. Nothing was saved from this request; try again shortly.',
  },
  'database-unavailable': {
    title: 'The database is not answering',
    explanation:
      'Waterline could not reach its database (it is restarting, stopped or overloaded). Nothing was saved from this request and no e-mail went out for it. Wait a moment and try again; your sign-in is kept. If it lasts more than a few minutes, tell whoever runs your Waterline.',
  },
  'bad-signature': {
    title: 'The webhook signature is not valid',
    explanation:
      'A payment event arrived without a valid signature from the payment provider (or too old to trust). It was refused and logged; nothing changed.',
  },
  'payments-unavailable': {
    title: 'Payments are not set up or not answering',
    explanation:
      'Waterline could not reach the payment provider, or this installation has no provider keys (PAYMENT_SECRET_KEY, PAYMENT_WEBHOOK_SECRET). Nothing was charged; try again shortly.',
  },
  'commissioning-incomplete': {
    title: 'Commissioning is not complete',
    explanation:
      "The commissioning stage is marked done only when its record is complete: every check ticked, pH, alkalinity and sanitiser readings within the firm's ranges (or a note saying what was done about them) and at least one photo. The answer lists what is missing; finish the record on the commissioning page and mark it done again.",
  },
  'commissioning-not-done': {
    title: 'Commissioning is not done',
    explanation:
      'A spa is handed over working: the handover is signed and marked done only once every commissioning stage of the job is marked done (which itself needs a complete commissioning record). Finish the commissioning record, mark Commission done on My work, then hand over.',
  },
  'certificate-missing': {
    title: 'The electrical certificate is missing',
    explanation:
      "A job with an electrical connection is handed over once the electrician has uploaded the certificate (from their slot or their e-mail's link), or once the office has recorded why it is handed over without one.",
  },
  'handover-unsigned': {
    title: 'The householder has not signed the handover',
    explanation:
      'The handover stage is marked done by signing the handover with the householder (Hand over, on the phone): that also e-mails them the handover pack, asks for the balance and plans the service visits.',
  },
  internal: {
    title: 'Something went wrong on our side',
    explanation: 'An unexpected error. It has been logged; try again, and tell us if it keeps happening.',
  },
};

/** The absolute problem type URI for a code, under the installation's public address. */
export function problemTypeUri(publicUrl: string | undefined, code: string): string {
  return `${(publicUrl ?? '').replace(/\/+$/, '')}/problems/${code}`;
}
