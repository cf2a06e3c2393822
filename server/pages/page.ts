import { escapeHtml } from '../mail/layout.ts';

export { escapeHtml };

/** The app's font, regular and bold, Latin and Latin Extended (served from /fonts, see app.ts). */
export const PAGE_FONT_FILES = ['latin-400', 'latin-ext-400', 'latin-600', 'latin-ext-600'].map(
  (f) => `/fonts/work-sans-${f}-normal.woff2`,
);
const EXT_RANGE = 'U+0100-024F,U+1E00-1EFF';
const FONT_FACES = PAGE_FONT_FILES.map((url) => {
  const weight = url.includes('-600-') ? 'bold' : 'normal';
  const range = url.includes('latin-ext') ? `;unicode-range:${EXT_RANGE}` : '';
  return `@font-face{font-family:'Work Sans';font-style:normal;font-weight:${weight};font-display:swap;src:url(${url}) format('woff2')${range}}`;
}).join('\n');

/**
 * A small server-rendered page for people without a session (partners answering from an e-mail,
 * invitees): no script, inline styles only (the app's CSP allows inline styles, not scripts).
 */
export function page(title: string, body: string, tone: 'ok' | 'warn' | 'refused' | 'plain' = 'plain'): string {
  const edge = { ok: '#1f7a4d', warn: '#b7791f', refused: '#a23b3b', plain: '#0b5c7a' }[tone];
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex"><title>${escapeHtml(title)} · Waterline</title>
<style>
${FONT_FACES}
body{margin:0;background:#eef2f5;font-family:'Work Sans',system-ui,Arial,sans-serif;color:#1d2730}
main{max-width:34rem;margin:1rem auto;background:#fff;border-radius:8px;padding:1.2rem 1.2rem 1.5rem;border-top:6px solid ${edge};overflow-wrap:anywhere}
h1{font-size:1.35rem;margin:0 0 .8rem}p,li,dd{font-size:1.05rem;line-height:1.45}dt{font-weight:bold;margin-top:.6rem}dd{margin:0}
button{display:block;width:100%;padding:.9rem;font-size:1.1rem;font-weight:bold;border-radius:6px;border:2px solid #0b5c7a;background:#0b5c7a;color:#fff;margin-top:1rem;cursor:pointer}
button:focus-visible,input:focus-visible,a:focus-visible{outline:3px solid #f0b429;outline-offset:2px}
a{color:#0b5c7a}a[href^="tel:"]{white-space:nowrap;font-weight:bold}
button,input{font-family:inherit}
label{display:block;margin-top:.8rem;font-weight:bold}input{font-size:1.05rem;padding:.5rem;width:100%;box-sizing:border-box;margin-top:.2rem}
.caution{background:#fff6e0;border-left:4px solid #b7791f;padding:.6rem .9rem;margin-top:1rem}
</style></head><body><main>
<h1>${escapeHtml(title)}</h1>
${body}
</main></body></html>`;
}
