/** Escapes text for HTML bodies and attributes. */
export const escapeHtml = (value: unknown): string =>
  String(value ?? '').replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  );

/** Colours of our own: a deep teal for actions, slate text, a warm band for cautions. */
const INK = '#1d2730';
const MUTED = '#4a5560';
const ACTION = '#0b5c7a';
const CAUTION_BG = '#fff6e0';
const CAUTION_EDGE = '#b7791f';

export interface MailSection {
  heading: string;
  lines: string[];
}
export interface MailButton {
  label: string;
  href: string;
  tone?: 'primary' | 'plain';
}

export interface MailContent {
  /** Shown by phones beside the subject before the message is opened. */
  preview: string;
  title: string;
  intro: string[];
  sections: MailSection[];
  cautions?: { heading: string; lines: string[]; footnote: string };
  buttons?: MailButton[];
  footer: string[];
}

/**
 * One small template for every e-mail: a single column at most 560 px wide with inline styles only
 * (mail programs drop <style> blocks), big tap targets, and a plain-text twin with the same facts.
 */
export function renderMail(content: MailContent): { html: string; text: string } {
  const p = (s: string, style = '') =>
    `<p style="margin:0 0 10px;color:${INK};font-size:16px;line-height:1.45;${style}">${escapeHtml(s)}</p>`;
  const sections = content.sections
    .map(
      (s) => `
    <tr><td style="padding:14px 20px 4px">
      <h2 style="margin:0 0 6px;font-size:15px;text-transform:uppercase;letter-spacing:.04em;color:${MUTED}">${escapeHtml(s.heading)}</h2>
      ${s.lines.map((l) => p(l)).join('')}
    </td></tr>`,
    )
    .join('');
  const cautions = content.cautions
    ? `
    <tr><td style="padding:14px 20px">
      <div style="background:${CAUTION_BG};border-left:4px solid ${CAUTION_EDGE};padding:12px 14px;border-radius:4px">
        <h2 style="margin:0 0 6px;font-size:16px;color:${INK}">${escapeHtml(content.cautions.heading)}</h2>
        <ul style="margin:0 0 8px;padding-left:20px">${content.cautions.lines.map((l) => `<li style="margin:0 0 6px;color:${INK};font-size:15px;line-height:1.4">${escapeHtml(l)}</li>`).join('')}</ul>
        <p style="margin:0;color:${INK};font-size:14px;font-weight:bold">${escapeHtml(content.cautions.footnote)}</p>
      </div>
    </td></tr>`
    : '';
  const buttons = content.buttons?.length
    ? `
    <tr><td style="padding:10px 20px 18px">
      ${content.buttons.map((b) => `<a href="${escapeHtml(b.href)}" style="display:block;margin:0 0 10px;padding:14px 16px;border-radius:6px;text-align:center;font-size:17px;font-weight:bold;text-decoration:none;${b.tone === 'plain' ? `background:#ffffff;color:${ACTION};border:2px solid ${ACTION}` : `background:${ACTION};color:#ffffff;border:2px solid ${ACTION}`}">${escapeHtml(b.label)}</a>`).join('')}
    </td></tr>`
    : '';
  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(content.title)}</title></head>
<body style="margin:0;padding:0;background:#eef2f5;font-family:Arial,Helvetica,sans-serif">
<span style="display:none;max-height:0;overflow:hidden">${escapeHtml(content.preview)}</span>
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#eef2f5"><tr><td align="center" style="padding:12px 8px">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="max-width:560px;background:#ffffff;border-radius:8px">
  <tr><td style="padding:18px 20px 6px">
    <h1 style="margin:0 0 10px;font-size:21px;line-height:1.3;color:${INK}">${escapeHtml(content.title)}</h1>
    ${content.intro.map((l) => p(l)).join('')}
  </td></tr>
  ${sections}${cautions}${buttons}
  <tr><td style="padding:12px 20px 18px;border-top:1px solid #dde3e8">
    ${content.footer.map((l) => p(l, `font-size:13px;color:${MUTED}`)).join('')}
  </td></tr>
</table></td></tr></table></body></html>`;

  const text = [
    content.title,
    '='.repeat(Math.min(content.title.length, 60)),
    '',
    ...content.intro,
    '',
    ...content.sections.flatMap((s) => [s.heading.toUpperCase(), ...s.lines, '']),
    ...(content.cautions
      ? [
          content.cautions.heading.toUpperCase(),
          ...content.cautions.lines.map((l) => `- ${l}`),
          content.cautions.footnote,
          '',
        ]
      : []),
    ...(content.buttons ?? []).flatMap((b) => [`${b.label}:`, b.href, '']),
    '--',
    ...content.footer,
  ].join('\n');
  return { html, text };
}
