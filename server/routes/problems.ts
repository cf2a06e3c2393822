import type { RouteTable } from './table.ts';
import { NotFoundError } from '../errors.ts';
import { escapeHtml, page } from '../pages/page.ts';
import { PROBLEM_TYPES } from '../problem-types.ts';

/**
 * The pages behind the problem types: `<PUBLIC_URL>/problems/<code>` says what a problem means
 * and what to do about it, so the `type` of every problem+json answer resolves to something useful.
 */
export function problemRoutes(table: RouteTable): void {
  table.get('/problems/:code', 'public', (req, res) => {
    const code = String(req.params.code);
    const known = Object.hasOwn(PROBLEM_TYPES, code) ? PROBLEM_TYPES[code] : undefined;
    if (!known) throw new NotFoundError('problem type');
    res
      .type('html')
      .send(
        page(
          known.title,
          `<p>${escapeHtml(known.explanation)}</p><p><small>Problem type <code>${escapeHtml(code)}</code> (RFC 9457).</small></p>`,
        ),
      );
  });
}
