import type { BookingFacts } from '../mail/facts.ts';
import { escapeHtml as e, page } from './page.ts';
import { slotDetails } from './answers.ts';

/** What the electrician has uploaded for this slot already (their own upload only). */
export interface UploadedCertificate {
  name: string;
  uploadedAt: string;
}

const when = (iso: string, timeZone: string) =>
  new Intl.DateTimeFormat('en-GB', {
    timeZone,
    day: 'numeric',
    month: 'long',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).format(new Date(iso));

/** The upload form: one PDF, posted to the certificate link (no script; the browser's own file picker). */
function uploadForm(formAction: string, current: UploadedCertificate | null): string {
  return `<form method="post" action="${e(formAction)}" enctype="multipart/form-data">
<label for="file">${current ? 'Upload a corrected certificate (replaces the one above)' : 'The certificate (PDF)'}</label>
<input id="file" name="file" type="file" accept="application/pdf,.pdf" required>
<button type="submit">Upload the certificate</button></form>`;
}

function status(f: BookingFacts, current: UploadedCertificate | null): string {
  return current
    ? `<p><strong>Uploaded:</strong> ${e(current.name)}, ${e(when(current.uploadedAt, f.installer.timeZone))}. ${e(f.installer.name)} can see it.</p>`
    : `<p>${e(f.installer.name)} hands the job over once the certificate for this connection is here. Upload it as a PDF (at most 10 MB).</p>`;
}

/**
 * A section for the answer pages once an electrical connection slot is confirmed: where to upload
 * the certificate later (the link stays good for a while after the work), or the form at once.
 */
export function certificateSection(link: string): string {
  return `<h2 style="font-size:1.1rem;margin-top:1.5rem">Electrical certificate</h2>
<p>When the connection is tested and certified, upload the certificate here: <a href="${e(link)}">upload the certificate</a>. Keep this link; it works until a month after the slot.</p>`;
}

/** GET /answer/certificate/:token: the slot, what is uploaded, and the form. */
export function certificateForm(
  f: BookingFacts,
  formAction: string,
  current: UploadedCertificate | null,
  error?: string,
): string {
  return page(
    'Electrical certificate',
    `${error ? `<p role="alert"><strong>${e(error)}</strong></p>` : ''}${status(f, current)}
${uploadForm(formAction, current)}${slotDetails(f)}`,
    error ? 'warn' : 'plain',
  );
}

/** After a good upload. */
export function certificateUploadedPage(f: BookingFacts, formAction: string, current: UploadedCertificate): string {
  return page(
    'Thank you: the certificate is uploaded',
    `${status(f, current)}${uploadForm(formAction, current)}`,
    'ok',
  );
}
